// The checker's list of trusted signers: reading it from a folder and deciding whether an identity is on it.
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { checkIdentity, type PublicIdentity } from './keys.ts';

export interface TrustFileProblem {
  /** Path of the file (or the folder) the problems were found in. */
  file: string;
  problems: string[];
}

export interface TrustedIdentities {
  /** Whether the folder itself could be listed; a checker must be told plainly when it could not. */
  folder: 'read' | 'missing' | 'unreadable';
  identities: PublicIdentity[];
  /** Files that were skipped, each with why; a bad file never stops the good ones from loading. */
  problems: TrustFileProblem[];
}

/** Every `*.json` identity directly inside `dir`, in file-name order. */
export function loadTrustedIdentities(dir: string): TrustedIdentities {
  let fileNames: string[];
  try {
    fileNames = readdirSync(dir, { withFileTypes: true })
      .filter((entry) => entry.isFile() && entry.name.endsWith('.json'))
      .map((entry) => entry.name)
      .sort();
  } catch (cause) {
    const missing = (cause as NodeJS.ErrnoException).code === 'ENOENT';
    const reason = missing ? 'the trust folder does not exist' : `the trust folder cannot be read (${String(cause)})`;
    return { folder: missing ? 'missing' : 'unreadable', identities: [], problems: [{ file: dir, problems: [reason] }] };
  }
  const identities: PublicIdentity[] = [];
  const problems: TrustFileProblem[] = [];
  for (const fileName of fileNames) {
    const file = join(dir, fileName);
    const fileProblems = readIdentityFile(file, identities);
    if (fileProblems.length > 0) problems.push({ file, problems: fileProblems });
  }
  return { folder: 'read', identities, problems };
}

function readIdentityFile(file: string, identities: PublicIdentity[]): string[] {
  let value: unknown;
  try {
    value = JSON.parse(readFileSync(file, 'utf8'));
  } catch (cause) {
    return [`not readable JSON: ${cause instanceof Error ? cause.message : String(cause)}`];
  }
  const checked = checkIdentity(value, 'identity');
  if (!checked.ok) return checked.problems;
  const earlier = identities.find((known) => known.fingerprint === checked.identity.fingerprint);
  if (earlier === undefined) {
    identities.push(checked.identity);
    return [];
  }
  return sameDetails(earlier, checked.identity)
    ? []
    : [
        `identity: the key ${checked.identity.fingerprint} is already trusted under different details (${describeSigner(earlier)}); this file was ignored`,
      ];
}

/** On the list by fingerprint and by the very same public key bytes (PEM line breaks do not matter). */
export function isTrusted(identity: PublicIdentity, trusted: readonly PublicIdentity[]): boolean {
  return findTrusted(identity, trusted) !== undefined;
}

export function findTrusted(identity: PublicIdentity, trusted: readonly PublicIdentity[]): PublicIdentity | undefined {
  const checked = checkIdentity(identity, 'identity');
  if (!checked.ok) return undefined;
  const keyDer = checked.publicKey.export({ type: 'spki', format: 'der' });
  return trusted.find((candidate) => {
    if (candidate.fingerprint !== identity.fingerprint) return false;
    const candidateChecked = checkIdentity(candidate, 'trusted');
    return candidateChecked.ok && candidateChecked.publicKey.export({ type: 'spki', format: 'der' }).equals(keyDer);
  });
}

/** Name, licence and jurisdiction as well as the key: what a reader of the report relies on. */
export function sameDetails(first: PublicIdentity, second: PublicIdentity): boolean {
  return first.name === second.name && first.licence === second.licence && first.jurisdiction === second.jurisdiction;
}

export function describeSigner(identity: PublicIdentity): string {
  return `${identity.name}, licence ${identity.licence} (${identity.jurisdiction})`;
}
