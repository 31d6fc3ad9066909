// The archive's content-addressed store: every file kept once under objects/, named by its SHA-256, written whole or not at all.
import { closeSync, fsyncSync, mkdirSync, openSync, readFileSync, readdirSync, renameSync, rmSync, statSync, writeSync } from 'node:fs';
import { join } from 'node:path';
import { processIsRunning } from '../output/liveProcess.ts';
import { sha256Hex } from '../seal/digest.ts';

const SHA256 = /^[0-9a-f]{64}$/;

export interface ObjectStore {
  folder: string;
  /** Stores the bytes (once, however often they are given) and returns their SHA-256. */
  put(bytes: Uint8Array | string): string;
  /** The stored bytes, or undefined when no such object exists. */
  read(sha256: string): Buffer | undefined;
  /** Every object in the store, by name; temporary files of an interrupted write are not objects. */
  list(): string[];
  pathOf(sha256: string): string;
}

/** The store under `<archive>/objects/`: `ab/abcdef…` (two hex digits of fan-out keep folders small over decades). */
export function openObjectStore(archiveFolder: string): ObjectStore {
  const folder = join(archiveFolder, 'objects');
  const pathOf = (sha256: string) => {
    if (!SHA256.test(sha256)) throw new Error(`"${sha256}" is not a SHA-256 in hex`);
    return join(folder, sha256.slice(0, 2), sha256);
  };
  return {
    folder,
    pathOf,
    put(bytes) {
      const data = typeof bytes === 'string' ? Buffer.from(bytes, 'utf8') : bytes;
      const sha256 = sha256Hex(data);
      const path = pathOf(sha256);
      if (intactObject(path, data.byteLength)) return sha256;
      const shard = join(folder, sha256.slice(0, 2));
      mkdirSync(shard, { recursive: true });
      // A temporary name of its own per writer, flushed before the rename: a killed writer leaves a stray .tmp, never a short object.
      const temporary = join(shard, `.${sha256}.${process.pid}.${Math.random().toString(36).slice(2)}.tmp`);
      const fd = openSync(temporary, 'wx', 0o444);
      try {
        writeSync(fd, data);
        fsyncSync(fd);
      } finally {
        closeSync(fd);
      }
      renameSync(temporary, path);
      syncFolder(shard);
      return sha256;
    },
    read(sha256) {
      try {
        return readFileSync(pathOf(sha256));
      } catch (error) {
        if ((error as NodeJS.ErrnoException).code === 'ENOENT') return undefined;
        throw error;
      }
    },
    list() {
      let shards: string[];
      try {
        shards = readdirSync(folder).filter((name) => /^[0-9a-f]{2}$/.test(name));
      } catch {
        return [];
      }
      return shards.flatMap((shard) => readdirSync(join(folder, shard)).filter((name) => SHA256.test(name) && name.startsWith(shard))).sort();
    },
  };
}

/** An object already in place with the right size; its content is what `verify` checks, not every add. */
function intactObject(path: string, size: number): boolean {
  try {
    return statSync(path).size === size;
  } catch {
    return false;
  }
}

/** The rename itself is made durable by flushing the folder that holds the new name. */
function syncFolder(folder: string): void {
  const fd = openSync(folder, 'r');
  try {
    fsyncSync(fd);
  } finally {
    closeSync(fd);
  }
}

/** Temporary files left by writers that were killed: harmless, removed by `reindex`. */
export function removeStrayTemporaries(store: ObjectStore): number {
  let removed = 0;
  let shards: string[];
  try {
    shards = readdirSync(store.folder);
  } catch {
    return 0;
  }
  for (const shard of shards) {
    for (const name of readdirSync(join(store.folder, shard))) {
      if (!name.endsWith('.tmp')) continue;
      const owner = Number(name.split('.')[2]);
      if (Number.isInteger(owner) && processIsRunning(owner)) continue;
      rmSync(join(store.folder, shard, name), { force: true });
      removed += 1;
    }
  }
  return removed;
}
