// A scratch folder with an engineer's key, a checker's trust folder, and ways to forge seals for the attack tests.
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import type { KeyObject } from 'node:crypto';
import { createSigningKey, unlockSigningKey, type PublicIdentity } from '../../src/seal/keys.ts';
import { exportIdentity, saveKey } from '../../src/seal/keystore.ts';
import { buildManifest, signManifest, type SealEnvelope } from '../../src/seal/manifest.ts';
import { readSealedHtml, reportBodySha256, sealedReportHtml } from '../../src/seal/sealedReport.ts';
import type { ReportParts } from '../../src/report/html.ts';
import { scratchFolder } from '../support/cli.ts';
import { TEST_KEY_SCRYPT } from '../seal/fixtures.ts';

export const PASSPHRASE = 'a long enough passphrase';

export interface Signer {
  identity: PublicIdentity;
  privateKey: KeyObject;
}

export interface SealWorkspace {
  folder: string;
  /** KVARBOOK_HOME and the passphrase: what the CLI needs to seal and check here. */
  env: NodeJS.ProcessEnv;
  trustFolder: string;
  engineer: Signer;
}

/** A signer whose public identity is put in `trustFolder` when given. */
export function newSigner(name: string, licence: string, jurisdiction: string, trustFolder?: string, keysFolder?: string): Signer {
  // A cheap scrypt: these keys guard nothing; the CLI reads the cost from the file as it does any.
  const created = createSigningKey({ name, licence, jurisdiction, passphrase: PASSPHRASE, scrypt: TEST_KEY_SCRYPT });
  if (keysFolder) saveKey(keysFolder, created);
  if (trustFolder) writeFileSync(join(trustFolder, `${licence}.json`), exportIdentity(created.identity));
  return { identity: created.identity, privateKey: unlockSigningKey(created.encryptedPrivateKeyPem, PASSPHRASE) };
}

/** The engineer the test studies name (Test Engineer, T-0, Testland), with a key the CLI seals with. */
export function sealWorkspace(prefix: string): SealWorkspace {
  const folder = scratchFolder(prefix);
  const home = join(folder, 'home');
  const trustFolder = join(home, 'trusted');
  mkdirSync(trustFolder, { recursive: true });
  const engineer = newSigner('Test Engineer', 'T-0', 'Testland', trustFolder, join(home, 'keys'));
  return { folder, env: { KVARBOOK_HOME: home, KVARBOOK_PASSPHRASE: PASSPHRASE }, trustFolder, engineer };
}

/**
 * What a signer can do with a sealed report in hand: change its parts, then sign a manifest that
 * describes the changed parts, exactly as `run --seal` would have signed them.
 */
export function reseal(html: string, signer: Signer, edit: (parts: ReportParts) => ReportParts = (parts) => parts): string {
  const reading = readSealedHtml(html);
  if (!reading.ok) throw new Error(reading.problem);
  const parts = edit(reading.contents.parts);
  const { manifest } = reading.contents.envelope as SealEnvelope;
  const { format: _format, signer: _signer, ...subject } = manifest;
  const envelope = signManifest(buildManifest({ ...subject, reportBodySha256: reportBodySha256(parts) }), signer.privateKey, signer.identity);
  return sealedReportHtml(parts, envelope);
}
