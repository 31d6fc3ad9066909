// Writing report files so that a reader never sees half a file: temp file in the same folder, fsync, rename.
import { closeSync, fsyncSync, mkdirSync, openSync, readdirSync, renameSync, rmSync, writeSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { processIsRunning } from './liveProcess.ts';

export interface PendingFile {
  path: string;
  content: string | Uint8Array;
}

function temporaryName(path: string): string {
  return join(dirname(path), `.${basename(path)}.${process.pid}.${Math.random().toString(36).slice(2)}.tmp`);
}

/** The process id in a temporary name of `path`, or undefined when `name` is not one. */
function temporaryOwner(path: string, name: string): number | undefined {
  const prefix = `.${basename(path)}.`;
  if (!name.startsWith(prefix) || !name.endsWith('.tmp')) return undefined;
  const match = /^(\d+)\.[a-z0-9]*\.tmp$/.exec(name.slice(prefix.length));
  return match ? Number(match[1]) : undefined;
}

/** A run killed between writing and renaming leaves its temporary files; remove those of these names whose writer is gone. */
function removeStaleTemporaries(files: readonly PendingFile[]): void {
  for (const file of files) {
    let names: string[];
    try {
      names = readdirSync(dirname(file.path));
    } catch {
      continue;
    }
    for (const name of names) {
      const owner = temporaryOwner(file.path, name);
      if (owner !== undefined && owner !== process.pid && !processIsRunning(owner)) rmSync(join(dirname(file.path), name), { force: true });
    }
  }
}

/**
 * Write every file to a temporary name first and rename only when all are on disk, so a failure
 * part-way leaves the previous set untouched and no temporary files behind.
 */
export function writeFilesAtomically(files: readonly PendingFile[]): void {
  removeStaleTemporaries(files);
  const written: { temporary: string; path: string }[] = [];
  try {
    for (const file of files) {
      mkdirSync(dirname(file.path), { recursive: true });
      const temporary = temporaryName(file.path);
      const descriptor = openSync(temporary, 'wx', 0o644);
      written.push({ temporary, path: file.path });
      try {
        const bytes = typeof file.content === 'string' ? Buffer.from(file.content, 'utf8') : file.content;
        writeSync(descriptor, bytes);
        fsyncSync(descriptor);
      } finally {
        closeSync(descriptor);
      }
    }
  } catch (error) {
    for (const { temporary } of written) rmSync(temporary, { force: true });
    throw error;
  }
  for (const { temporary, path } of written) renameSync(temporary, path);
}
