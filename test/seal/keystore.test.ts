// Specification of the key folder: file names, permissions, no overwriting, and finding keys again.
import { readdirSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { shortFingerprint } from '../../src/seal/keys.ts';
import { exportIdentity, listKeys, loadDefaultKey, loadKeyByFingerprint, saveKey, setDefaultKey, unlockStoredKey } from '../../src/seal/keystore.ts';
import { ENGINEER_PASSPHRASE, freshTempDir, makeSigner, privateKeySpellings, sealErrorOf } from './fixtures.ts';

const permissionBits = (path: string): number => statSync(path).mode & 0o777;

describe('saveKey', () => {
  it('names the files after the short fingerprint', () => {
    const dir = freshTempDir('names');
    const signer = makeSigner('Ilse Marrow', 'PE-40217');
    const { keyPath, identityPath } = saveKey(dir, signer);
    const short = shortFingerprint(signer.identity.fingerprint);
    expect(keyPath).toBe(join(dir, `${short}.key.pem`));
    expect(identityPath).toBe(join(dir, `${short}.identity.json`));
  });

  it('writes the private key file with mode 0600', () => {
    const { keyPath } = saveKey(freshTempDir('mode'), makeSigner('Ilse Marrow', 'PE-40217'));
    expect(permissionBits(keyPath)).toBe(0o600);
  });

  it('closes the key folder to mode 0700', () => {
    const dir = join(freshTempDir('dirmode'), 'keys');
    saveKey(dir, makeSigner('Ilse Marrow', 'PE-40217'));
    expect(permissionBits(dir)).toBe(0o700);
  });

  it('stores the encrypted key exactly and leaves no temporary files behind', () => {
    const dir = freshTempDir('exact');
    const signer = makeSigner('Ilse Marrow', 'PE-40217');
    const { keyPath } = saveKey(dir, signer);
    expect(readFileSync(keyPath, 'utf8')).toBe(signer.encryptedPrivateKeyPem);
    expect(readdirSync(dir).filter((name) => name.endsWith('.tmp'))).toEqual([]);
  });

  it('never overwrites an existing key file', () => {
    const dir = freshTempDir('no-overwrite');
    const signer = makeSigner('Ilse Marrow', 'PE-40217');
    const { keyPath } = saveKey(dir, signer);
    writeFileSync(keyPath, 'the engineer’s only copy');
    expect(sealErrorOf(() => saveKey(dir, signer)).code).toBe('seal-key-exists');
    expect(readFileSync(keyPath, 'utf8')).toBe('the engineer’s only copy');
  });

  it('writes an identity file holding no private key material', () => {
    const signer = makeSigner('Ilse Marrow', 'PE-40217');
    const { identityPath } = saveKey(freshTempDir('public'), signer);
    const identityText = readFileSync(identityPath, 'utf8');
    for (const spelling of privateKeySpellings(signer)) expect(identityText).not.toContain(spelling);
    expect(JSON.parse(identityText)).toEqual(signer.identity);
  });
});

describe('finding stored keys', () => {
  it('makes the first key saved in a folder its default', () => {
    const dir = freshTempDir('default');
    const first = makeSigner('Ilse Marrow', 'PE-40217');
    saveKey(dir, first);
    saveKey(dir, makeSigner('Ilse Marrow', 'PE-40217'));
    expect(loadDefaultKey(dir).identity).toEqual(first.identity);
  });

  it('switches the default to the key named', () => {
    const dir = freshTempDir('switch');
    saveKey(dir, makeSigner('Ilse Marrow', 'PE-40217'));
    const second = makeSigner('Ilse Marrow', 'PE-40217');
    saveKey(dir, second);
    setDefaultKey(dir, second.identity.fingerprint);
    expect(loadDefaultKey(dir).identity).toEqual(second.identity);
  });

  it('finds a key by its full or its short fingerprint', () => {
    const dir = freshTempDir('by-fingerprint');
    const signer = makeSigner('Ilse Marrow', 'PE-40217');
    saveKey(dir, signer);
    expect(loadKeyByFingerprint(dir, signer.identity.fingerprint).encryptedPrivateKeyPem).toBe(signer.encryptedPrivateKeyPem);
    expect(loadKeyByFingerprint(dir, shortFingerprint(signer.identity.fingerprint)).identity).toEqual(signer.identity);
  });

  it('reports an unknown fingerprint as key-not-found', () => {
    const dir = freshTempDir('unknown');
    saveKey(dir, makeSigner('Ilse Marrow', 'PE-40217'));
    expect(sealErrorOf(() => loadKeyByFingerprint(dir, '0000:1111')).code).toBe('seal-key-not-found');
  });

  it('reports an empty folder as having no default key', () => {
    expect(sealErrorOf(() => loadDefaultKey(freshTempDir('empty'))).code).toBe('seal-no-default-key');
  });

  it('lists every saved key', () => {
    const dir = freshTempDir('list');
    saveKey(dir, makeSigner('Ilse Marrow', 'PE-40217'));
    saveKey(dir, makeSigner('Tomas Reede', 'PE-51130'));
    expect(
      listKeys(dir)
        .map((stored) => stored.identity.name)
        .sort(),
    ).toEqual(['Ilse Marrow', 'Tomas Reede']);
  });
});

describe('unlockStoredKey', () => {
  it('unlocks a stored key with its passphrase', () => {
    const dir = freshTempDir('unlock');
    const signer = makeSigner('Ilse Marrow', 'PE-40217');
    saveKey(dir, signer);
    expect(unlockStoredKey(loadDefaultKey(dir), ENGINEER_PASSPHRASE).asymmetricKeyType).toBe('ed25519');
  });

  it('refuses a key file that is not the partner of the identity beside it', () => {
    const dir = freshTempDir('swapped');
    const signer = makeSigner('Ilse Marrow', 'PE-40217');
    const stranger = makeSigner('Tomas Reede', 'PE-51130');
    const { keyPath } = saveKey(dir, signer);
    writeFileSync(keyPath, stranger.encryptedPrivateKeyPem);
    expect(sealErrorOf(() => unlockStoredKey(loadDefaultKey(dir), ENGINEER_PASSPHRASE)).code).toBe('seal-key-identity-mismatch');
  });
});

describe('exportIdentity', () => {
  it('writes only the public identity members', () => {
    const signer = makeSigner('Ilse Marrow', 'PE-40217');
    const leaky = { ...signer.identity, encryptedPrivateKeyPem: signer.encryptedPrivateKeyPem };
    expect(Object.keys(JSON.parse(exportIdentity(leaky))).sort()).toEqual([
      'fingerprint',
      'format',
      'jurisdiction',
      'licence',
      'name',
      'publicKeyPem',
    ]);
  });
});
