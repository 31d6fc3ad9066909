// Facts about this installation that a report records: versions and the lock-file hash (read once, at the edge).
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { KVARBOOK_ROOT } from '../execute/childBundle.ts';

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
    lockfileSha256: createHash('sha256').update(lockfile).digest('hex'),
  };
}
