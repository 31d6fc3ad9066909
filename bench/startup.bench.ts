// Benchmark: whole kvarbook processes against `node -e ''` (--help, a first and a cached run of the demo), and a demo run's peak memory over all its processes.
import { spawn, spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';

const ROOT = resolve(import.meta.dirname, '..');
const BIN = join(ROOT, 'bin/kvarbook.mjs');
const DEMO = join(ROOT, 'studies/caldera-bay-400kv.study.md');
const repetitions = 5;

export interface StartupBenchResult {
  nodeMs: number;
  helpMs: number;
  firstRunMs: number;
  cachedRunMs: number;
  /** Largest sum of resident memory over the run's process tree (kvarbook, the calculation child, esbuild if any). */
  peakTreeMb: number;
  /** Processes of the run still alive after it exited. */
  leftOver: number;
}

function timed(args: string[], env: NodeJS.ProcessEnv = {}): number {
  const started = performance.now();
  const result = spawnSync(process.execPath, args, { cwd: ROOT, env: { ...process.env, ...env }, encoding: 'utf8' });
  if (result.status !== 0) throw new Error(`${args.join(' ')} failed:\n${result.stderr}${result.stdout}`);
  return performance.now() - started;
}

const median = (values: number[]) => [...values].sort((a, b) => a - b)[Math.floor(values.length / 2)]!;

/** Parent pid, resident kB, start time and state of every process, read from /proc. */
function processTable(): Map<number, { parent: number; rssKb: number; started: string; state: string }> {
  const table = new Map<number, { parent: number; rssKb: number; started: string; state: string }>();
  for (const name of readdirSync('/proc')) {
    if (!/^\d+$/.test(name)) continue;
    try {
      const stat = readFileSync(`/proc/${name}/stat`, 'utf8');
      const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
      table.set(Number(name), { parent: Number(fields[1]), rssKb: Number(fields[21]) * 4, started: fields[19]!, state: fields[0]! });
    } catch {
      // The process ended while the table was read.
    }
  }
  return table;
}

/** Samples the process tree of one run every 10 ms; after it exits, counts the processes of it still alive. */
async function treeMemory(args: string[], env: NodeJS.ProcessEnv): Promise<{ peakTreeMb: number; leftOver: number }> {
  const child = spawn(process.execPath, args, { cwd: ROOT, env: { ...process.env, ...env }, stdio: 'ignore' });
  const seen = new Map<number, string>();
  let peakKb = 0;
  const sample = () => {
    const table = processTable();
    const tree = new Set([child.pid!]);
    for (let grew = true; grew; ) {
      grew = false;
      for (const [pid, entry] of table) if (!tree.has(pid) && tree.has(entry.parent)) grew = tree.add(pid).size > 0;
    }
    let sumKb = 0;
    for (const pid of tree) {
      const entry = table.get(pid);
      if (!entry) continue;
      sumKb += entry.rssKb;
      if (pid !== child.pid) seen.set(pid, entry.started);
    }
    peakKb = Math.max(peakKb, sumKb);
  };
  const timer = setInterval(sample, 10);
  const code = await new Promise<number | null>((done) => child.on('exit', done));
  clearInterval(timer);
  if (code !== 0) throw new Error(`${args.join(' ')} exited with ${code}`);
  const after = processTable();
  // A zombie has ended and only waits to be reaped; it holds no memory and runs nothing.
  const leftOver = [...seen].filter(([pid, started]) => after.get(pid)?.started === started && after.get(pid)?.state !== 'Z').length;
  return { peakTreeMb: peakKb / 1024, leftOver };
}

export async function runStartupBench(): Promise<StartupBenchResult> {
  if (!existsSync(join(ROOT, 'dist/kvarbook.mjs'))) throw new Error('build first: npm run build');
  const scratch = mkdtempSync(join(tmpdir(), 'kvarbook-bench-startup-'));
  const warm = { KVARBOOK_CACHE: join(scratch, 'warm-cache') };
  try {
    timed([BIN, 'run', DEMO, '--out', join(scratch, 'warm')], warm);
    const times = { node: [] as number[], help: [] as number[], first: [] as number[], cached: [] as number[] };
    // Alternating, so that drift in the machine's load affects every side alike.
    for (let index = 0; index < repetitions; index += 1) {
      times.node.push(timed(['-e', '']));
      times.help.push(timed([BIN, '--help']));
      times.first.push(timed([BIN, 'run', DEMO, '--out', join(scratch, `first-${index}`)], { KVARBOOK_CACHE: join(scratch, `cold-cache-${index}`) }));
      times.cached.push(timed([BIN, 'run', DEMO, '--out', join(scratch, `cached-${index}`)], warm));
    }
    const memory = await treeMemory([BIN, 'run', DEMO, '--out', join(scratch, 'memory')], { KVARBOOK_CACHE: join(scratch, 'memory-cache') });
    return {
      nodeMs: median(times.node),
      helpMs: median(times.help),
      firstRunMs: median(times.first),
      cachedRunMs: median(times.cached),
      ...memory,
    };
  } finally {
    rmSync(scratch, { recursive: true, force: true });
  }
}

export function startupRows(result: StartupBenchResult): string[] {
  const ratio = (ms: number) => (ms / result.nodeMs).toFixed(1);
  return [
    `node -e ''                 ${result.nodeMs.toFixed(0)} ms`,
    `kvarbook --help            ${result.helpMs.toFixed(0)} ms   ratio ${ratio(result.helpMs)} (target 2.5)`,
    `run of the demo, cached    ${result.cachedRunMs.toFixed(0)} ms   ratio ${ratio(result.cachedRunMs)} (target 12; type check and charts cached)`,
    `run of the demo, first     ${result.firstRunMs.toFixed(0)} ms   ratio ${ratio(result.firstRunMs)} (target 30; with the type check)`,
    `peak memory of a demo run  ${result.peakTreeMb.toFixed(0)} MB over all its processes (first run, type check included); processes left after exit: ${result.leftOver}`,
  ];
}

if (process.argv[1] && resolve(process.argv[1]) === resolve(import.meta.filename)) {
  console.log(startupRows(await runStartupBench()).join('\n'));
}
