// A recheck spread over many machines: one job per study in a PostgreSQL job queue (pg-boss), taken by any number of workers.
import PgBoss from 'pg-boss';
import type { Archive } from './archive.ts';
import { recheckAndRecord, startRecheck, type RecheckOptions, type RecheckSelection } from './recheck.ts';

export const RECHECK_QUEUE = 'kvarbook-recheck';

export interface RecheckJob {
  runId: string;
  entrySha256: string;
}

export interface QueueTiming {
  /** A job still running this long is taken to be lost with its worker and is given to another. */
  jobSeconds: number;
  /** How often a worker looks for lost jobs. */
  sweepSeconds: number;
}

async function startBoss(url: string, timing: QueueTiming): Promise<PgBoss> {
  const boss = new PgBoss({ connectionString: url, maintenanceIntervalSeconds: timing.sweepSeconds, max: 4 });
  boss.on('error', () => {
    // A failed maintenance round is tried again at the next; a worker must not stop for it.
  });
  await boss.start();
  await boss.createQueue(RECHECK_QUEUE);
  return boss;
}

/** Starts (or takes up) a recheck and puts each pending study on the queue; workers do the rest. */
export async function enqueueRecheck(
  archive: Archive,
  url: string,
  selection: RecheckSelection,
  now: () => string,
  timing: QueueTiming,
): Promise<{ runId: string; resumed: boolean; total: number; enqueued: number }> {
  const run = await startRecheck(archive, selection, now);
  const boss = await startBoss(url, timing);
  try {
    for (const row of run.pending) {
      const job: RecheckJob = { runId: run.runId, entrySha256: row.entrySha256 };
      await boss.send(RECHECK_QUEUE, job, { retryLimit: 5, retryDelay: 0, expireInSeconds: timing.jobSeconds });
    }
  } finally {
    await boss.stop({ graceful: true, wait: true });
  }
  return { runId: run.runId, resumed: run.resumed, total: run.total, enqueued: run.pending.length };
}

export interface Worker {
  /** Finishes the job in hand, then stops. */
  stop(): Promise<void>;
}

/**
 * Takes recheck jobs one at a time: re-runs the study in its sandbox and records the verdict. A job whose study is
 * already done (a job given out again after its worker seemed lost, but finished after all) is acknowledged and skipped.
 */
export async function startWorker(
  archive: Archive,
  url: string,
  options: Omit<RecheckOptions, 'selection' | 'concurrency' | 'signal' | 'onProgress'>,
  timing: QueueTiming,
  onJob: (job: RecheckJob, state: 'taken' | 'recorded' | 'skipped') => void,
): Promise<Worker> {
  const boss = await startBoss(url, timing);
  await boss.work<RecheckJob>(RECHECK_QUEUE, { batchSize: 1, pollingIntervalSeconds: 0.5 }, async ([job]) => {
    if (!job) return;
    const { runId, entrySha256 } = job.data;
    const item = await archive.index.itemOf(runId, entrySha256);
    const row = await archive.index.get(entrySha256);
    if (!item || item.state === 'done' || !row) {
      onJob(job.data, 'skipped');
      return;
    }
    onJob(job.data, 'taken');
    const recorded = await recheckAndRecord(archive, runId, row, { ...options, selection: {}, concurrency: 1 });
    onJob(job.data, recorded ? 'recorded' : 'skipped');
    // The worker that records the last verdict marks the recheck finished.
    if (recorded && (await archive.index.pendingCount(runId)) === 0) await archive.index.finishRecheck(runId, options.now());
  });
  return {
    stop: () => boss.stop({ graceful: true, wait: true }),
  };
}
