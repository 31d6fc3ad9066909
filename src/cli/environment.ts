// Facts about this installation that a report records: versions and the lock-file hash (read once, at the edge).
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { KVARBOOK_ROOT } from '../execute/childBundle.ts';
import { sha256Hex } from '../seal/digest.ts';

export interface InstallationFacts {
  kvarbookVersion: string;
  nodeVersion: string;
  lockfileSha256: string;
}

export function installationFacts(): InstallationFacts {
  const manifest = JSON.parse(readFileSync(join(KVARBOOK_ROOT, 'package.json'), 'utf8')) as { version: string };
  const lockfile = readFileSync(join(KVARBOOK_ROOT, 'package-lock.json'));
  return {
    kvarbookVersion: manifest.version,
    nodeVersion: process.version,
    lockfileSha256: sha256Hex(lockfile),
  };
}
