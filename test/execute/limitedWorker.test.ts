import { describe, expect, it } from 'vitest';
import { WorkerCallError, WorkerLimitError, openLimitedWorker } from '../../src/execute/limitedWorker.ts';

const TASKS = new URL('./fixtures/workerTasks.ts', import.meta.url);

async function failureOf(exportName: string, input: unknown, limits = { heapMb: 64, callSeconds: 1 }): Promise<unknown> {
  const worker = openLimitedWorker(TASKS, exportName, limits);
  try {
    return await worker.call(input).then(
      (value) => ({ value }),
      (error: unknown) => error,
    );
  } finally {
    await worker.close();
  }
}

describe('a limited worker', () => {
  it('answers calls in order with what its function returns', async () => {
    const worker = openLimitedWorker(TASKS, 'doubled', { heapMb: 64, callSeconds: 5 });
    try {
      expect(await Promise.all([worker.call({ value: 2 }), worker.call({ value: 21 })])).toEqual([4, 42]);
    } finally {
      await worker.close();
    }
  });

  it('stops a call that never ends at its deadline, and the host goes on', async () => {
    const error = await failureOf('spinForever', undefined);
    expect(error).toBeInstanceOf(WorkerLimitError);
    expect(error).toMatchObject({ reason: 'time' });
  });

  it('stops a regular expression that backtracks without end', async () => {
    expect(await failureOf('backtrackForever', { length: 60 })).toMatchObject({ reason: 'time' });
  });

  it('stops a call that grows without bound at its heap limit', async () => {
    const error = await failureOf('hoardMemory', undefined, { heapMb: 32, callSeconds: 30 });
    expect(error).toMatchObject({ reason: 'memory' });
    expect((error as Error).message).toContain('32 MB');
  });

  it("hands back a thrown error's name, message and fields as plain data", async () => {
    const error = await failureOf('refuseWithDetails', undefined);
    expect(error).toBeInstanceOf(WorkerCallError);
    expect((error as WorkerCallError).thrown).toMatchObject({
      name: 'Error',
      message: 'refused on purpose',
      code: 'TEST_REFUSAL',
      quantity: 'layer.0.mark',
    });
  });

  it('hands back a rejection as a thrown error', async () => {
    expect(await failureOf('rejectLater', undefined)).toMatchObject({ thrown: { message: 'rejected on purpose' } });
  });

  it('refuses every call after a call ran past its limit', async () => {
    const worker = openLimitedWorker(TASKS, 'spinForever', { heapMb: 64, callSeconds: 0.5 });
    try {
      await expect(worker.call(undefined)).rejects.toMatchObject({ reason: 'time' });
      await expect(worker.call(undefined)).rejects.toMatchObject({ reason: 'time' });
    } finally {
      await worker.close();
    }
  });
});
