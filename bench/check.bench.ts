// Benchmark: `kvarbook check` of the demo study against `kvarbook run` of it, as a user runs them.
import { spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';

const ROOT = resolve(import.meta.dirname, '..');
const BIN = join(ROOT, 'bin/kvarbook.mjs');
const DEMO = join(ROOT, 'studies/caldera-bay-400kv.study.md');
const repetitions = 3;

export interface CheckBenchResult {
  runMs: number;
  checkMs: number;
  ratio: number;
}

function kvarbook(args: string[], env: NodeJS.ProcessEnv): number {
  const started = performance.now();
  const result = spawnSync(process.execPath, [BIN, ...args], { cwd: ROOT, env: { ...process.env, ...env }, encoding: 'utf8' });
  if (result.status !== 0) throw new Error(`kvarbook ${args.join(' ')} failed:\n${result.stderr}${result.stdout}`);
  return performance.now() - started;
}

const median = (values: number[]) => [...values].sort((a, b) => a - b)[Math.floor(values.length / 2)]!;

export async function runCheckBench(): Promise<CheckBenchResult> {
  const scratch = mkdtempSync(join(tmpdir(), 'kvarbook-bench-'));
  const env = { KVARBOOK_HOME: join(scratch, 'home'), KVARBOOK_PASSPHRASE: 'benchmark passphrase only' };
  try {
    kvarbook(['key', 'new', '--name', 'Ilse Varga', '--licence', 'PE-30418', '--jurisdiction', 'Estmark Engineering Board'], env);
    mkdirSync(join(scratch, 'home', 'trusted'), { recursive: true });
    kvarbook(['key', 'show', '--out', join(scratch, 'home', 'trusted', 'engineer.json')], env);
    kvarbook(['run', DEMO, '--seal', '--out', join(scratch, 'sealed')], env);
    const runTimes: number[] = [];
    const checkTimes: number[] = [];
    // Interleaved so that drift in machine load affects both sides alike; both type-check the blocks.
    for (let index = 0; index < repetitions; index += 1) {
      runTimes.push(kvarbook(['run', DEMO, '--out', join(scratch, `plain-${index}`)], env));
      checkTimes.push(kvarbook(['check', join(scratch, 'sealed', 'CBX-RC-001-r4.html')], env));
    }
    const runMs = median(runTimes);
    const checkMs = median(checkTimes);
    return { runMs, checkMs, ratio: checkMs / runMs };
  } finally {
    rmSync(scratch, { recursive: true, force: true });
  }
}

if (process.argv[1] && resolve(process.argv[1]) === resolve(import.meta.filename)) {
  const result = await runCheckBench();
  console.log(`run ${result.runMs.toFixed(0)} ms, check ${result.checkMs.toFixed(0)} ms, ratio ${result.ratio.toFixed(2)} (target 1.1)`);
}
