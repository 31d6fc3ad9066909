import { spawn } from 'node:child_process';
import { join } from 'node:path';
import { beforeAll, describe, expect, it, vi } from 'vitest';
import { KVARBOOK_BIN, kvarbookInProcess, scratchFolder } from '../support/cli.ts';
import { verifyArchive } from '../../src/archive/archive.ts';
import { openArchive } from '../../src/cli/archiveCommand.ts';
import { loadTrustedIdentities } from '../../src/seal/trust.ts';
import { archivedStudy, sealStudies, type SealedSet } from './sealedReports.ts';

/** `kvarbook archive <args>` as its own process; resolves with its exit status (null when killed: after `killAfterMs`, or by `kill`). */
function archiveProcess(
  set: SealedSet,
  args: string[],
  killAfterMs?: number,
): Promise<{ status: number | null; ms: number; stderr: string }> & { kill: () => void } {
  const started = performance.now();
  const child = spawn(process.execPath, [KVARBOOK_BIN, 'archive', ...args], {
    cwd: set.space.folder,
    env: { ...process.env, ...set.space.env },
    stdio: ['ignore', 'ignore', 'pipe'],
  });
  let stderr = '';
  child.stderr.on('data', (chunk: Buffer) => {
    stderr += chunk.toString('utf8');
  });
  const timer = killAfterMs === undefined ? undefined : setTimeout(() => child.kill('SIGKILL'), killAfterMs);
  const exited = new Promise<{ status: number | null; ms: number; stderr: string }>((resolve) => {
    child.on('exit', (status) => {
      clearTimeout(timer);
      resolve({ status, ms: performance.now() - started, stderr });
    });
  });
  return Object.assign(exited, { kill: () => child.kill('SIGKILL') });
}

function addProcess(set: SealedSet, archive: string, reports: string[], killAfterMs?: number) {
  return archiveProcess(set, ['add', ...reports, '--archive', archive], killAfterMs);
}

describe('the archive when processes are killed or run at once', () => {
  let set: SealedSet;
  let reports: string[];
  beforeAll(async () => {
    set = await sealStudies({ 'one.study.md': archivedStudy('CRS-1', 1), 'two.study.md': archivedStudy('CRS-2', 1) });
    reports = Object.values(set.reports);
  }, 120_000);

  /** Every indexed report has all its files, intact and with valid signatures; returns the ids indexed. */
  async function consistentIds(folder: string): Promise<string[]> {
    const archive = await openArchive(folder);
    try {
      const outcome = await verifyArchive(archive, loadTrustedIdentities(set.space.trustFolder).identities);
      expect(outcome.problems).toEqual([]);
      return (await archive.index.all()).map((row) => row.studyId);
    } finally {
      await archive.index.close();
    }
  }

  it('leaves the archive consistent, each report fully added or absent, however often an add is killed', async () => {
    const folder = join(scratchFolder(), 'archive');
    const untimed = await addProcess(set, join(scratchFolder(), 'archive'), reports);
    expect(untimed.status).toBe(0);
    for (let attempt = 0; attempt < 14; attempt += 1) {
      // Anywhere from start-up to past the end of an add of both reports.
      await addProcess(set, folder, reports, Math.random() * untimed.ms * 1.1);
      const ids = await consistentIds(folder);
      expect(new Set(ids).size).toBe(ids.length);
    }
    const finished = await addProcess(set, folder, reports);
    expect(finished.stderr).toBe('');
    expect((await consistentIds(folder)).sort()).toEqual(['CRS-1', 'CRS-2']);
  }, 60_000);

  it('leaves the archive consistent when a recheck is killed after its first verdict, and the same recheck then resumes', async () => {
    const folder = join(scratchFolder(), 'archive');
    expect((await addProcess(set, folder, reports)).status).toBe(0);
    const recheck = archiveProcess(set, ['recheck', '--all', '--jobs', '1', '--archive', folder]);
    await vi.waitFor(
      async () => {
        const archive = await openArchive(folder);
        try {
          expect((await archive.index.all()).some((row) => row.lastVerdict !== null)).toBe(true);
        } finally {
          await archive.index.close();
        }
      },
      { timeout: 60_000, interval: 50 },
    );
    recheck.kill();
    expect((await recheck).status).toBeNull();
    expect((await consistentIds(folder)).sort()).toEqual(['CRS-1', 'CRS-2']);
    const resumed = await kvarbookInProcess(['archive', 'recheck', '--all', '--json', '--archive', folder], set.space.folder, set.space.env);
    expect(JSON.parse(resumed.stdout)).toMatchObject({ resumed: true, interrupted: false, total: 2, reproduced: 2 });
  }, 60_000);

  it('keeps each report once when two processes add the same reports at the same time', async () => {
    const folder = join(scratchFolder(), 'archive');
    const outcomes = await Promise.all([addProcess(set, folder, reports), addProcess(set, folder, [...reports].reverse())]);
    expect(outcomes.map((outcome) => outcome.stderr)).toEqual(['', '']);
    expect(outcomes.map((outcome) => outcome.status)).toEqual([0, 0]);
    expect((await consistentIds(folder)).sort()).toEqual(['CRS-1', 'CRS-2']);
  }, 60_000);
});
