// Benchmark: `kvarbook archive recheck` of archived studies (100 by default), one at a time against the pool of one per core, as a user runs it.
import { spawn } from 'node:child_process';
import { mkdirSync, mkdtempSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { availableParallelism, tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { createSigningKey } from '../src/seal/keys.ts';
import { exportIdentity, saveKey } from '../src/seal/keystore.ts';

const ROOT = resolve(import.meta.dirname, '..');
const BIN = join(ROOT, 'bin/kvarbook.mjs');
const PASSPHRASE = 'benchmark passphrase only';

export interface ArchiveBenchResult {
  studies: number;
  workers: number;
  sequentialMs: number;
  poolMs: number;
  ratio: number;
}

/** An invented study per index: one figure from the solver, which differs with the study's line length. */
function benchStudy(index: number): string {
  return `---
title: Charging of the invented line ${index}
project: Archive benchmark
id: BENCH-${String(index).padStart(3, '0')}
revision: 1
date: 2026-11-20
engineer: { name: Mara Quillan, licence: PE-90001, jurisdiction: Invented Engineering Board }
inputs:
  lineLength: ${150 + index} km
---
# Line

\`\`\`ts
const polar = solver.polarForm({ value: { re: inputs.lineLength.in("km"), im: 40 } });
result("Magnitude", polar.magnitude, { unit: "km" });
\`\`\`
`;
}

function kvarbook(args: string[], env: NodeJS.ProcessEnv): Promise<number> {
  const started = performance.now();
  const child = spawn(process.execPath, [BIN, ...args], { cwd: ROOT, env: { ...process.env, ...env }, stdio: ['ignore', 'ignore', 'pipe'] });
  let stderr = '';
  child.stderr.on('data', (chunk: Buffer) => {
    stderr += chunk.toString('utf8');
  });
  return new Promise((done, fail) =>
    child.on('exit', (status) =>
      status === 0 ? done(performance.now() - started) : fail(new Error(`kvarbook ${args.join(' ')} failed:\n${stderr}`)),
    ),
  );
}

export async function runArchiveBench(count = 100): Promise<ArchiveBenchResult> {
  const scratch = mkdtempSync(join(tmpdir(), 'kvarbook-archive-bench-'));
  // A cheap key: it guards nothing; the type-check cache is the benchmark's own, filled when the studies are sealed,
  // so both rechecks time the same work (each study type-checked once, when sealed, as its engineer did).
  const env = { KVARBOOK_HOME: join(scratch, 'home'), KVARBOOK_PASSPHRASE: PASSPHRASE, KVARBOOK_CACHE: join(scratch, 'cache') };
  const workers = availableParallelism();
  try {
    const key = createSigningKey({
      name: 'Mara Quillan',
      licence: 'PE-90001',
      jurisdiction: 'Invented Engineering Board',
      passphrase: PASSPHRASE,
      scrypt: { N: 2 ** 10, r: 8, p: 1 },
    });
    saveKey(join(scratch, 'home', 'keys'), key);
    mkdirSync(join(scratch, 'home', 'trusted'), { recursive: true });
    writeFileSync(join(scratch, 'home', 'trusted', 'engineer.json'), exportIdentity(key.identity));
    mkdirSync(join(scratch, 'studies'));
    for (let from = 0; from < count; from += workers) {
      await Promise.all(
        Array.from({ length: Math.min(workers, count - from) }, (_, offset) => {
          const file = join(scratch, 'studies', `bench-${from + offset}.study.md`);
          writeFileSync(file, benchStudy(from + offset));
          return kvarbook(['run', file, '--seal', '--out', join(scratch, 'build')], env);
        }),
      );
    }
    const archive = join(scratch, 'archive');
    const reports = readdirSync(join(scratch, 'build')).filter((name) => name.endsWith('.html'));
    await kvarbook(['archive', 'add', ...reports.map((name) => join(scratch, 'build', name)), '--archive', archive], env);
    const sequentialMs = await kvarbook(['archive', 'recheck', '--all', '--jobs', '1', '--archive', archive], env);
    const poolMs = await kvarbook(['archive', 'recheck', '--all', '--jobs', String(workers), '--archive', archive], env);
    return { studies: count, workers, sequentialMs, poolMs, ratio: sequentialMs / poolMs };
  } finally {
    rmSync(scratch, { recursive: true, force: true });
  }
}

export function archiveRow(result: ArchiveBenchResult): string {
  return `archive recheck of ${result.studies} studies  one at a time ${(result.sequentialMs / 1000).toFixed(1)} s   pool of ${result.workers} ${(result.poolMs / 1000).toFixed(1)} s   ratio ${result.ratio.toFixed(2)} (target 1.7 on 2 cores)`;
}

if (process.argv[1] && resolve(process.argv[1]) === resolve(import.meta.filename)) {
  console.log(archiveRow(await runArchiveBench(Number(process.argv[2] ?? 100))));
}
