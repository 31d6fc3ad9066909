// The archive's index: one row per archived report, and each recheck with its verdicts; kept in SQLite (WAL) beside the store.
import { renameSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import Database from 'better-sqlite3';
import { StudyFailure } from '../diagnostics/diagnostic.ts';
import { fileOf, type ArchiveEntry } from './entry.ts';

export interface IndexedReport {
  entrySha256: string;
  studyId: string;
  revision: number;
  title: string;
  project: string;
  line: string | null;
  engineer: string;
  checker: string | null;
  studyDate: string;
  /** When the report came into the archive; a seal carries no time of its own (its study date is the signer's statement). */
  archivedAt: string;
  signerFingerprint: string;
  envelopeSha256: string;
  reportSha256: string;
  sourceSha256: string;
  kvarbookVersion: string;
  nodeVersion: string;
  /** The entry of the revision this one supersedes: the highest lower revision of the same study in the archive. */
  supersedes: string | null;
  lastRecheckAt: string | null;
  lastVerdict: RecheckVerdict | null;
}

export type RecheckVerdict = 'reproduced' | 'moved' | 'failed-to-run' | 'signature-problem';

/** Every field but `text` and the dates matches as a case-insensitive part of the field; `text` searches titles and projects. */
export interface FindQuery {
  studyId?: string;
  title?: string;
  project?: string;
  line?: string;
  engineer?: string;
  checker?: string;
  signer?: string;
  kvarbookVersion?: string;
  verdict?: RecheckVerdict;
  /** Study dates from and to, inclusive, YYYY-MM-DD. */
  from?: string;
  to?: string;
  text?: string;
}

export interface RecheckItem {
  entrySha256: string;
  state: 'pending' | 'done';
  verdict: RecheckVerdict | null;
  /** JSON of what the recheck found (its steps, moved figures); null while pending. */
  findings: string | null;
}

export interface RecheckRun {
  runId: string;
  /** True when an unfinished recheck of the same selection was taken up again. */
  resumed: boolean;
  items: RecheckItem[];
}

/** The one interface every command works through, whatever keeps the index. */
export interface ArchiveIndex {
  /** Adds the row, and relinks the study's revisions, in one transaction; false when the entry was there already. */
  add(entrySha256: string, entry: ArchiveEntry, archivedAt: string): boolean;
  get(entrySha256: string): IndexedReport | undefined;
  all(): IndexedReport[];
  find(query: FindQuery): IndexedReport[];
  /** The latest archived report of a study (of one revision, when given). */
  latest(studyId: string, revision?: number): IndexedReport | undefined;
  /** Starts a recheck of these entries, or takes up the unfinished one with the same selection. */
  startRecheck(selection: string, entries: readonly string[], startedAt: string): RecheckRun;
  /** The item's verdict and the report's last recheck, in one transaction. */
  recordVerdict(runId: string, entrySha256: string, verdict: RecheckVerdict, findings: string, at: string): void;
  finishRecheck(runId: string, at: string): void;
  itemsOf(runId: string): RecheckItem[];
  /** Replaces every report row by these (reindex); rechecks recorded before are kept for the rows that remain. */
  replaceReports(rows: readonly { entrySha256: string; entry: ArchiveEntry; archivedAt: string }[]): void;
  close(): void;
}

const SCHEMA = `
CREATE TABLE IF NOT EXISTS reports (
  entry_sha256 TEXT PRIMARY KEY,
  study_id TEXT NOT NULL,
  revision INTEGER NOT NULL,
  title TEXT NOT NULL,
  project TEXT NOT NULL,
  line TEXT,
  engineer TEXT NOT NULL,
  checker TEXT,
  study_date TEXT NOT NULL,
  archived_at TEXT NOT NULL,
  signer_fingerprint TEXT NOT NULL,
  envelope_sha256 TEXT NOT NULL,
  report_sha256 TEXT NOT NULL,
  source_sha256 TEXT NOT NULL,
  kvarbook_version TEXT NOT NULL,
  node_version TEXT NOT NULL,
  supersedes TEXT,
  last_recheck_at TEXT,
  last_verdict TEXT
);
CREATE INDEX IF NOT EXISTS reports_study ON reports (study_id, revision);
CREATE INDEX IF NOT EXISTS reports_date ON reports (study_date);
CREATE TABLE IF NOT EXISTS recheck_runs (
  run_id TEXT PRIMARY KEY,
  selection TEXT NOT NULL,
  started_at TEXT NOT NULL,
  finished_at TEXT
);
CREATE TABLE IF NOT EXISTS recheck_items (
  run_id TEXT NOT NULL REFERENCES recheck_runs (run_id),
  entry_sha256 TEXT NOT NULL,
  state TEXT NOT NULL CHECK (state IN ('pending', 'done')),
  verdict TEXT,
  findings TEXT,
  finished_at TEXT,
  PRIMARY KEY (run_id, entry_sha256)
);
`;

const COLUMNS = `entry_sha256 AS entrySha256, study_id AS studyId, revision, title, project, line, engineer, checker,
  study_date AS studyDate, archived_at AS archivedAt, signer_fingerprint AS signerFingerprint, envelope_sha256 AS envelopeSha256,
  report_sha256 AS reportSha256, source_sha256 AS sourceSha256, kvarbook_version AS kvarbookVersion, node_version AS nodeVersion,
  supersedes, last_recheck_at AS lastRecheckAt, last_verdict AS lastVerdict`;

export const SQLITE_INDEX_FILE = 'index.sqlite';

function open(path: string): Database.Database {
  try {
    const db = new Database(path);
    // WAL lets readers go on while one writer adds; FULL makes each committed add durable, so a row never outlives a crash its objects survived.
    db.pragma('journal_mode = WAL');
    db.pragma('synchronous = FULL');
    db.pragma('busy_timeout = 30000');
    db.exec(SCHEMA);
    return db;
  } catch (error) {
    throw new StudyFailure([
      {
        code: 'archive-index-unreadable',
        message: `the archive index ${path} cannot be opened: ${(error as Error).message}`,
        hint: 'run `kvarbook archive reindex` to rebuild it from the stored files',
      },
    ]);
  }
}

function likePattern(text: string): string {
  return `%${text.replace(/[\\%_]/g, (character) => `\\${character}`)}%`;
}

function insertRow(db: Database.Database, entrySha256: string, entry: ArchiveEntry, archivedAt: string): boolean {
  const sha = (role: 'report' | 'source') => fileOf(entry, role)?.sha256 ?? '';
  const inserted = db
    .prepare(
      `INSERT OR IGNORE INTO reports (entry_sha256, study_id, revision, title, project, line, engineer, checker, study_date, archived_at,
        signer_fingerprint, envelope_sha256, report_sha256, source_sha256, kvarbook_version, node_version)
       VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
    )
    .run(
      entrySha256,
      entry.studyId,
      entry.revision,
      entry.title,
      entry.project,
      entry.line,
      entry.engineer,
      entry.checker,
      entry.studyDate,
      archivedAt,
      entry.signerFingerprint,
      entry.envelopeSha256,
      sha('report'),
      sha('source'),
      entry.kvarbookVersion,
      entry.nodeVersion,
    );
  return inserted.changes > 0;
}

/** Each revision points at the latest entry of the highest lower revision: right whatever order the revisions came in. */
function relink(db: Database.Database, studyId: string): void {
  db.prepare(
    `UPDATE reports SET supersedes = (
       SELECT earlier.entry_sha256 FROM reports AS earlier
       WHERE earlier.study_id = reports.study_id AND earlier.revision < reports.revision
       ORDER BY earlier.revision DESC, earlier.archived_at DESC, earlier.entry_sha256 DESC LIMIT 1)
     WHERE study_id = ?`,
  ).run(studyId);
}

export function openSqliteIndex(archiveFolder: string): ArchiveIndex {
  return sqliteIndexAt(join(archiveFolder, SQLITE_INDEX_FILE));
}

function sqliteIndexAt(path: string): ArchiveIndex {
  const db = open(path);
  const rows = (sql: string, ...parameters: unknown[]) => db.prepare(`SELECT ${COLUMNS} FROM reports ${sql}`).all(...parameters) as IndexedReport[];
  return {
    add(entrySha256, entry, archivedAt) {
      return db
        .transaction(() => {
          const added = insertRow(db, entrySha256, entry, archivedAt);
          if (added) relink(db, entry.studyId);
          return added;
        })
        .immediate();
    },
    get(entrySha256) {
      return rows('WHERE entry_sha256 = ?', entrySha256)[0];
    },
    all() {
      return rows('ORDER BY study_id, revision, archived_at');
    },
    find(query) {
      const where: string[] = [];
      const parameters: string[] = [];
      const like = (column: string, value: string | undefined) => {
        if (value === undefined) return;
        where.push(`${column} LIKE ? ESCAPE '\\'`);
        parameters.push(likePattern(value));
      };
      like('study_id', query.studyId);
      like('title', query.title);
      like('project', query.project);
      like('line', query.line);
      like('engineer', query.engineer);
      like('checker', query.checker);
      like('signer_fingerprint', query.signer);
      like('kvarbook_version', query.kvarbookVersion);
      if (query.verdict !== undefined) {
        where.push('last_verdict = ?');
        parameters.push(query.verdict);
      }
      if (query.from !== undefined) {
        where.push('study_date >= ?');
        parameters.push(query.from);
      }
      if (query.to !== undefined) {
        where.push('study_date <= ?');
        parameters.push(query.to);
      }
      if (query.text !== undefined) {
        for (const word of query.text.split(/\s+/).filter(Boolean)) {
          where.push(`(title LIKE ? ESCAPE '\\' OR project LIKE ? ESCAPE '\\')`);
          parameters.push(likePattern(word), likePattern(word));
        }
      }
      return rows(`${where.length ? `WHERE ${where.join(' AND ')}` : ''} ORDER BY study_id, revision, archived_at`, ...parameters);
    },
    latest(studyId, revision) {
      const found =
        revision === undefined
          ? rows('WHERE study_id = ? ORDER BY revision DESC, archived_at DESC, entry_sha256 DESC LIMIT 1', studyId)
          : rows('WHERE study_id = ? AND revision = ? ORDER BY archived_at DESC, entry_sha256 DESC LIMIT 1', studyId, revision);
      return found[0];
    },
    startRecheck(selection, entries, startedAt) {
      return db
        .transaction((): RecheckRun => {
          const unfinished = db
            .prepare('SELECT run_id AS runId FROM recheck_runs WHERE selection = ? AND finished_at IS NULL ORDER BY started_at DESC LIMIT 1')
            .get(selection) as { runId: string } | undefined;
          if (unfinished) return { runId: unfinished.runId, resumed: true, items: this.itemsOf(unfinished.runId) };
          const runId = `${startedAt.replace(/[^0-9]/g, '').slice(0, 14)}-${Math.random().toString(36).slice(2, 8)}`;
          db.prepare('INSERT INTO recheck_runs (run_id, selection, started_at) VALUES (?, ?, ?)').run(runId, selection, startedAt);
          const insert = db.prepare("INSERT INTO recheck_items (run_id, entry_sha256, state) VALUES (?, ?, 'pending')");
          for (const entry of entries) insert.run(runId, entry);
          return { runId, resumed: false, items: this.itemsOf(runId) };
        })
        .immediate();
    },
    recordVerdict(runId, entrySha256, verdict, findings, at) {
      db.transaction(() => {
        db.prepare("UPDATE recheck_items SET state = 'done', verdict = ?, findings = ?, finished_at = ? WHERE run_id = ? AND entry_sha256 = ?").run(
          verdict,
          findings,
          at,
          runId,
          entrySha256,
        );
        db.prepare('UPDATE reports SET last_recheck_at = ?, last_verdict = ? WHERE entry_sha256 = ?').run(at, verdict, entrySha256);
      }).immediate();
    },
    finishRecheck(runId, at) {
      db.prepare('UPDATE recheck_runs SET finished_at = ? WHERE run_id = ?').run(at, runId);
    },
    itemsOf(runId) {
      return db
        .prepare('SELECT entry_sha256 AS entrySha256, state, verdict, findings FROM recheck_items WHERE run_id = ? ORDER BY rowid')
        .all(runId) as RecheckItem[];
    },
    replaceReports(newRows) {
      db.transaction(() => {
        const kept = new Map(
          (
            db.prepare('SELECT entry_sha256 AS sha, last_recheck_at AS at, last_verdict AS verdict FROM reports').all() as {
              sha: string;
              at: string | null;
              verdict: string | null;
            }[]
          ).map((row) => [row.sha, row]),
        );
        db.prepare('DELETE FROM reports').run();
        const studies = new Set<string>();
        for (const row of newRows) {
          insertRow(db, row.entrySha256, row.entry, row.archivedAt);
          studies.add(row.entry.studyId);
          const earlier = kept.get(row.entrySha256);
          if (earlier?.at)
            db.prepare('UPDATE reports SET last_recheck_at = ?, last_verdict = ? WHERE entry_sha256 = ?').run(
              earlier.at,
              earlier.verdict,
              row.entrySha256,
            );
        }
        for (const studyId of studies) relink(db, studyId);
      }).immediate();
    },
    close() {
      db.close();
    },
  };
}

/** A damaged index file is moved aside (never deleted) so that reindex can start a fresh one. */
export function setAsideIndex(archiveFolder: string, at: string): string | undefined {
  const path = join(archiveFolder, SQLITE_INDEX_FILE);
  const aside = `${path}.damaged-${at.replace(/[^0-9]/g, '')}`;
  try {
    renameSync(path, aside);
  } catch {
    return undefined;
  }
  for (const suffix of ['-wal', '-shm']) rmSync(`${path}${suffix}`, { force: true });
  return aside;
}
