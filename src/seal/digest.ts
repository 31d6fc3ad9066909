// SHA-256 digests as lowercase hex, of raw bytes or of a value's canonical JSON.
import { createHash } from 'node:crypto';
import { canonicalBytes } from './canonical.ts';

export const SHA256_HEX_PATTERN = /^[0-9a-f]{64}$/;

export function sha256Hex(data: string | Uint8Array): string {
  return createHash('sha256').update(data).digest('hex');
}

/** Digest of the canonical JSON of `value`, so formatting never changes it. */
export function canonicalSha256(value: unknown): string {
  return sha256Hex(canonicalBytes(value));
}
