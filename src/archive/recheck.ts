// Re-running archived studies in bulk: the checker's procedure on each, a pool of them at once, each verdict recorded as it comes.
import { checkSealedReport, type CheckOutcome, type RerunRequest, type RunEnvironment } from '../seal/check.ts';
import type { CheckStep } from '../seal/checkRecord.ts';
import { sha256Hex } from '../seal/digest.ts';
import type { PublicIdentity } from '../seal/keys.ts';
import type { RunProduct } from '../pipeline.ts';
import type { Archive } from './archive.ts';
import type { IndexedReport, RecheckVerdict } from './archiveIndex.ts';
import { fileOf, parseEntry } from './entry.ts';

/** Which reports to recheck: every one, those with a study date from `since` on, or those of the named studies. */
export interface RecheckSelection {
  all?: boolean;
  since?: string;
  ids?: string[];
}

export interface MovedFigure {
  study: string;
  revision: number;
  name: string;
  sealed: number | string | boolean;
  rerun: number | string | boolean;
  unit?: string;
  /** (new − sealed) / |sealed|; null for text and flags, and for a sealed 0. */
  relativeChange: number | null;
}

export interface StudyRecheck {
  entrySha256: string;
  study: string;
  revision: number;
  verdict: RecheckVerdict;
  steps: CheckStep[];
  moved: MovedFigure[];
}

export interface RecheckSummary {
  runId: string;
  resumed: boolean;
  /** How many were done before this call took the recheck up again. */
  doneBefore: number;
  total: number;
  counts: Record<RecheckVerdict, number>;
  studies: StudyRecheck[];
  /** Every moved figure of the recheck, for the JSON report. */
  moved: MovedFigure[];
  /** True when the recheck stopped (on a signal) before every study was re-run; run it again to resume. */
  interrupted: boolean;
}

export interface RecheckOptions {
  selection: RecheckSelection;
  /** How many studies run at once, each in its own sandboxed calculation process. */
  concurrency: number;
  trusted: readonly PublicIdentity[];
  defaultRelativeTolerance: number;
  /** This machine's kvarbook, Node.js and lock file. */
  environment: RunEnvironment;
  /** The re-run of one study, as `kvarbook check` makes it; injected so that this stage starts no processes of its own. */
  rerun: (request: RerunRequest) => Promise<RunProduct>;
  /** The clock, read at the edge. */
  now: () => string;
  onProgress?: (done: number, total: number) => void;
  /** Stops taking new studies; those running finish and are recorded. */
  signal?: AbortSignal;
}

export function selectReports(rows: readonly IndexedReport[], selection: RecheckSelection): IndexedReport[] {
  if (selection.ids?.length) return rows.filter((row) => selection.ids!.includes(row.studyId));
  if (selection.since !== undefined) return rows.filter((row) => row.studyDate >= selection.since!);
  return [...rows];
}

const SIGNATURE_STEPS = new Set(['seal', 'signature', 'report unchanged', 'study source', 'engineer', 'counter-signatures']);

export function verdictOf(outcome: CheckOutcome): RecheckVerdict {
  if (outcome.verdict === 'verified') return 'reproduced';
  if (outcome.steps.some((step) => !step.passed && SIGNATURE_STEPS.has(step.name) && !(step.name === 'engineer' && outcome.rerun === null)))
    return 'signature-problem';
  if (outcome.rerun === null) return 'failed-to-run';
  return 'moved';
}

function movedFigures(report: IndexedReport, outcome: CheckOutcome): MovedFigure[] {
  return (outcome.comparison?.mismatches ?? []).map((mismatch) => ({
    study: report.studyId,
    revision: report.revision,
    name: mismatch.name,
    sealed: mismatch.sealed,
    rerun: mismatch.rerun,
    ...(mismatch.sealedUnit ? { unit: mismatch.sealedUnit } : {}),
    relativeChange:
      typeof mismatch.sealed === 'number' && typeof mismatch.rerun === 'number' && mismatch.sealed !== 0 && Number.isFinite(mismatch.rerun)
        ? (mismatch.rerun - mismatch.sealed) / Math.abs(mismatch.sealed)
        : null,
  }));
}

