// The signer's key folder on disk: writing keys without ever overwriting one, and finding them again.
import { randomUUID, type KeyObject } from 'node:crypto';
import {
  chmodSync,
  closeSync,
  existsSync,
  fsyncSync,
  linkSync,
  mkdirSync,
  openSync,
  readdirSync,
  readFileSync,
  renameSync,
  unlinkSync,
  writeSync,
} from 'node:fs';
import { join } from 'node:path';
import { SealError } from './errors.ts';
import {
  checkIdentity,
  FINGERPRINT_PATTERN,
  keyBelongsTo,
  shortFingerprint,
  unlockSigningKey,
  type NewSigningKey,
  type PublicIdentity,
} from './keys.ts';
import { describeSigner } from './trust.ts';

const KEY_SUFFIX = '.key.pem';
const IDENTITY_SUFFIX = '.identity.json';
/** Holds the full fingerprint of the key used when none is named. */
const DEFAULT_MARKER = 'default-key.txt';

export interface StoredKey {
  identity: PublicIdentity;
  encryptedPrivateKeyPem: string;
  keyPath: string;
  identityPath: string;
}

/**
 * Writes `<short fingerprint>.key.pem` (0600) and `.identity.json`, in a folder made 0700. The
 * first key saved in a folder becomes its default.
 */
export function saveKey(dir: string, key: NewSigningKey): { keyPath: string; identityPath: string } {
  const checked = checkIdentity(key.identity, 'identity');
  if (!checked.ok) {
    throw new SealError({
      code: 'seal-invalid-identity-field',
      message: `Refusing to save a key with an invalid identity: ${checked.problems.join('; ')}.`,
      quantity: 'identity',
      hint: 'Save exactly what key creation returned.',
    });
  }
  mkdirSync(dir, { recursive: true, mode: 0o700 });
  // An existing folder may have been made with the umask's wider mode; private keys need it closed.
  chmodSync(dir, 0o700);
  const { keyPath, identityPath } = pathsFor(dir, key.identity.fingerprint);
  for (const path of [keyPath, identityPath]) {
    if (existsSync(path)) throw keyExists(path, key.identity.fingerprint);
  }
  writeNewFileAtomically(keyPath, key.encryptedPrivateKeyPem, 0o600);
  writeNewFileAtomically(identityPath, exportIdentity(key.identity), 0o600);
  if (!existsSync(join(dir, DEFAULT_MARKER))) setDefaultKey(dir, key.identity.fingerprint);
  return { keyPath, identityPath };
}

export function setDefaultKey(dir: string, fingerprint: string): void {
  const stored = loadKeyByFingerprint(dir, fingerprint);
  replaceFileAtomically(join(dir, DEFAULT_MARKER), `${stored.identity.fingerprint}\n`, 0o600);
}

/** Every key in the folder that has both its key file and a valid identity, in file-name order. */
export function listKeys(dir: string): StoredKey[] {
  if (!existsSync(dir)) return [];
  return readdirSync(dir)
    .filter((name) => name.endsWith(IDENTITY_SUFFIX))
    .sort()
    .flatMap((name) => {
      const identityPath = join(dir, name);
      const keyPath = join(dir, name.slice(0, -IDENTITY_SUFFIX.length) + KEY_SUFFIX);
      if (!existsSync(keyPath)) return [];
      const checked = checkIdentity(readJson(identityPath), 'identity');
      if (!checked.ok) return [];
      return [{ identity: checked.identity, encryptedPrivateKeyPem: readFileSync(keyPath, 'utf8'), keyPath, identityPath }];
    });
}

/** By full fingerprint or by its 16-digit short form (as in the file names). */
export function loadKeyByFingerprint(dir: string, fingerprint: string): StoredKey {
  const wanted = fingerprint.trim().toLowerCase();
  const found = listKeys(dir).find((stored) => stored.identity.fingerprint === wanted || shortFingerprint(stored.identity.fingerprint) === wanted);
  if (found !== undefined) return found;
  throw new SealError({
    code: 'seal-key-not-found',
    message: `No signing key with fingerprint ${fingerprint} in ${dir}.`,
    quantity: 'fingerprint',
    value: fingerprint,
    allowed: listedFingerprints(dir),
    hint: 'List the keys in the folder, or create a key first.',
  });
}

