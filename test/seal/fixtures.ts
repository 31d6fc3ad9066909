// Invented signers and an invented study subject shared by the seal tests.
import { mkdtempSync, rmSync } from 'node:fs';
import { onTestFinished } from 'vitest';
import { SealError } from '../../src/seal/errors.ts';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { KeyObject } from 'node:crypto';
import { createSigningKey, unlockSigningKey, type NewSigningKey, type PublicIdentity } from '../../src/seal/keys.ts';
import type { SealSubject } from '../../src/seal/manifest.ts';
import type { ScryptCost } from '../../src/seal/keyFile.ts';

export const ENGINEER_PASSPHRASE = 'copper kestrel under a tin moon';
export const CHECKER_PASSPHRASE = 'seven lanterns over harrow ford';

/**
 * A cheaper scrypt for tests that make many keys (about a millisecond instead of a second); the
 * default, KEY_FILE_SCRYPT, is what kvarbook writes and is tested on its own.
 */
export const TEST_KEY_SCRYPT: ScryptCost = { N: 2 ** 10, r: 8, p: 1 };

export interface TestSigner extends NewSigningKey {
  privateKey: KeyObject;
  passphrase: string;
}

export function makeSigner(name: string, licence: string, passphrase = ENGINEER_PASSPHRASE): TestSigner {
  const created = createSigningKey({ name, licence, jurisdiction: 'Province of Vestmark', passphrase, scrypt: TEST_KEY_SCRYPT });
  return { ...created, passphrase, privateKey: unlockSigningKey(created.encryptedPrivateKeyPem, passphrase) };
}

/** A new folder for one test, removed when that test finishes. */
export function freshTempDir(label: string): string {
  const dir = mkdtempSync(join(tmpdir(), `kvarbook-seal-${label}-`));
  onTestFinished(() => rmSync(dir, { recursive: true, force: true }));
  return dir;
}

/** The SealError an action throws; fails the test if it throws nothing or something else. */
export function sealErrorOf(action: () => unknown): SealError {
  try {
    action();
  } catch (error) {
    if (error instanceof SealError) return error;
    throw error;
  }
  throw new Error('expected a SealError, but nothing was thrown');
}

const digestOf = (character: string): string => character.repeat(64);

export function sampleSubject(): SealSubject {
  return {
    studyId: 'harrowgate-lindqvist-400kv-shunt-reactors',
    revision: 'B',
    studyDate: '2025-03-14',
    title: 'Harrowgate–Lindqvist 400 kV line: shunt reactor sizing at light load',
    studyFile: 'harrowgate-lindqvist.study.md',
    studySourceSha256: digestOf('a'),
    effectiveInputs: {
      lineLengthKm: { value: 310, unit: 'km', source: 'given' },
      nominalVoltageKv: { value: 400, unit: 'kV', source: 'given' },
      reactorCompensationFraction: { value: 0.7, unit: '1', source: 'overridden' },
    },
    results: [
      { name: 'surgeImpedanceOhm', value: 277.94, unit: 'Ω' },
      { name: 'receivingEndVoltagePu', value: 1.0412, unit: 'pu', tolerance: 1e-6 },
      { name: 'reactorRatingMvar', value: 2 * 75, unit: 'Mvar' },
      { name: 'reactorArrangement', value: 'two line reactors, one at each end' },
      { name: 'withinVoltageLimits', value: true },
    ],
    criteria: [{ name: 'receiving-end voltage at no load', value: 1.0412, unit: 'pu', passed: true, limits: '0.95 to 1.05 pu' }],
    cautions: ['Line charging taken at 20 °C conductor temperature.'],
    kvarbookVersion: '0.1.0',
    nodeVersion: 'v20.20.2',
    lockfileSha256: digestOf('b'),
    reportBodySha256: digestOf('c'),
  };
}

/** Every spelling of the private key that would count as leaking it. */
export function privateKeySpellings(signer: TestSigner): string[] {
  const pkcs8Der = signer.privateKey.export({ type: 'pkcs8', format: 'der' });
  const rawBase64Url = signer.privateKey.export({ format: 'jwk' }).d!;
  const raw = Buffer.from(rawBase64Url, 'base64url');
  const pemBody = signer.encryptedPrivateKeyPem.split('\n').filter((line) => line !== '' && !line.startsWith('-----'));
  return [pkcs8Der.toString('base64'), pkcs8Der.toString('hex'), raw.toString('base64'), raw.toString('base64url'), raw.toString('hex'), ...pemBody];
}

export type { PublicIdentity };
