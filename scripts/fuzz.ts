// `npm run fuzz -- [count] [--seed n] [--full n]`: the long mutation run; every mutant must end in success or a located StudyFailure.
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parseArgs } from 'node:util';
import fc from 'fast-check';
import { fullStages, judge, mutantArbitrary, mutantSource, mutantsReachingExecution, staticStages, type Mutant } from '../test/fuzz/mutate.ts';

const { values, positionals } = parseArgs({
  allowPositionals: true,
  options: { seed: { type: 'string', default: String(Date.now() % 2 ** 31) }, full: { type: 'string' } },
});
const count = Number(positionals[0] ?? 10_000);
const seed = Number(values.seed);
const fullCount = Number(values.full ?? Math.ceil(count / 25));
if (!Number.isInteger(count) || count < 1 || !Number.isInteger(seed) || !Number.isInteger(fullCount) || fullCount < 0) {
  process.stderr.write('usage: npm run fuzz -- [count >= 1] [--seed integer] [--full count >= 0]\n');
  process.exit(2);
}

const folder = mkdtempSync(join(tmpdir(), 'kvarbook-fuzz-'));
const studyPath = join(folder, 'mutant.study.md');
const outcomes = new Map<string, number>();
const findings: string[] = [];
const tally = (stage: string, key: string) => outcomes.set(`${stage} ${key}`, (outcomes.get(`${stage} ${key}`) ?? 0) + 1);

async function examine(stage: 'static' | 'full', mutant: Mutant): Promise<void> {
  const source = mutantSource(mutant);
  const run =
    stage === 'static'
      ? () => staticStages(studyPath, source)
      : () => {
          writeFileSync(studyPath, source);
          return fullStages(studyPath, source);
        };
  try {
    const verdict = await judge(source, run);
    tally(stage, verdict.outcome === 'ok' ? 'success' : verdict.codes[0]!);
  } catch (error) {
    tally(stage, 'FINDING');
    findings.push(`${stage}: ${(error as Error).message}\n  mutations: ${JSON.stringify(mutant)}`);
  }
}

const started = Date.now();
for (const mutant of fc.sample(mutantArbitrary, { seed, numRuns: count })) await examine('static', mutant);
const staticMs = Date.now() - started;
for (const mutant of mutantsReachingExecution(seed + 1, fullCount)) await examine('full', mutant);
const totalMs = Date.now() - started;

process.stdout.write(`seed ${seed}: ${count} mutants through parse, inputs and transpile in ${(staticMs / 1000).toFixed(1)} s; `);
process.stdout.write(
  `${fullCount} that pass those through the whole pipeline, calculation process included; ${(totalMs / 1000).toFixed(1)} s in all\n`,
);
for (const [key, n] of [...outcomes.entries()].sort((a, b) => b[1] - a[1])) process.stdout.write(`${String(n).padStart(7)}  ${key}\n`);
for (const finding of findings.slice(0, 20)) process.stdout.write(`\n${finding}\n`);
process.exitCode = findings.length > 0 ? 1 : 0;
