// Writing report files so that a reader never sees half a file: temp file in the same folder, fsync, rename.
import { closeSync, fsyncSync, mkdirSync, openSync, renameSync, rmSync, writeSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';

export interface PendingFile {
  path: string;
  content: string | Uint8Array;
}

function temporaryName(path: string): string {
  return join(dirname(path), `.${basename(path)}.${process.pid}.${Math.random().toString(36).slice(2)}.tmp`);
}

/**
 * Write every file to a temporary name first and rename only when all are on disk, so a failure
 * part-way leaves the previous set untouched and no temporary files behind.
 */
export function writeFilesAtomically(files: readonly PendingFile[]): void {
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
