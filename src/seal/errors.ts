// The one error type of the seal modules: a stable code, what was wrong, and what to do about it.

export type SealErrorCode =
  | 'not-canonical-json'
  | 'passphrase-too-short'
  | 'wrong-passphrase'
  | 'malformed-key'
  | 'wrong-key-type'
  | 'key-identity-mismatch'
  | 'invalid-identity-field'
  | 'key-exists'
  | 'key-not-found'
  | 'no-default-key'
  | 'ambiguous-default-key'
  | 'invalid-seal-subject'
  | 'invalid-tolerance'
  | 'invalid-check-record';

export interface SealErrorDetails {
  code: SealErrorCode;
  message: string;
  hint: string;
  /** The quantity or field at fault, e.g. `passphrase` or `results[2].value`. */
  quantity?: string;
  /** The offending value, when it is safe to repeat (never a passphrase or key). */
  value?: unknown;
  /** The values that would have been accepted, in words. */
  allowed?: string;
}

export class SealError extends Error {
  readonly code: SealErrorCode;
  readonly hint: string;
  readonly quantity?: string;
  readonly value?: unknown;
  readonly allowed?: string;

  constructor(details: SealErrorDetails, options?: { cause?: unknown }) {
    super(details.message, options);
    this.name = 'SealError';
    this.code = details.code;
    this.hint = details.hint;
    if (details.quantity !== undefined) this.quantity = details.quantity;
    if (details.value !== undefined) this.value = details.value;
    if (details.allowed !== undefined) this.allowed = details.allowed;
  }
}
