// Host-side work on study data (drawing charts, the type check) in a worker thread that a heap limit and a deadline bound.
import { Worker } from 'node:worker_threads';
import { RUNS_FROM_SOURCE, partModule } from '../installation.ts';

export interface WorkerLimits {
  /** Old-generation heap of the worker; the worker ends when it needs more. */
  heapMb: number;
  /** Wall time of one call; the worker is terminated when a call takes longer. */
  callSeconds: number;
}

/** A call that did not finish: it ran past its time, ran out of memory, or the worker ended. */
export class WorkerLimitError extends Error {
  readonly reason: 'time' | 'memory' | 'ended';
  constructor(reason: 'time' | 'memory' | 'ended', message: string) {
    super(message);
    this.name = 'WorkerLimitError';
    this.reason = reason;
  }
}

/** An error the called function threw, as plain data (name, message and its own text and number fields). */
export type PlainError = { name: string; message: string } & Record<string, string | number>;

export class WorkerCallError extends Error {
  readonly thrown: PlainError;
  constructor(thrown: PlainError) {
    super(thrown.message);
    this.name = 'WorkerCallError';
    this.thrown = thrown;
  }
}

export interface LimitedWorker {
  /** Calls the worker's function with `input` (structured-cloned); one call at a time. */
  call(input: unknown): Promise<unknown>;
  close(): Promise<void>;
}

/** Loading the worker's own modules is not study work; it gets a deadline of its own. */
const START_SECONDS = 60;
const ENTRY = partModule('workerEntry');

type Reply = { ready: true } | { id: number; ok: true; value: unknown } | { id: number; ok: false; error: PlainError };

/** Starts a worker that answers each call with `exportName` of the module at `moduleUrl` (a TypeScript source only when kvarbook runs from its sources). */
export function openLimitedWorker(moduleUrl: URL, exportName: string, limits: WorkerLimits): LimitedWorker {
  const worker = new Worker(ENTRY, {
    workerData: { moduleUrl: moduleUrl.href, exportName, fromSource: RUNS_FROM_SOURCE },
    resourceLimits: { maxOldGenerationSizeMb: limits.heapMb, maxYoungGenerationSizeMb: Math.min(64, Math.max(8, limits.heapMb / 8)), stackSizeMb: 4 },
    // The worker needs no variable of the checker's; what it prints is never shown.
    env: {},
    stdout: true,
    stderr: true,
  });
  worker.stdout.resume();
  worker.stderr.resume();
  let ended: WorkerLimitError | undefined;
  let waiting: { resolve: (reply: Reply) => void; reject: (error: WorkerLimitError) => void } | undefined;
  const fail = (error: WorkerLimitError) => {
    ended ??= error;
    const current = waiting;
    waiting = undefined;
    current?.reject(ended);
  };
  worker.on('message', (reply: Reply) => {
    const current = waiting;
    waiting = undefined;
    current?.resolve(reply);
  });
  worker.on('error', (error: Error & { code?: string }) => {
    fail(
      error.code === 'ERR_WORKER_OUT_OF_MEMORY'
        ? new WorkerLimitError('memory', `needed more than ${limits.heapMb} MB of memory and was stopped`)
        : new WorkerLimitError('ended', `failed inside kvarbook's worker (${error.message})`),
    );
  });
  worker.on('exit', () => fail(new WorkerLimitError('ended', "kvarbook's worker ended before it answered")));

  const next = (seconds: number, timeoutMessage: string, send?: () => void): Promise<Reply> =>
    new Promise<Reply>((resolve, reject) => {
      if (ended) {
        reject(ended);
        return;
      }
      const timer = setTimeout(() => {
        const error = new WorkerLimitError('time', timeoutMessage);
        fail(error);
        void worker.terminate();
      }, seconds * 1000);
      waiting = {
        resolve: (reply) => {
          clearTimeout(timer);
          resolve(reply);
        },
        reject: (error) => {
          clearTimeout(timer);
          reject(error);
        },
      };
      send?.();
    });

  const started = next(START_SECONDS, `kvarbook's worker did not start within ${START_SECONDS} s`);
  // A worker closed before its first call must not leave a rejection nobody handles.
  started.catch(() => undefined);
  let queue: Promise<unknown> = started;
  let nextId = 0;
  return {
    call(input: unknown): Promise<unknown> {
      const id = nextId++;
      const answer = queue.then(async () => {
        const reply = await next(limits.callSeconds, `took longer than ${limits.callSeconds} s and was stopped`, () =>
          worker.postMessage({ id, input }),
        );
        if (!('id' in reply) || reply.id !== id) throw new WorkerLimitError('ended', "kvarbook's worker answered out of turn");
        if (!reply.ok) throw new WorkerCallError(reply.error);
        return reply.value;
      });
      queue = answer.catch(() => undefined);
      return answer;
    },
    async close(): Promise<void> {
      ended ??= new WorkerLimitError('ended', "kvarbook's worker was closed");
      await worker.terminate();
    },
  };
}
