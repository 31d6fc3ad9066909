// The archive's index: one row per archived report, and each recheck with its verdicts; the same SQL over SQLite or PostgreSQL.
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
  add(entrySha256: string, entry: ArchiveEntry, archivedAt: string): Promise<boolean>;
  get(entrySha256: string): Promise<IndexedReport | undefined>;
  all(): Promise<IndexedReport[]>;
  find(query: FindQuery): Promise<IndexedReport[]>;
  /** The latest archived report of a study (of one revision, when given). */
  latest(studyId: string, revision?: number): Promise<IndexedReport | undefined>;
  /** Starts a recheck of these entries, or takes up the unfinished one with the same selection. */
  startRecheck(selection: string, entries: readonly string[], startedAt: string): Promise<RecheckRun>;
  /** The item's verdict and the report's last recheck, in one transaction; false (and nothing written) when the item was done already. */
  recordVerdict(runId: string, entrySha256: string, verdict: RecheckVerdict, findings: string, at: string): Promise<boolean>;
  finishRecheck(runId: string, at: string): Promise<void>;
  itemsOf(runId: string): Promise<RecheckItem[]>;
  /** One study's state in a recheck, without reading the rest; undefined when it is not part of it. */
  itemOf(runId: string, entrySha256: string): Promise<RecheckItem | undefined>;
  /** How many studies of a recheck are still pending. */
  pendingCount(runId: string): Promise<number>;
  /** Replaces every report row by these (reindex); rechecks recorded before are kept for the rows that remain. */
  replaceReports(rows: readonly { entrySha256: string; entry: ArchiveEntry; archivedAt: string }[]): Promise<void>;
  close(): Promise<void>;
}

/** What the index needs of a database: the one place SQLite and PostgreSQL differ. */
export interface SqlConnection {
  /** Rows of a query; `?` marks each parameter. */
  all<T>(sql: string, parameters?: readonly unknown[]): Promise<T[]>;
  /** How many rows a statement changed. */
  run(sql: string, parameters?: readonly unknown[]): Promise<number>;
  /** One transaction that takes the write lock at its start, so two writers never both read and then write. */
  transaction<T>(work: () => Promise<T>): Promise<T>;
  /** `LIKE` that ignores case, as SQLite's does. */
  like: 'LIKE' | 'ILIKE';
  close(): Promise<void>;
}

export const SCHEMA = [
  `CREATE TABLE IF NOT EXISTS reports (
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
)`,
  'CREATE INDEX IF NOT EXISTS reports_study ON reports (study_id, revision)',
  'CREATE INDEX IF NOT EXISTS reports_date ON reports (study_date)',
  `CREATE TABLE IF NOT EXISTS recheck_runs (
  run_id TEXT PRIMARY KEY,
  selection TEXT NOT NULL,
  started_at TEXT NOT NULL,
  finished_at TEXT
)`,
  `CREATE TABLE IF NOT EXISTS recheck_items (
  run_id TEXT NOT NULL REFERENCES recheck_runs (run_id),
  entry_sha256 TEXT NOT NULL,
  position INTEGER NOT NULL,
  state TEXT NOT NULL CHECK (state IN ('pending', 'done')),
  verdict TEXT,
  findings TEXT,
  finished_at TEXT,
  PRIMARY KEY (run_id, entry_sha256)
)`,
];

const COLUMNS = `entry_sha256 AS "entrySha256", study_id AS "studyId", revision, title, project, line, engineer, checker,
  study_date AS "studyDate", archived_at AS "archivedAt", signer_fingerprint AS "signerFingerprint", envelope_sha256 AS "envelopeSha256",
  report_sha256 AS "reportSha256", source_sha256 AS "sourceSha256", kvarbook_version AS "kvarbookVersion", node_version AS "nodeVersion",
  supersedes, last_recheck_at AS "lastRecheckAt", last_verdict AS "lastVerdict"`;

function likePattern(text: string): string {
  return `%${text.replace(/[\\%_]/g, (character) => `\\${character}`)}%`;
}

async function insertRow(db: SqlConnection, entrySha256: string, entry: ArchiveEntry, archivedAt: string): Promise<boolean> {
  const sha = (role: 'report' | 'source') => fileOf(entry, role)?.sha256 ?? '';
  const changed = await db.run(
    `INSERT INTO reports (entry_sha256, study_id, revision, title, project, line, engineer, checker, study_date, archived_at,
      signer_fingerprint, envelope_sha256, report_sha256, source_sha256, kvarbook_version, node_version)
     VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?) ON CONFLICT DO NOTHING`,
    [
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
    ],
  );
  return changed > 0;
}

/** Each revision points at the latest entry of the highest lower revision: right whatever order the revisions came in. */
async function relink(db: SqlConnection, studyId: string): Promise<void> {
  await db.run(
    `UPDATE reports SET supersedes = (
       SELECT earlier.entry_sha256 FROM reports AS earlier
       WHERE earlier.study_id = reports.study_id AND earlier.revision < reports.revision
       ORDER BY earlier.revision DESC, earlier.archived_at DESC, earlier.entry_sha256 DESC LIMIT 1)
     WHERE study_id = ?`,
    [studyId],
  );
}

