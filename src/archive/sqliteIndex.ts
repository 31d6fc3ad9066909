// The archive's index in SQLite beside the store (the one-machine default): WAL, every commit durable, one writer at a time.
import { join } from 'node:path';
import Database from 'better-sqlite3';
import { StudyFailure } from '../diagnostics/diagnostic.ts';
import { SCHEMA, archiveIndexOver, type ArchiveIndex, type SqlConnection } from './archiveIndex.ts';

export const SQLITE_INDEX_FILE = 'index.sqlite';

export function openSqliteIndex(archiveFolder: string): ArchiveIndex {
  const path = join(archiveFolder, SQLITE_INDEX_FILE);
  let db: Database.Database;
  try {
    db = new Database(path);
    // WAL lets readers go on while one writer adds; FULL makes each committed add durable, so a row never outlives a crash its objects survived.
    db.pragma('journal_mode = WAL');
    db.pragma('synchronous = FULL');
    db.pragma('busy_timeout = 30000');
    for (const statement of SCHEMA) db.exec(statement);
  } catch (error) {
    throw new StudyFailure([
      {
        code: 'archive-index-unreadable',
        message: `the archive index ${path} cannot be opened: ${(error as Error).message}`,
        hint: 'move it aside and run `kvarbook archive reindex` to rebuild it from the stored files',
      },
    ]);
  }
  // One connection per process: transactions of this process's concurrent callers take turns.
  let turn: Promise<unknown> = Promise.resolve();
  const connection: SqlConnection = {
    like: 'LIKE',
    async all<T>(sql: string, parameters: readonly unknown[] = []) {
      return db.prepare(sql).all(...parameters) as T[];
    },
    async run(sql, parameters = []) {
      return db.prepare(sql).run(...parameters).changes;
    },
    transaction<T>(work: () => Promise<T>): Promise<T> {
      const mine = turn.then(async () => {
        db.exec('BEGIN IMMEDIATE');
        try {
          const result = await work();
          db.exec('COMMIT');
          return result;
        } catch (error) {
          db.exec('ROLLBACK');
          throw error;
        }
      });
      turn = mine.catch(() => undefined);
      return mine;
    },
    async close() {
      await turn;
      db.close();
    },
  };
  return archiveIndexOver(connection);
}
