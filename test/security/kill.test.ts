import { spawn, spawnSync } from 'node:child_process';
import { cpSync, existsSync, mkdirSync, readFileSync, readdirSync, readlinkSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { KVARBOOK_BIN, kvarbook, kvarbookInProcess, scratchFolder, scratchPath } from '../support/cli.ts';
import { minimalStudy } from '../fuzz/seedStudies.ts';
import { sealWorkspace } from './sealWorkspace.ts';

const KILL_SEED = 20261120;
/** Kills per kind of run: 6 plain, 5 with --pdf, 5 sealing, 5 replacing a sealed set with a PDF. */
const KILLS = { plain: 6, pdf: 5, seal: 5, replace: 5 } as const;
const SET_NAMES = ['TEST-1-r1.html', 'TEST-1-r1.results.json', 'TEST-1-r1.seal.json', 'TEST-1-r1.pdf'];
const RUN_ARGUMENTS = ['run', 'line.study.md', '--no-typecheck'];

type Snapshot = Map<string, string>;

/** The report files the folder shows (following kvarbook's links), by name. */
function visible(folder: string): Snapshot {
  const shown: Snapshot = new Map();
  for (const name of SET_NAMES) {
    const path = join(folder, 'build', name);
    if (existsSync(path)) shown.set(name, readFileSync(path).toString('latin1'));
  }
  return shown;
}

/** The files of one folder that are report files, by name. */
function filesOf(folder: string): Snapshot {
  return new Map(
    readdirSync(folder)
      .filter((name) => SET_NAMES.includes(name))
      .map((name) => [name, readFileSync(join(folder, name)).toString('latin1')]),
  );
}

const same = (a: Snapshot, b: Snapshot) => a.size === b.size && [...a].every(([name, content]) => b.get(name) === content);

/** Which of the runs' sets a snapshot is, whole; undefined for a mix or a part of one. */
function whichSet(shown: Snapshot, sets: Record<string, Snapshot>): string | undefined {
  return Object.entries(sets).find(([, set]) => same(shown, set))?.[0];
}

function temporaries(folder: string): string[] {
  const build = join(folder, 'build');
  return existsSync(build) ? (readdirSync(build, { recursive: true }) as string[]).filter((name) => name.endsWith('.tmp')) : [];
}

/** The parent of a process, from /proc/<pid>/stat (the field after the parenthesised command name). */
const parentOf = (pid: string) => Number(readFileSync(`/proc/${pid}/stat`, 'latin1').split(') ')[1]!.split(' ')[1]);

/**
 * Processes started from this folder (their working directory): the calculation process, esbuild, Chromium. Children of
 * this test process are left out: the in-process runs that wrote the earlier sets share one esbuild service, which lives
 * as long as this process does, in the folder of the first of them; a killed run's helpers are never this process's.
 */
function helpersIn(folder: string): string[] {
  const found: string[] = [];
  for (const entry of readdirSync('/proc')) {
    if (!/^\d+$/.test(entry)) continue;
    try {
      if (readlinkSync(`/proc/${entry}/cwd`) === folder && parentOf(entry) !== process.pid)
        found.push(readFileSync(`/proc/${entry}/cmdline`, 'latin1').split('\0').slice(0, 2).join(' '));
    } catch {
      // Gone while we looked, or a zombie waiting for its parent: neither runs.
    }
  }
  return found;
}

/** Helpers notice a killed parent when their pipe closes; give them three seconds to go. */
async function helpersLeft(folder: string): Promise<string[]> {
  for (let waited = 0; waited < 3000; waited += 100) {
    if (helpersIn(folder).length === 0) return [];
    await new Promise((resolve) => setTimeout(resolve, 100));
  }
  return helpersIn(folder);
}

async function runAndKillAfter(folder: string, args: string[], env: NodeJS.ProcessEnv, delayMs: number): Promise<void> {
  const run = spawn(process.execPath, [KVARBOOK_BIN, ...args], { cwd: folder, env: { ...process.env, ...env }, stdio: 'ignore' });
  const ended = new Promise<void>((resolve) => run.on('exit', () => resolve()));
  const timer = setTimeout(() => run.kill('SIGKILL'), delayMs);
  await ended;
  clearTimeout(timer);
}

function timed(args: string[], folder: string, env: NodeJS.ProcessEnv = {}): number {
  const started = Date.now();
  const run = kvarbook(args, folder, env);
  expect(run.status, run.stderr).toBe(0);
  return Date.now() - started;
}

/**
 * The earlier set a killed run would replace, of the same files but a shorter line, written by the command line in this
 * process: only the runs killed, timed or recovering are processes. (A run with --set would write files of its own.)
 */
async function earlierSet(args: string[], folder: string, env: NodeJS.ProcessEnv = {}): Promise<void> {
  writeFileSync(join(folder, 'line.study.md'), minimalStudy.replace('lineLength: 320 km', 'lineLength: 100 km'));
  const run = await kvarbookInProcess(args, folder, env);
  writeFileSync(join(folder, 'line.study.md'), minimalStudy);
  expect(run.status, run.stderr).toBe(0);
}

/** Seeded moments across the whole run, the switch at its end included. */
const killMoments = (count: number, fullRunMs: number) =>
  fc.sample(fc.integer({ min: 0, max: fullRunMs + 200 }), { seed: KILL_SEED, numRuns: count });

describe('killing kvarbook while it writes a report', () => {
  it(`shows the earlier set or the new one, never a mix, after each of ${KILLS.plain} kills of a plain run`, async () => {
    const folder = scratchFolder('kvarbook-kill-');
    writeFileSync(join(folder, 'line.study.md'), minimalStudy);
    await earlierSet([...RUN_ARGUMENTS], folder);
    const old = visible(folder);
    const reference = scratchFolder('kvarbook-kill-reference-');
    writeFileSync(join(reference, 'line.study.md'), minimalStudy);
    const fullRunMs = timed(RUN_ARGUMENTS, reference);
    const fresh = visible(reference);
    expect(same(old, fresh)).toBe(false);

    for (const delayMs of killMoments(KILLS.plain, fullRunMs)) {
      await runAndKillAfter(folder, RUN_ARGUMENTS, {}, delayMs);
      expect(whichSet(visible(folder), { old, fresh }), `the set shown after a kill at ${delayMs} ms`).toBeDefined();
    }
    expect(await helpersLeft(folder)).toEqual([]);
    timed(RUN_ARGUMENTS, folder);
    expect(same(visible(folder), fresh)).toBe(true);
    expect(temporaries(folder)).toEqual([]);
  }, 240_000);

  it(`never shows a PDF of one run beside the HTML of another, and leaves no helper running, after ${KILLS.pdf} kills of run --pdf`, async () => {
    const template = scratchFolder('kvarbook-kill-pdf-');
    writeFileSync(join(template, 'line.study.md'), minimalStudy);
    const reference = scratchFolder('kvarbook-kill-pdf-reference-');
    writeFileSync(join(reference, 'line.study.md'), minimalStudy);
    const fullRunMs = timed([...RUN_ARGUMENTS, '--pdf'], reference);
    const fresh = visible(reference);
    await earlierSet([...RUN_ARGUMENTS, '--pdf'], template);
    const old = visible(template);
    expect(old.has('TEST-1-r1.pdf') && fresh.has('TEST-1-r1.pdf')).toBe(true);

    const profiles = scratchFolder('kvarbook-kill-pdf-profiles-');
    for (const [index, delayMs] of killMoments(KILLS.pdf, fullRunMs).entries()) {
      const folder = scratchPath(`${template}-${index}`);
      cpSync(template, folder, { recursive: true, verbatimSymlinks: true });
      await runAndKillAfter(folder, [...RUN_ARGUMENTS, '--pdf'], { TMPDIR: profiles }, delayMs);
      expect(whichSet(visible(folder), { old, fresh }), `the set shown after a kill at ${delayMs} ms`).toBeDefined();
      expect(await helpersLeft(folder), `helpers after a kill at ${delayMs} ms`).toEqual([]);
    }
    // The next print removes the Chromium profiles the killed ones left.
    const last = `${template}-${KILLS.pdf - 1}`;
    timed([...RUN_ARGUMENTS, '--pdf'], last, { TMPDIR: profiles });
    expect(
      [...visible(last)].filter(([name, content]) => fresh.get(name) !== content).map(([name]) => name),
      'files that differ from a clean run',
    ).toEqual([]);
    expect(temporaries(last)).toEqual([]);
    expect(readdirSync(profiles).filter((name) => name.startsWith('kvarbook-chromium-'))).toEqual([]);
  }, 300_000);

  it(`shows the unsealed set or the sealed one, whole, after each of ${KILLS.seal} kills of run --seal`, async () => {
    const space = sealWorkspace('kvarbook-kill-seal-');
    writeFileSync(join(space.folder, 'line.study.md'), minimalStudy);
    await earlierSet(['run', 'line.study.md'], space.folder, space.env);
    const old = visible(space.folder);
    // Ed25519 signatures are deterministic: the same key seals the same run to the same bytes.
    const reference = scratchPath(`${space.folder}-reference`);
    cpSync(space.folder, reference, { recursive: true, verbatimSymlinks: true });
    const fullRunMs = timed(['run', 'line.study.md', '--seal'], reference, space.env);
    const sealed = visible(reference);
    expect(sealed.has('TEST-1-r1.seal.json')).toBe(true);
    for (const [index, delayMs] of killMoments(KILLS.seal, fullRunMs).entries()) {
      const folder = scratchPath(`${space.folder}-${index}`);
      cpSync(space.folder, folder, { recursive: true, verbatimSymlinks: true });
      await runAndKillAfter(folder, ['run', 'line.study.md', '--seal'], space.env, delayMs);
      expect(whichSet(visible(folder), { old, sealed }), `the set shown after a kill at ${delayMs} ms`).toBeDefined();
      expect(await helpersLeft(folder)).toEqual([]);
    }
  }, 300_000);

  it(`keeps the superseded sealed set whole, and shows one set, after each of ${KILLS.replace} kills of run --seal --replace-sealed --pdf`, async () => {
    const space = sealWorkspace('kvarbook-kill-replace-');
    writeFileSync(join(space.folder, 'line.study.md'), minimalStudy);
    const replace = ['run', 'line.study.md', '--seal', '--pdf', '--replace-sealed'];
    await earlierSet(['run', 'line.study.md', '--seal', '--pdf'], space.folder, space.env);
    const sealedA = visible(space.folder);
    const reference = scratchPath(`${space.folder}-reference`);
    cpSync(space.folder, reference, { recursive: true, verbatimSymlinks: true });
    const fullRunMs = timed(replace, reference, space.env);
    const sealedB = visible(reference);
    expect(sealedA.size).toBe(4);
    expect(sealedB.size).toBe(4);

    for (const [index, delayMs] of killMoments(KILLS.replace, fullRunMs).entries()) {
      const folder = scratchPath(`${space.folder}-${index}`);
      cpSync(space.folder, folder, { recursive: true, verbatimSymlinks: true });
      await runAndKillAfter(folder, replace, space.env, delayMs);
      expect(whichSet(visible(folder), { sealedA, sealedB }), `the set shown after a kill at ${delayMs} ms`).toBeDefined();
      // A is shown, or kept whole in a folder of its own: superseded/, or a set the next run will move there.
      const places = [
        ...(existsSync(join(folder, 'build', 'superseded'))
          ? readdirSync(join(folder, 'build', 'superseded')).map((name) => join(folder, 'build', 'superseded', name))
          : []),
        ...readdirSync(join(folder, 'build', '.kvarbook', 'sets'))
          .filter((name) => !name.startsWith('.'))
          .map((name) => join(folder, 'build', '.kvarbook', 'sets', name)),
      ];
      expect(
        places.some((place) => same(filesOf(place), sealedA)),
        `the sealed set A after a kill at ${delayMs} ms`,
      ).toBe(true);
      expect(await helpersLeft(folder)).toEqual([]);
    }
    const last = `${space.folder}-${KILLS.replace - 1}`;
    timed(replace, last, space.env);
    const superseded = readdirSync(join(last, 'build', 'superseded')).map((name) => filesOf(join(last, 'build', 'superseded', name)));
    expect(superseded.every((set) => whichSet(set, { sealedA, sealedB }) !== undefined)).toBe(true);
    expect(superseded.some((set) => same(set, sealedA))).toBe(true);
    expect(temporaries(last)).toEqual([]);
  }, 360_000);

  it('removes a set left unfinished by a run that no longer exists, and keeps one a running writer is still writing', async () => {
    const folder = scratchFolder('kvarbook-kill-');
    writeFileSync(join(folder, 'line.study.md'), minimalStudy);
    await earlierSet(RUN_ARGUMENTS, folder);
    const sets = join(folder, 'build', '.kvarbook', 'sets');
    const finished = spawnSync(process.execPath, ['-e', '0']).pid!;
    const stale = `.TEST-1-r1.${finished}.k1ll3d.tmp`;
    const live = `.TEST-1-r1.${process.pid}.wr1t1ng.tmp`;
    const unrelated = `.OTHER-2-r1.${finished}.x.tmp`;
    for (const name of [stale, live, unrelated]) mkdirSync(join(sets, name));
    timed(RUN_ARGUMENTS, folder);
    expect(
      readdirSync(sets)
        .filter((name) => name.endsWith('.tmp'))
        .sort(),
    ).toEqual([live, unrelated].sort());
  });
});
