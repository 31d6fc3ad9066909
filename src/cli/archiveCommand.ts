// `kvarbook archive …`: the utility's archive of sealed reports from the command line (reading reports, printing, the clock).
import { availableParallelism } from 'node:os';
import { existsSync, mkdirSync, readFileSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { writeAtomically } from '../bundleRecord.ts';
import { StudyFailure } from '../diagnostics/diagnostic.ts';
import { addReport, exportReport, findReport, reindexArchive, verifyArchive, type Archive, type ReportInHand } from '../archive/archive.ts';
import type { FindQuery, IndexedReport } from '../archive/archiveIndex.ts';
import { openSqliteIndex } from '../archive/sqliteIndex.ts';
import { enqueueRecheck, startWorker, type QueueTiming } from '../archive/queue.ts';
import { recheckArchive, type RecheckSelection, type RecheckSummary } from '../archive/recheck.ts';
import { openObjectStore } from '../archive/store.ts';
import { loadTrustedIdentities } from '../seal/trust.ts';
import type { RunLimits } from '../study/model.ts';
import { rerunFrom } from './checkCommand.ts';
import { readReport } from './readReport.ts';
import { installationFacts } from './environment.ts';
import type { Terminal } from './terminal.ts';

export interface ArchiveOptions {
  archive: string;
  /** postgres://… to keep the index in PostgreSQL; the SQLite file in the archive folder when absent. */
  index?: string;
  json?: boolean;
}

/** Opens (creating on first use) the archive folder, its store and its index; the caller closes the index. */
export async function openArchive(folder: string, indexUrl?: string): Promise<Archive> {
  mkdirSync(folder, { recursive: true, mode: 0o700 });
  if (indexUrl === undefined) return { folder, store: openObjectStore(folder), index: openSqliteIndex(folder) };
  const { openPostgresIndex } = await import('../archive/postgresIndex.ts');
  return { folder, store: openObjectStore(folder), index: await openPostgresIndex(indexUrl) };
}

async function withArchive<T>(options: ArchiveOptions, work: (archive: Archive) => Promise<T> | T): Promise<T> {
  const archive = await openArchive(options.archive, options.index);
  try {
    return await work(archive);
  } finally {
    await archive.index.close();
  }
}

const now = () => new Date().toISOString();

/** The stem a report's siblings share: `build/X-r1` for `build/X-r1.html`, `.pdf` or `.checked.html`. */
function stemOf(path: string): string {
  return join(dirname(path), basename(path).replace(/(\.checked)?\.(html|pdf)$/i, ''));
}

/** The report named and the files beside it from the same run: the PDF (only when it carries this very report), results, seal, check record. */
async function reportInHand(path: string): Promise<ReportInHand> {
  const { html, pdf } = await readReport(path);
  const stem = stemOf(path);
  const htmlName = pdf ? `${basename(stem)}.html` : basename(path);
  let printed: ReportInHand['pdf'];
  if (pdf) printed = { name: basename(path), bytes: pdf.bytes, html: pdf.html };
  else if (existsSync(`${stem}.pdf`)) {
    const sibling = await readReport(`${stem}.pdf`);
    if (sibling.pdf && sibling.html === html) printed = { name: basename(`${stem}.pdf`), bytes: sibling.pdf.bytes, html: sibling.html };
  }
  const siblings: ReportInHand['siblings'] = [];
  for (const [role, suffix] of [
    ['results', '.results.json'],
    ['seal', '.seal.json'],
    ['check', '.check.json'],
  ] as const) {
    const file = `${stem}${suffix}`;
    if (existsSync(file)) siblings.push({ role, name: basename(file), bytes: readFileSync(file) });
  }
  return { path, html, htmlName, ...(printed ? { pdf: printed } : {}), siblings };
}

function reportLine(row: IndexedReport): string {
  const verdict = row.lastVerdict ? `  last recheck ${row.lastRecheckAt?.slice(0, 10)}: ${row.lastVerdict}` : '';
  return `${row.studyId}  r${row.revision}  ${row.studyDate}  ${row.title}  (${row.project}${row.line ? `; ${row.line}` : ''})${verdict}`;
}

function printRows(rows: IndexedReport[], options: ArchiveOptions, terminal: Terminal): void {
  if (options.json) process.stdout.write(`${JSON.stringify(rows, null, 2)}\n`);
  else if (rows.length === 0) terminal.say('no archived report matches');
  else for (const row of rows) terminal.say(reportLine(row));
}

export async function archiveAddCommand(paths: string[], options: ArchiveOptions & { trust: string }, terminal: Terminal): Promise<number> {
  const trusted = loadTrustedIdentities(options.trust).identities;
  const failures: StudyFailure[] = [];
  await withArchive(options, async (archive) => {
    for (const path of paths) {
      try {
        const outcome = await addReport(archive, await reportInHand(path), trusted, now());
        terminal.say(`${outcome.added ? 'archived' : 'already archived'}: ${reportLine(outcome.report)}`);
      } catch (error) {
        if (!(error instanceof StudyFailure)) throw error;
        failures.push(error);
      }
    }
  });
  if (failures.length > 0) throw new StudyFailure(failures.flatMap((failure) => failure.diagnostics));
  return 0;
}

export async function archiveListCommand(options: ArchiveOptions, terminal: Terminal): Promise<number> {
  await withArchive(options, async (archive) => printRows(await archive.index.all(), options, terminal));
  return 0;
}

export async function archiveFindCommand(query: FindQuery, options: ArchiveOptions, terminal: Terminal): Promise<number> {
  const rows = await withArchive(options, (archive) => archive.index.find(query));
  printRows(rows, options, terminal);
  return rows.length > 0 ? 0 : 1;
}

export async function archiveShowCommand(id: string, options: ArchiveOptions & { revision?: number }, terminal: Terminal): Promise<number> {
  await withArchive(options, async (archive) => {
    const { report, entry } = await findReport(archive, id, options.revision);
    if (options.json) {
      process.stdout.write(`${JSON.stringify({ ...report, files: entry.files }, null, 2)}\n`);
      return;
    }
    terminal.say(reportLine(report));
    terminal.say(`  engineer ${report.engineer}${report.checker ? `; checker ${report.checker}` : ''}; signing key ${report.signerFingerprint}`);
    terminal.say(`  sealed with kvarbook ${report.kvarbookVersion} on Node.js ${report.nodeVersion}; archived ${report.archivedAt}`);
    if (report.supersedes) {
      const earlier = await archive.index.get(report.supersedes);
      terminal.say(`  supersedes revision ${earlier?.revision ?? '?'} (${report.supersedes.slice(0, 16)})`);
    }
    for (const file of entry.files) terminal.say(`  ${file.role.padEnd(8)} ${file.name}  ${file.bytes} bytes  sha256 ${file.sha256}`);
  });
  return 0;
}

export async function archiveExportCommand(
  id: string,
  folder: string,
  options: ArchiveOptions & { revision?: number },
  terminal: Terminal,
): Promise<number> {
  await withArchive(options, async (archive) => {
    const { entry } = await findReport(archive, id, options.revision);
    for (const path of exportReport(archive, entry, folder)) terminal.say(`exported ${path}`);
  });
  return 0;
}

export async function archiveVerifyCommand(options: ArchiveOptions & { trust: string }, terminal: Terminal): Promise<number> {
  const trusted = loadTrustedIdentities(options.trust).identities;
  const outcome = await withArchive(options, (archive) => verifyArchive(archive, trusted));
  if (options.json) process.stdout.write(`${JSON.stringify(outcome, null, 2)}\n`);
  else {
    for (const problem of outcome.problems) terminal.say(`${problem.studyId} r${problem.revision}: ${problem.file}: ${problem.problem}`);
    terminal.say(
      `${outcome.problems.length === 0 ? 'archive intact' : `ARCHIVE DAMAGED: ${outcome.problems.length} problems`}: ${outcome.reports} reports, ${outcome.files} files checked against their SHA-256 and signatures${outcome.orphans ? `; ${outcome.orphans} stored objects belong to no report (left by an interrupted add; harmless)` : ''}`,
    );
  }
  return outcome.problems.length === 0 ? 0 : 1;
}

export async function archiveReindexCommand(options: ArchiveOptions, terminal: Terminal): Promise<number> {
  const outcome = await withArchive(options, (archive) => reindexArchive(archive));
  for (const skipped of outcome.skipped) terminal.say(`not indexed: ${skipped}`);
  terminal.say(`index rebuilt from the stored files: ${outcome.reports} reports`);
  return 0;
}

export interface QueueOptions {
  /** postgres://… of the job queue: the recheck is spread over `archive worker` processes. */
  queue?: string;
  jobSeconds?: number;
}

function queueTiming(options: QueueOptions): QueueTiming {
  const jobSeconds = options.jobSeconds ?? 1800;
  return { jobSeconds, sweepSeconds: Math.max(1, Math.min(60, Math.floor(jobSeconds / 2))) };
}

export interface RecheckCommandOptions extends ArchiveOptions, QueueOptions {
  all?: boolean;
  since?: string;
  trust: string;
  tolerance: number;
  jobs?: number;
  report?: string;
  ceilings?: RunLimits;
}

function summaryLines(summary: RecheckSummary): string[] {
  const { counts } = summary;
  const lines = [
    `recheck ${summary.runId}${summary.resumed ? ` (resumed; ${summary.doneBefore} of ${summary.total} were done before)` : ''}: ${summary.total} studies`,
    `  reproduced ${counts.reproduced}, figures moved ${counts.moved}, failed to run ${counts['failed-to-run']}, signature problems ${counts['signature-problem']}`,
  ];
  for (const figure of summary.moved)
    lines.push(
      `  ${figure.study} r${figure.revision}: ${figure.name}: sealed ${String(figure.sealed)}${figure.unit ? ` ${figure.unit}` : ''}, now ${String(figure.rerun)}${figure.relativeChange === null ? '' : ` (${(figure.relativeChange * 100).toPrecision(3)} %)`}`,
    );
  for (const study of summary.studies.filter((item) => item.verdict === 'failed-to-run' || item.verdict === 'signature-problem'))
    lines.push(
      `  ${study.study} r${study.revision}: ${study.verdict}: ${study.steps
        .filter((step) => !step.passed)
        .map((step) => `${step.name}: ${step.detail}`)
        .join('; ')}`,
    );
  if (summary.interrupted) lines.push('  interrupted: run the same recheck again to take it up where it stopped');
  return lines;
}

export async function archiveRecheckCommand(ids: string[], options: RecheckCommandOptions, terminal: Terminal): Promise<number> {
  const selection: RecheckSelection = ids.length > 0 ? { ids } : options.since ? { since: options.since } : { all: true };
  if (options.queue) {
    const queue = options.queue;
    const queued = await withArchive(options, (archive) => enqueueRecheck(archive, queue, selection, now, queueTiming(options)));
    terminal.say(
      `recheck ${queued.runId}${queued.resumed ? ' (resumed)' : ''}: ${queued.enqueued} of ${queued.total} studies put on the queue; workers record each verdict in the index`,
    );
    return 0;
  }
  const trusted = loadTrustedIdentities(options.trust).identities;
  // Ctrl-C stops taking new studies; those running finish and are recorded, so the next recheck resumes.
  const stop = new AbortController();
  const onSignal = () => stop.abort();
  process.once('SIGINT', onSignal);
  try {
    const summary = await withArchive(options, (archive) =>
      recheckArchive(archive, {
        selection,
        concurrency: options.jobs ?? availableParallelism(),
        trusted,
        defaultRelativeTolerance: options.tolerance,
        environment: installationFacts(),
        rerun: rerunFrom(undefined, options.ceilings),
        now,
        onProgress: (done, total) => terminal.progress(progressBar(done, total)),
        signal: stop.signal,
      }),
    );
    terminal.progressDone();
    const reportPath = options.report ?? join(options.archive, 'rechecks', `${summary.runId}.json`);
    writeAtomically(reportPath, `${JSON.stringify(jsonReport(summary), null, 2)}\n`);
    if (options.json) process.stdout.write(`${JSON.stringify(jsonReport(summary), null, 2)}\n`);
    else {
      for (const line of summaryLines(summary)) terminal.say(line);
      terminal.say(`report: ${reportPath}`);
    }
    const clean = summary.counts.reproduced === summary.total;
    return clean ? 0 : 1;
  } finally {
    process.off('SIGINT', onSignal);
  }
}

function jsonReport(summary: RecheckSummary) {
  return {
    recheck: summary.runId,
    resumed: summary.resumed,
    interrupted: summary.interrupted,
    total: summary.total,
    reproduced: summary.counts.reproduced,
    figuresMoved: summary.counts.moved,
    failedToRun: summary.counts['failed-to-run'],
    signatureProblems: summary.counts['signature-problem'],
    moved: summary.moved,
    studies: summary.studies.map(({ study, revision, verdict, entrySha256 }) => ({ study, revision, verdict, entry: entrySha256 })),
  };
}

function progressBar(done: number, total: number): string {
  const width = 30;
  const filled = total === 0 ? width : Math.round((done / total) * width);
  return `recheck [${'#'.repeat(filled)}${'.'.repeat(width - filled)}] ${done}/${total}`;
}

export interface WorkerCommandOptions extends ArchiveOptions, QueueOptions {
  trust: string;
  tolerance: number;
  ceilings?: RunLimits;
}

/** `archive worker`: takes recheck jobs until stopped (SIGTERM or Ctrl-C finish the job in hand first). */
export async function archiveWorkerCommand(options: WorkerCommandOptions, terminal: Terminal): Promise<number> {
  const queue = options.queue as string;
  const archive = await openArchive(options.archive, options.index);
  const worker = await startWorker(
    archive,
    queue,
    {
      trusted: loadTrustedIdentities(options.trust).identities,
      defaultRelativeTolerance: options.tolerance,
      environment: installationFacts(),
      rerun: rerunFrom(undefined, options.ceilings),
      now,
    },
    queueTiming(options),
    (job, state) => terminal.say(`${state} ${job.runId} ${job.entrySha256}`),
  );
  terminal.say('worker ready');
  await new Promise<void>((resolve) => {
    process.once('SIGTERM', resolve);
    process.once('SIGINT', resolve);
  });
  await worker.stop();
  await archive.index.close();
  return 0;
}
