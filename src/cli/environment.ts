// What a run takes from this installation, read at the edge: the facts a report records (versions, the lock-file hash) and its stylesheet.
import { readFileSync } from 'node:fs';
import { installedPath } from '../installation.ts';
import { sha256Hex } from '../seal/digest.ts';

export interface InstallationFacts {
  kvarbookVersion: string;
  nodeVersion: string;
  lockfileSha256: string;
}

export function installationFacts(): InstallationFacts {
  const manifest = JSON.parse(readFileSync(installedPath('package.json'), 'utf8')) as { version: string };
  const lockfile = readFileSync(installedPath('package-lock.json'));
  return {
    kvarbookVersion: manifest.version,
    nodeVersion: process.version,
    lockfileSha256: sha256Hex(lockfile),
  };
}

/** The look of every report; the render stage is handed it rather than reading a file of its own. */
export function reportStylesheet(): string {
  return readFileSync(installedPath('templates/report.css'), 'utf8');
}
