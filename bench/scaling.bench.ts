// Benchmark: time of each parent stage against the size of the study, to show that every stage grows linearly.
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { parseStudy } from '../src/study/parse.ts';
import { effectiveInputs } from '../src/study/inputs.ts';
import { transpileBlocks, transpileInlines } from '../src/execute/transpile.ts';
import { typecheckStudy } from '../src/execute/typecheck.ts';
import { executeStudy } from '../src/execute/session.ts';
import { renderReportParts } from '../src/report/html.ts';
import type { StudyRun } from '../src/report/studyRun.ts';
import { reportStylesheet } from '../src/cli/environment.ts';

/** Study sizes measured, smallest first; each is twice the one before, so a linear stage doubles its time. */
const SIZES = [1_000, 2_000, 4_000, 8_000];

/** A study with `count` top-level declarations in one block, `count` inline values in one paragraph and `count` results. */
export function scalingStudy(count: number): string {
  const declarations = Array.from({ length: count }, (_, index) => `const value${index}: number = ${index} * 1.5;`);
  const results = Array.from({ length: count }, (_, index) => `result('figure ${index}', value${index}, { unit: 'km' });`);
  const inlines = Array.from({ length: count }, (_, index) => `{{ value${index} }}`).join(' ');
  return [
    '---',
    'title: Scaling study',
    'project: Benchmark',
    'id: BENCH-1',
    'revision: 0',
    'date: 2026-11-20',
    'engineer: { name: Bench Engineer, licence: B-0, jurisdiction: Benchland }',
    'limits: { blockSeconds: 600, studySeconds: 3600, heapMb: 2048 }',
    '---',
    '# Many declarations',
    '',
    '```ts',
    ...declarations,
    ...results,
    '```',
    '',
    inlines,
    '',
  ].join('\n');
}

export interface StageTimes {
  size: number;
  parseMs: number;
  transpileMs: number;
  inlinesMs: number;
  typecheckMs: number;
  executeMs: number;
  renderMs: number;
}

async function timed<T>(work: () => T | Promise<T>): Promise<[T, number]> {
  const started = performance.now();
  const value = await work();
  return [value, performance.now() - started];
}

export async function measureStages(size: number, folder: string): Promise<StageTimes> {
  const file = join(folder, `scaling-${size}.study.md`);
  const source = scalingStudy(size);
  writeFileSync(file, source);
  const [study, parseMs] = await timed(() => parseStudy(file, source));
  const inputs = effectiveInputs(study.inputs, []);
  const [blocks, transpileMs] = await timed(() => transpileBlocks(study));
  const [inlines, inlinesMs] = await timed(() => transpileInlines(study));
  const [, typecheckMs] = await timed(() => typecheckStudy(study));
  const [outcome, executeMs] = await timed(() => executeStudy(study, inputs, blocks, inlines));
  const run: StudyRun = {
    study,
    inputs,
    outcome,
    provenance: {
      kvarbookVersion: 'bench',
      nodeVersion: process.version,
      lockfileSha256: '0'.repeat(64),
      studyFile: file,
      studySourceSha256: study.sourceSha256,
      limits: study.meta.limits,
      typeChecked: true,
      isolation: 'bench',
    },
  };
  const [, renderMs] = await timed(() => renderReportParts(run, new Map(), reportStylesheet()));
  return { size, parseMs, transpileMs, inlinesMs, typecheckMs, executeMs, renderMs };
}

export async function runScalingBench(sizes: readonly number[] = SIZES): Promise<StageTimes[]> {
  const folder = mkdtempSync(join(tmpdir(), 'kvarbook-scaling-'));
  try {
    const rows: StageTimes[] = [];
    for (const size of sizes) rows.push(await measureStages(size, folder));
    return rows;
  } finally {
    rmSync(folder, { recursive: true, force: true });
  }
}

const STAGES = ['parseMs', 'transpileMs', 'inlinesMs', 'typecheckMs', 'executeMs', 'renderMs'] as const;

/** One line per size; the last column of each stage is the growth over the size before (2.0 is linear, 4.0 quadratic). */
export function scalingTable(rows: readonly StageTimes[]): string {
  const header = `${'size'.padStart(7)}  ${STAGES.map((stage) => stage.replace('Ms', ' ms').padStart(20)).join('')}`;
  const lines = rows.map((row, index) => {
    const previous = rows[index - 1];
    const cells = STAGES.map((stage) => {
      const growth = previous ? ` (x${(row[stage] / Math.max(previous[stage], 0.01)).toFixed(1)})` : '';
      return `${row[stage].toFixed(0)}${growth}`.padStart(20);
    });
    return `${String(row.size).padStart(7)}  ${cells.join('')}`;
  });
  return [header, ...lines].join('\n');
}

/** Parse time of prose that a careless scan would read once per brace pair: `count` unclosed `{{` in one paragraph. */
export function unclosedBracesTable(counts: readonly number[] = [100_000, 200_000, 400_000]): string {
  const rows = counts.map((count) => {
    const source = scalingStudy(0).replace('# Many declarations', `# Braces\n\n${'{{ a '.repeat(count)}`);
    const started = performance.now();
    parseStudy('braces.study.md', source);
    return { count, ms: performance.now() - started };
  });
  return rows
    .map(
      (row, index) =>
        `${String(row.count).padStart(7)} unclosed {{   parse ${row.ms.toFixed(0)} ms${index > 0 ? ` (x${(row.ms / Math.max(rows[index - 1]!.ms, 0.01)).toFixed(1)})` : ''}`,
    )
    .join('\n');
}

if (process.argv[1] && resolve(process.argv[1]) === resolve(import.meta.filename)) {
  const sizes = process.argv
    .slice(2)
    .map(Number)
    .filter((size) => size > 0);
  console.log(scalingTable(await runScalingBench(sizes.length > 0 ? sizes : SIZES)));
  console.log(unclosedBracesTable());
}
