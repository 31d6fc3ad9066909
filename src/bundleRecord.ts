// Which files a bundle was built from, each by content hash: a bundle is current while every one of them is unchanged.
import { existsSync, mkdirSync, readFileSync, readdirSync, renameSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import type { Metafile } from 'esbuild';
import { installedPath } from './installation.ts';
import { sha256Hex } from './seal/digest.ts';

/** Installation-relative path to SHA-256 of its content. */
export type InputHashes = Record<string, string>;

function fileSha256(relativePath: string): string | undefined {
  const path = installedPath(relativePath);
  return existsSync(path) ? sha256Hex(readFileSync(path)) : undefined;
}

/**
 * The inputs of a build (esbuild's metafile, paths relative to the installation) and the files named in `extra`.
 * Dependencies count through package-lock.json rather than file by file: they change only when it does.
 */
export function inputHashes(metafile: Metafile, extra: readonly string[] = []): InputHashes {
  const paths = new Set([...Object.keys(metafile.inputs).filter((path) => !path.startsWith('node_modules/')), 'package-lock.json', ...extra]);
  const hashes: InputHashes = {};
  for (const path of [...paths].sort()) hashes[path] = fileSha256(path) ?? 'missing';
  return hashes;
}

/** The record at `recordPath`, or undefined when there is none or it cannot be read. */
export function readInputHashes(recordPath: string): InputHashes | undefined {
  try {
    return JSON.parse(readFileSync(recordPath, 'utf8')) as InputHashes;
  } catch {
    return undefined;
  }
}

export function inputsUnchanged(recorded: InputHashes | undefined): boolean {
  if (!recorded || Object.keys(recorded).length === 0) return false;
  return Object.entries(recorded).every(([path, hash]) => fileSha256(path) === hash);
}

/** Writes a file whole or not at all: a concurrent reader sees the old file or the new one. */
export function writeAtomically(path: string, contents: string): void {
  mkdirSync(dirname(path), { recursive: true });
  const temporary = `${path}.${process.pid}.tmp`;
  writeFileSync(temporary, contents);
  renameSync(temporary, path);
}

/** Every file under a folder of the installation, as installation-relative paths in a fixed order. */
export function installationFiles(folder: string): string[] {
  return readdirSync(installedPath(folder), { recursive: true, withFileTypes: true })
    .filter((entry) => entry.isFile())
    .map((entry) => join(entry.parentPath, entry.name).slice(installedPath('.').length).split('\\').join('/'))
    .sort();
}
