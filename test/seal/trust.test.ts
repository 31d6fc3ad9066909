// Specification of the trust folder and of deciding whether a signer is trusted.
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { exportIdentity } from '../../src/seal/keystore.ts';
import { isTrusted, loadTrustedIdentities } from '../../src/seal/trust.ts';
import { freshTempDir, makeSigner } from './fixtures.ts';

describe('loadTrustedIdentities', () => {
  it('loads every identity JSON file in the folder', () => {
    const dir = freshTempDir('trust');
    const engineer = makeSigner('Ilse Marrow', 'PE-40217');
    const checker = makeSigner('Tomas Reede', 'PE-51130');
    writeFileSync(join(dir, 'ilse.json'), exportIdentity(engineer.identity));
    writeFileSync(join(dir, 'tomas.json'), exportIdentity(checker.identity));
    writeFileSync(join(dir, 'notes.txt'), 'not an identity');
    const loaded = loadTrustedIdentities(dir);
    expect(loaded.identities).toEqual([engineer.identity, checker.identity]);
    expect(loaded.problems).toEqual([]);
  });

  it('names a file that is not JSON and still loads the others', () => {
    const dir = freshTempDir('trust-broken');
    const engineer = makeSigner('Ilse Marrow', 'PE-40217');
    writeFileSync(join(dir, 'a-broken.json'), '{ "format": ');
    writeFileSync(join(dir, 'ilse.json'), exportIdentity(engineer.identity));
    const loaded = loadTrustedIdentities(dir);
    expect(loaded.identities).toEqual([engineer.identity]);
    expect(loaded.problems).toHaveLength(1);
    expect(loaded.problems[0]!.file).toBe(join(dir, 'a-broken.json'));
  });

  it('names a file whose identity lacks a field, and says which', () => {
    const dir = freshTempDir('trust-field');
    const { licence: _dropped, ...withoutLicence } = makeSigner('Ilse Marrow', 'PE-40217').identity;
    writeFileSync(join(dir, 'ilse.json'), JSON.stringify(withoutLicence));
    const loaded = loadTrustedIdentities(dir);
    expect(loaded.identities).toEqual([]);
    expect(loaded.problems[0]!.file).toBe(join(dir, 'ilse.json'));
    expect(loaded.problems[0]!.problems.join(' ')).toMatch(/licence/);
  });

  it('refuses a file whose fingerprint is not that of its own key', () => {
    const dir = freshTempDir('trust-forged');
    const engineer = makeSigner('Ilse Marrow', 'PE-40217');
    const other = makeSigner('Tomas Reede', 'PE-51130');
    writeFileSync(join(dir, 'forged.json'), JSON.stringify({ ...other.identity, fingerprint: engineer.identity.fingerprint }));
    const loaded = loadTrustedIdentities(dir);
    expect(loaded.identities).toEqual([]);
    expect(loaded.problems[0]!.problems.join(' ')).toMatch(/fingerprint/);
  });

  it('reports a missing folder as a problem, not a crash', () => {
    const dir = join(freshTempDir('trust-missing'), 'absent');
    expect(loadTrustedIdentities(dir)).toEqual({
      folder: 'missing',
      identities: [],
      problems: [{ file: dir, problems: ['the trust folder does not exist'] }],
    });
  });
});

describe('isTrusted', () => {
  it('trusts an identity whose fingerprint and public key are on the list', () => {
    const engineer = makeSigner('Ilse Marrow', 'PE-40217');
    expect(isTrusted(engineer.identity, [engineer.identity])).toBe(true);
  });

  it('does not trust a key that is not on the list', () => {
    const engineer = makeSigner('Ilse Marrow', 'PE-40217');
    const stranger = makeSigner('Ilse Marrow', 'PE-40217');
    expect(isTrusted(stranger.identity, [engineer.identity])).toBe(false);
  });

  it('does not trust an identity that borrows a trusted fingerprint for another key', () => {
    const engineer = makeSigner('Ilse Marrow', 'PE-40217');
    const impostor = makeSigner('Ilse Marrow', 'PE-40217');
    expect(isTrusted({ ...impostor.identity, fingerprint: engineer.identity.fingerprint }, [engineer.identity])).toBe(false);
  });

  it('does not let a list entry with a mismatched key vouch for its fingerprint', () => {
    const engineer = makeSigner('Ilse Marrow', 'PE-40217');
    const impostor = makeSigner('Ilse Marrow', 'PE-40217');
    const corruptedEntry = { ...engineer.identity, publicKeyPem: impostor.identity.publicKeyPem };
    expect(isTrusted(engineer.identity, [corruptedEntry])).toBe(false);
  });
});
