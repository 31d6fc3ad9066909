import { spawn, spawnSync } from 'node:child_process';
import { existsSync, readFileSync, readdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { KVARBOOK_BIN, kvarbook, scratchFolder } from '../support/cli.ts';
import { minimalStudy } from '../fuzz/seedStudies.ts';

const KILL_SEED = 20261120;
const KILL_COUNT = 6;
const REPORT_FILES = ['TEST-1-r1.html', 'TEST-1-r1.results.json'];
const RUN_ARGUMENTS = ['run', 'line.study.md', '--no-typecheck'];

function studyFolder(): string {
  const folder = scratchFolder('kvarbook-kill-');
  writeFileSync(join(folder, 'line.study.md'), minimalStudy);
  return folder;
}

function reportContents(folder: string): string[] {
  return REPORT_FILES.map((name) => readFileSync(join(folder, 'build', name), 'utf8'));
}

function temporaries(folder: string): string[] {
  return existsSync(join(folder, 'build')) ? readdirSync(join(folder, 'build')).filter((name) => name.endsWith('.tmp')) : [];
}

/** Calculation processes still reading this folder: a killed run must not leave its child behind. */
function childrenReading(folder: string): string[] {
  const listing = spawnSync('ps', ['-eo', 'args'], { encoding: 'utf8' }).stdout;
  return listing.split('\n').filter((line) => line.includes(`--allow-fs-read=${folder}`));
}

async function runAndKillAfter(folder: string, delayMs: number): Promise<void> {
  const run = spawn(process.execPath, [KVARBOOK_BIN, ...RUN_ARGUMENTS], { cwd: folder, stdio: 'ignore' });
  const ended = new Promise<void>((resolve) => run.on('exit', () => resolve()));
  const timer = setTimeout(() => run.kill('SIGKILL'), delayMs);
  await ended;
  clearTimeout(timer);
}

describe('killing kvarbook while it writes a report', () => {
  it('leaves each report file either the old one or the new one, and the next run leaves no temporary file', async () => {
    const reference = studyFolder();
    const started = Date.now();
    expect(kvarbook(RUN_ARGUMENTS, reference).status).toBe(0);
    const fullRunMs = Date.now() - started;
    const fresh = reportContents(reference);

    const folder = studyFolder();
    expect(kvarbook([...RUN_ARGUMENTS, '--set', 'lineLength=100km'], folder).status).toBe(0);
    const old = reportContents(folder);
    expect(old).not.toEqual(fresh);

    // Seeded moments across the whole run, the write at its end included.
    const delays = fc.sample(fc.integer({ min: 0, max: fullRunMs + 200 }), { seed: KILL_SEED, numRuns: KILL_COUNT });
    for (const delayMs of delays) {
      await runAndKillAfter(folder, delayMs);
      const now = reportContents(folder);
      for (const [index, content] of now.entries()) {
        expect([old[index], fresh[index]], `${REPORT_FILES[index]} after a kill at ${delayMs} ms`).toContain(content);
      }
    }
    await new Promise((resolve) => setTimeout(resolve, 500));
    expect(childrenReading(folder)).toEqual([]);

    expect(kvarbook(RUN_ARGUMENTS, folder).status).toBe(0);
    expect(reportContents(folder)).toEqual(fresh);
    expect(temporaries(folder)).toEqual([]);
  });

  it('removes a stale temporary file of its own report left by a run that no longer exists, and keeps one of a running writer', () => {
    const folder = studyFolder();
    expect(kvarbook(RUN_ARGUMENTS, folder).status).toBe(0);
    const finished = spawnSync(process.execPath, ['-e', '0']).pid!;
    const stale = `.TEST-1-r1.html.${finished}.k1ll3d.tmp`;
    const live = `.TEST-1-r1.html.${process.pid}.wr1t1ng.tmp`;
    const unrelated = `.other-report.html.${finished}.x.tmp`;
    for (const name of [stale, live, unrelated]) writeFileSync(join(folder, 'build', name), 'partial');
    expect(kvarbook(RUN_ARGUMENTS, folder).status).toBe(0);
    expect(temporaries(folder).sort()).toEqual([live, unrelated].sort());
  });
});