/** The index over a connection whose schema is in place. */
export function archiveIndexOver(db: SqlConnection): ArchiveIndex {
  const rows = (sql: string, parameters: readonly unknown[] = []) =>
    db
      .all<IndexedReport>(`SELECT ${COLUMNS} FROM reports ${sql}`, parameters)
      .then((found) => found.map((row) => ({ ...row, revision: Number(row.revision) })));
  const itemsOf = (runId: string) =>
    db.all<RecheckItem>('SELECT entry_sha256 AS "entrySha256", state, verdict, findings FROM recheck_items WHERE run_id = ? ORDER BY position', [
      runId,
    ]);
  return {
    add(entrySha256, entry, archivedAt) {
      return db.transaction(async () => {
        const added = await insertRow(db, entrySha256, entry, archivedAt);
        if (added) await relink(db, entry.studyId);
        return added;
      });
    },
    async get(entrySha256) {
      return (await rows('WHERE entry_sha256 = ?', [entrySha256]))[0];
    },
    all() {
      return rows('ORDER BY study_id, revision, archived_at');
    },
    find(query) {
      const where: string[] = [];
      const parameters: string[] = [];
      const like = (column: string, value: string | undefined) => {
        if (value === undefined) return;
        where.push(`${column} ${db.like} ? ESCAPE '\\'`);
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
      for (const word of (query.text ?? '').split(/\s+/).filter(Boolean)) {
        where.push(`(title ${db.like} ? ESCAPE '\\' OR project ${db.like} ? ESCAPE '\\')`);
        parameters.push(likePattern(word), likePattern(word));
      }
      return rows(`${where.length ? `WHERE ${where.join(' AND ')}` : ''} ORDER BY study_id, revision, archived_at`, parameters);
    },
    async latest(studyId, revision) {
      const found =
        revision === undefined
          ? await rows('WHERE study_id = ? ORDER BY revision DESC, archived_at DESC, entry_sha256 DESC LIMIT 1', [studyId])
          : await rows('WHERE study_id = ? AND revision = ? ORDER BY archived_at DESC, entry_sha256 DESC LIMIT 1', [studyId, revision]);
      return found[0];
    },
    startRecheck(selection, entries, startedAt) {
      return db.transaction(async (): Promise<RecheckRun> => {
        const [unfinished] = await db.all<{ runId: string }>(
          'SELECT run_id AS "runId" FROM recheck_runs WHERE selection = ? AND finished_at IS NULL ORDER BY started_at DESC LIMIT 1',
          [selection],
        );
        if (unfinished) return { runId: unfinished.runId, resumed: true, items: await itemsOf(unfinished.runId) };
        const runId = `${startedAt.replace(/[^0-9]/g, '').slice(0, 14)}-${Math.random().toString(36).slice(2, 8)}`;
        await db.run('INSERT INTO recheck_runs (run_id, selection, started_at) VALUES (?, ?, ?)', [runId, selection, startedAt]);
        for (const [position, entry] of entries.entries())
          await db.run("INSERT INTO recheck_items (run_id, entry_sha256, position, state) VALUES (?, ?, ?, 'pending')", [runId, entry, position]);
        return { runId, resumed: false, items: await itemsOf(runId) };
      });
    },
    recordVerdict(runId, entrySha256, verdict, findings, at) {
      return db.transaction(async () => {
        const changed = await db.run(
          "UPDATE recheck_items SET state = 'done', verdict = ?, findings = ?, finished_at = ? WHERE run_id = ? AND entry_sha256 = ? AND state = 'pending'",
          [verdict, findings, at, runId, entrySha256],
        );
        if (changed === 0) return false;
        await db.run('UPDATE reports SET last_recheck_at = ?, last_verdict = ? WHERE entry_sha256 = ?', [at, verdict, entrySha256]);
        return true;
      });
    },
    async finishRecheck(runId, at) {
      await db.run('UPDATE recheck_runs SET finished_at = ? WHERE run_id = ?', [at, runId]);
    },
    itemsOf,
    async itemOf(runId, entrySha256) {
      const [item] = await db.all<RecheckItem>(
        'SELECT entry_sha256 AS "entrySha256", state, verdict, findings FROM recheck_items WHERE run_id = ? AND entry_sha256 = ?',
        [runId, entrySha256],
      );
      return item;
    },
    async pendingCount(runId) {
      const [row] = await db.all<{ count: number | string }>("SELECT COUNT(*) AS count FROM recheck_items WHERE run_id = ? AND state = 'pending'", [
        runId,
      ]);
      return Number(row?.count ?? 0);
    },
    replaceReports(newRows) {
      return db.transaction(async () => {
        const kept = new Map(
          (
            await db.all<{ sha: string; at: string | null; verdict: string | null }>(
              'SELECT entry_sha256 AS sha, last_recheck_at AS at, last_verdict AS verdict FROM reports',
            )
          ).map((row) => [row.sha, row]),
        );
        await db.run('DELETE FROM reports');
        const studies = new Set<string>();
        for (const row of newRows) {
          await insertRow(db, row.entrySha256, row.entry, row.archivedAt);
          studies.add(row.entry.studyId);
          const earlier = kept.get(row.entrySha256);
          if (earlier?.at)
            await db.run('UPDATE reports SET last_recheck_at = ?, last_verdict = ? WHERE entry_sha256 = ?', [
              earlier.at,
              earlier.verdict,
              row.entrySha256,
            ]);
        }
        for (const studyId of studies) await relink(db, studyId);
      });
    },
    close() {
      return db.close();
    },
  };
}
