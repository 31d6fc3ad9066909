// Benchmark: what `run --pdf` costs over `run`, as whole processes, against Chromium's own print of the same HTML.
import { spawn, spawnSync } from 'node:child_process';
import { mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { findChromium } from '../src/report/pdf/find-chromium.ts';
import { chromiumFlags } from '../src/report/pdf/print.ts';

const ROOT = resolve(import.meta.dirname, '..');
const BIN = join(ROOT, 'bin/kvarbook.mjs');
const DEMO = join(ROOT, 'studies/caldera-bay-400kv.study.md');
const repetitions = 5;

export interface PdfBenchResult {
  /** Median wall time of the whole `kvarbook run` process (HTML only). */
  runMs: number;
  /** Median wall time of the whole `kvarbook run --pdf` process, until it has exited. */
  runPdfMs: number;
  /** Median wall time of `chromium --headless --print-to-pdf` of the same HTML, with the same flags. */
  chromiumFloorMs: number;
  /** (runPdfMs − runMs) / chromiumFloorMs: what printing adds to a run, against the bare print. */
  ratio: number;
}

export async function runPdfBench(studyPath: string = DEMO): Promise<PdfBenchResult> {
  const found = findChromium(process.env);
  if ('error' in found) throw new Error(found.error);
  const scratch = mkdtempSync(join(tmpdir(), 'kvarbook-bench-pdf-'));
  try {
    const runTimes: number[] = [];
    const runPdfTimes: number[] = [];
    const floorTimes: number[] = [];
    // Interleaved so that drift in machine load affects all three alike. Both runs skip the type
    // check, which both would pay alike, so that its noise does not swamp the difference.
    for (let index = 0; index < repetitions; index += 1) {
      const htmlOut = join(scratch, `html-${index}`);
      runTimes.push(timedKvarbook(['run', studyPath, '--no-typecheck', '--out', htmlOut]));
      runPdfTimes.push(timedKvarbook(['run', studyPath, '--no-typecheck', '--pdf', '--out', join(scratch, `pdf-${index}`)]));
      floorTimes.push(await timedChromiumPrint(found.path, htmlOf(htmlOut), scratch, index));
    }
    const runMs = median(runTimes);
    const runPdfMs = median(runPdfTimes);
    const chromiumFloorMs = median(floorTimes);
    return { runMs, runPdfMs, chromiumFloorMs, ratio: (runPdfMs - runMs) / chromiumFloorMs };
  } finally {
    rmSync(scratch, { recursive: true, force: true });
  }
}

function htmlOf(outFolder: string): string {
  const name = readdirSync(outFolder).find((entry) => entry.endsWith('.html'));
  if (name === undefined) throw new Error(`no HTML report in ${outFolder}`);
  return join(outFolder, name);
}

function timedKvarbook(args: string[]): number {
  const started = performance.now();
  const result = spawnSync(process.execPath, [BIN, ...args], { cwd: ROOT, encoding: 'utf8' });
  if (result.status !== 0) throw new Error(`kvarbook ${args.join(' ')} failed:\n${result.stderr}${result.stdout}`);
  return performance.now() - started;
}

async function timedChromiumPrint(chromiumPath: string, htmlPath: string, scratch: string, index: number): Promise<number> {
  const args = [
    ...chromiumFlags,
    `--user-data-dir=${join(scratch, `profile-${index}`)}`,
    `--print-to-pdf=${join(scratch, `chromium-${index}.pdf`)}`,
    pathToFileURL(htmlPath).href,
  ];
  const started = performance.now();
  await new Promise<void>((done, fail) => {
    const child = spawn(chromiumPath, args, { stdio: 'ignore' });
    child.on('error', fail);
    child.on('exit', (code) => (code === 0 ? done() : fail(new Error(`chromium exited with ${String(code)}`))));
  });
  return performance.now() - started;
}

function median(values: number[]): number {
  const sorted = [...values].sort((a, b) => a - b);
  const middle = Math.floor(sorted.length / 2);
  return sorted.length % 2 === 1 ? sorted[middle]! : (sorted[middle - 1]! + sorted[middle]!) / 2;
}

if (process.argv[1] !== undefined && import.meta.url === pathToFileURL(resolve(process.argv[1])).href) {
  const result = await runPdfBench(process.argv[2] ?? DEMO);
  process.stdout.write(
    `run ${result.runMs.toFixed(0)} ms, run --pdf ${result.runPdfMs.toFixed(0)} ms, chromium --print-to-pdf ${result.chromiumFloorMs.toFixed(0)} ms, ratio ${result.ratio.toFixed(2)} (target 1.2)\n`,
  );
}