async function recheckOne(archive: Archive, report: IndexedReport, options: RecheckOptions): Promise<StudyRecheck> {
  const base = { entrySha256: report.entrySha256, study: report.studyId, revision: report.revision };
  const entryBytes = archive.store.read(report.entrySha256);
  const entry = entryBytes && sha256Hex(entryBytes) === report.entrySha256 ? parseEntry(entryBytes) : undefined;
  const intact = (role: 'report' | 'source') => {
    const file = entry && fileOf(entry, role);
    const bytes = file && archive.store.read(file.sha256);
    return bytes && sha256Hex(bytes) === file.sha256 ? bytes.toString('utf8') : undefined;
  };
  const html = intact('report');
  const source = intact('source');
  if (html === undefined || source === undefined) {
    const detail = 'the stored report or its source is missing or changed; run kvarbook archive verify';
    return { ...base, verdict: 'signature-problem', steps: [{ name: 'report unchanged', passed: false, detail }], moved: [] };
  }
  const outcome = await checkSealedReport({
    html,
    source,
    sourceOrigin: 'kept in the archive',
    trusted: options.trusted,
    defaultRelativeTolerance: options.defaultRelativeTolerance,
    environment: options.environment,
    rerun: options.rerun,
  });
  return { ...base, verdict: verdictOf(outcome), steps: outcome.steps, moved: movedFigures(report, outcome) };
}

/** Runs `work` on each item with at most `concurrency` at once, in order of the items; stops taking new ones on `signal`. */
async function eachInPool<T>(items: readonly T[], concurrency: number, work: (item: T) => Promise<void>, signal?: AbortSignal): Promise<void> {
  let next = 0;
  const lane = async () => {
    while (next < items.length && !signal?.aborted) {
      const item = items[next]!;
      next += 1;
      await work(item);
    }
  };
  await Promise.all(Array.from({ length: Math.max(1, Math.min(concurrency, items.length)) }, lane));
}

/** The key a recheck's selection is known by, so that the same recheck run again resumes the unfinished one. */
function selectionKey(selection: RecheckSelection): string {
  return JSON.stringify({ all: selection.all ?? false, since: selection.since ?? null, ids: [...(selection.ids ?? [])].sort() });
}

/** Starts (or takes up) a recheck of the selected reports; the pending ones are the work left. */
export async function startRecheck(
  archive: Archive,
  selection: RecheckSelection,
  now: () => string,
): Promise<{ runId: string; resumed: boolean; total: number; pending: IndexedReport[] }> {
  const selected = selectReports(await archive.index.all(), selection);
  const run = await archive.index.startRecheck(
    selectionKey(selection),
    selected.map((row) => row.entrySha256),
    now(),
  );
  const byEntry = new Map(selected.map((row) => [row.entrySha256, row]));
  const pending: IndexedReport[] = [];
  for (const item of run.items.filter((candidate) => candidate.state === 'pending')) {
    const row = byEntry.get(item.entrySha256) ?? (await archive.index.get(item.entrySha256));
    if (row) pending.push(row);
  }
  return { runId: run.runId, resumed: run.resumed, total: run.items.length, pending };
}

/** Rechecks one report of a recheck and records its verdict; false when another worker had recorded it first. */
export async function recheckAndRecord(archive: Archive, runId: string, row: IndexedReport, options: RecheckOptions): Promise<boolean> {
  const result = await recheckOne(archive, row, options);
  return archive.index.recordVerdict(runId, row.entrySha256, result.verdict, JSON.stringify(result), options.now());
}

/** What a recheck found so far, from its rows in the index; a recheck with nothing pending is marked finished. */
export async function recheckSummary(
  archive: Archive,
  runId: string,
  context: { resumed: boolean; doneBefore: number; now: () => string },
): Promise<RecheckSummary> {
  const items = await archive.index.itemsOf(runId);
  const interrupted = items.some((item) => item.state === 'pending');
  if (!interrupted) await archive.index.finishRecheck(runId, context.now());
  const studies = items.filter((item) => item.findings !== null).map((item) => JSON.parse(item.findings!) as StudyRecheck);
  const counts: Record<RecheckVerdict, number> = { reproduced: 0, moved: 0, 'failed-to-run': 0, 'signature-problem': 0 };
  for (const study of studies) counts[study.verdict] += 1;
  return {
    runId,
    resumed: context.resumed,
    doneBefore: context.doneBefore,
    total: items.length,
    counts,
    studies,
    moved: studies.flatMap((study) => study.moved),
    interrupted,
  };
}

/**
 * Rechecks the selected reports on this machine. The recheck and each study's state are rows of the index: a verdict
 * is recorded as soon as its study is done, so a recheck that was interrupted (or killed) and is run again with the
 * same selection takes up the studies still pending and re-runs none twice.
 */
export async function recheckArchive(archive: Archive, options: RecheckOptions): Promise<RecheckSummary> {
  const run = await startRecheck(archive, options.selection, options.now);
  let done = run.total - run.pending.length;
  const doneBefore = done;
  options.onProgress?.(done, run.total);
  await eachInPool(
    run.pending,
    options.concurrency,
    async (row) => {
      await recheckAndRecord(archive, run.runId, row, options);
      done += 1;
      options.onProgress?.(done, run.total);
    },
    options.signal,
  );
  return recheckSummary(archive, run.runId, { resumed: run.resumed, doneBefore, now: options.now });
}