/** The key named in the folder's default marker, else the only key in the folder. */
export function loadDefaultKey(dir: string): StoredKey {
  const markerPath = join(dir, DEFAULT_MARKER);
  if (existsSync(markerPath)) return loadKeyByFingerprint(dir, readFileSync(markerPath, 'utf8'));
  const keys = listKeys(dir);
  if (keys.length === 1) return keys[0]!;
  if (keys.length === 0) {
    throw new SealError({
      code: 'seal-no-default-key',
      message: `There is no signing key in ${dir}.`,
      quantity: 'signing keys in folder',
      value: 0,
      allowed: 'at least one',
      hint: 'Create a signing key first.',
    });
  }
  throw new SealError({
    code: 'seal-ambiguous-default-key',
    message: `${dir} holds ${keys.length} signing keys and none is marked as the default.`,
    quantity: 'signing keys in folder',
    value: keys.length,
    allowed: listedFingerprints(dir),
    hint: 'Name the key by fingerprint, or mark one as the default.',
  });
}

/** Unlocks a stored key and makes sure it is the partner of the identity stored beside it. */
export function unlockStoredKey(stored: StoredKey, passphrase: string): KeyObject {
  const privateKey = unlockSigningKey(stored.encryptedPrivateKeyPem, passphrase);
  if (!keyBelongsTo(privateKey, stored.identity)) {
    throw new SealError({
      code: 'seal-key-identity-mismatch',
      message: `${stored.keyPath} is not the key of ${describeSigner(stored.identity)} named in ${stored.identityPath}.`,
      quantity: 'private key',
      hint: 'The key and identity files were mixed up; restore both from the same backup.',
    });
  }
  return privateKey;
}

/** The public identity as a JSON file others can put in their trust folder; holds no private material. */
export function exportIdentity(identity: PublicIdentity): string {
  const publicOnly: PublicIdentity = {
    format: identity.format,
    name: identity.name,
    licence: identity.licence,
    jurisdiction: identity.jurisdiction,
    publicKeyPem: identity.publicKeyPem,
    fingerprint: identity.fingerprint,
  };
  return `${JSON.stringify(publicOnly, null, 2)}\n`;
}

function pathsFor(dir: string, fingerprint: string): { keyPath: string; identityPath: string } {
  if (!FINGERPRINT_PATTERN.test(fingerprint)) {
    throw new SealError({
      code: 'seal-invalid-identity-field',
      message: `The fingerprint ${fingerprint} is not in kvarbook's form.`,
      quantity: 'fingerprint',
      value: fingerprint,
      allowed: '16 colon-separated groups of 4 lowercase hex digits',
      hint: 'Save exactly what key creation returned.',
    });
  }
  const base = join(dir, shortFingerprint(fingerprint));
  return { keyPath: base + KEY_SUFFIX, identityPath: base + IDENTITY_SUFFIX };
}

/**
 * Temp file, flushed, then hard-linked into place: unlike rename, link fails if the target
 * exists, so a key can never be overwritten even by a concurrent save.
 */
function writeNewFileAtomically(path: string, text: string, mode: number): void {
  const tempPath = writeTempFile(path, text, mode);
  try {
    linkSync(tempPath, path);
  } catch (cause) {
    if ((cause as NodeJS.ErrnoException).code === 'EEXIST') throw keyExists(path, undefined);
    throw cause;
  } finally {
    unlinkSync(tempPath);
  }
}

function replaceFileAtomically(path: string, text: string, mode: number): void {
  renameSync(writeTempFile(path, text, mode), path);
}

function writeTempFile(path: string, text: string, mode: number): string {
  const tempPath = `${path}.${randomUUID()}.tmp`;
  const descriptor = openSync(tempPath, 'wx', mode);
  try {
    writeSync(descriptor, text);
    fsyncSync(descriptor);
  } finally {
    closeSync(descriptor);
  }
  // The umask may have narrowed the mode at creation; set it exactly.
  chmodSync(tempPath, mode);
  return tempPath;
}

function readJson(path: string): unknown {
  try {
    return JSON.parse(readFileSync(path, 'utf8'));
  } catch {
    return undefined;
  }
}

function listedFingerprints(dir: string): string {
  const keys = listKeys(dir);
  return keys.length === 0 ? 'no keys in this folder' : keys.map((stored) => stored.identity.fingerprint).join(', ');
}

function keyExists(path: string, fingerprint: string | undefined): SealError {
  return new SealError({
    code: 'seal-key-exists',
    message: `${path} already exists; kvarbook never overwrites a key file.`,
    quantity: 'key file',
    value: fingerprint ?? path,
    hint: 'Move the existing file away yourself if you really mean to replace it.',
  });
}
