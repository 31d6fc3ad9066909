// Damaging valid studies the way editors, merges and hostile authors do, and judging what kvarbook made of the result.
import fc from 'fast-check';
import type { Diagnostic } from '../../src/diagnostics/diagnostic.ts';
import { StudyFailure } from '../../src/diagnostics/diagnostic.ts';
import { isDiagnosticCode } from '../../src/diagnostics/codes.ts';
import { effectiveInputs } from '../../src/study/inputs.ts';
import { parseStudy } from '../../src/study/parse.ts';
import { transpileBlocks, transpileInlines } from '../../src/execute/transpile.ts';
import { type RunProduct, runStudy } from '../../src/pipeline.ts';
import { TEST_ENVIRONMENT, TEST_STYLESHEET } from '../support/studies.ts';
import { saysNonFinite } from '../../src/execute/outputText.ts';
import { SEED_STUDIES } from './seedStudies.ts';

/** Text dropped into a study: fence and front-matter markers, braces, numbers a solver chokes on, awkward unicode. */
export const INSERTIONS = [
  '```',
  '```ts',
  '```ts no-run',
  '~~~ts',
  '---',
  '{{',
  '}}',
  '{{ }}',
  '{{ nothing }}',
  '{',
  '}',
  '(',
  ')',
  ';',
  ':',
  '"',
  "'",
  '`',
  'NaN',
  'Infinity',
  '-Infinity',
  '1e308',
  '-1e309',
  '0 / 0',
  '9'.repeat(400),
  '-0',
  '\u202e',
  '\ufeff',
  '\u00a0',
  '\u2028',
  '💥',
  'Ω',
  '\t',
  '\\',
  '\r',
  'value:',
  '  - x',
  'inputs:',
  'limits: { blockSeconds: 0 }',
  '__proto__:',
  'constructor',
  'result("x", 1);',
  'const inputs = 1;',
] as const;

export type Mutation =
  | { kind: 'delete-line'; at: number }
  | { kind: 'duplicate-line'; at: number }
  | { kind: 'swap-lines'; at: number; other: number }
  | { kind: 'flip-character'; at: number; replacement: string }
  | { kind: 'truncate'; at: number }
  | { kind: 'insert'; at: number; text: string }
  | { kind: 'damage-front-matter'; at: number; damage: 'drop-colon' | 'indent' | 'unindent' | 'quote' };

const position = fc.nat({ max: 1_000_000 });

export const mutationArbitrary: fc.Arbitrary<Mutation> = fc.oneof(
  fc.record({ kind: fc.constant('delete-line' as const), at: position }),
  fc.record({ kind: fc.constant('duplicate-line' as const), at: position }),
  fc.record({ kind: fc.constant('swap-lines' as const), at: position, other: position }),
  fc.record({
    kind: fc.constant('flip-character' as const),
    at: position,
    replacement: fc.oneof(fc.constantFrom(...INSERTIONS), fc.string({ minLength: 1, maxLength: 1, unit: 'binary' })),
  }),
  fc.record({ kind: fc.constant('truncate' as const), at: position }),
  fc.record({ kind: fc.constant('insert' as const), at: position, text: fc.constantFrom(...INSERTIONS) }),
  fc.record({
    kind: fc.constant('damage-front-matter' as const),
    at: position,
    damage: fc.constantFrom('drop-colon' as const, 'indent' as const, 'unindent' as const, 'quote' as const),
  }),
);

export interface Mutant {
  seedIndex: number;
  mutations: Mutation[];
}

export const mutantArbitrary: fc.Arbitrary<Mutant> = fc.record({
  seedIndex: fc.nat({ max: SEED_STUDIES.length - 1 }),
  mutations: fc.array(mutationArbitrary, { minLength: 1, maxLength: 4 }),
});

function applyOne(source: string, mutation: Mutation): string {
  const lines = source.split('\n');
  const line = mutation.at % lines.length;
  switch (mutation.kind) {
    case 'delete-line':
      return [...lines.slice(0, line), ...lines.slice(line + 1)].join('\n');
    case 'duplicate-line':
      return [...lines.slice(0, line + 1), ...lines.slice(line)].join('\n');
    case 'swap-lines': {
      const other = mutation.other % lines.length;
      const swapped = [...lines];
      [swapped[line], swapped[other]] = [lines[other]!, lines[line]!];
      return swapped.join('\n');
    }
    case 'flip-character': {
      const at = mutation.at % Math.max(1, source.length);
      return source.slice(0, at) + mutation.replacement + source.slice(at + 1);
    }
    case 'truncate':
      return source.slice(0, mutation.at % Math.max(1, source.length));
    case 'insert': {
      const at = mutation.at % (source.length + 1);
      return source.slice(0, at) + mutation.text + source.slice(at);
    }
    case 'damage-front-matter': {
      const closing = lines.indexOf('---', 1);
      if (closing < 2) return source;
      const target = 1 + (mutation.at % (closing - 1));
      const text = lines[target]!;
      const damaged = {
        'drop-colon': text.replace(':', ''),
        indent: `   ${text}`,
        unindent: text.trimStart(),
        quote: text.replace(':', ': "'),
      }[mutation.damage];
      return [...lines.slice(0, target), damaged, ...lines.slice(target + 1)].join('\n');
    }
  }
}

/** The study a mutant stands for. NUL characters are left out: the command line refuses them before any stage sees them. */
export function mutantSource(mutant: Mutant): string {
  return mutant.mutations.reduce(applyOne, SEED_STUDIES[mutant.seedIndex]!).replaceAll('\u0000', '');
}

export type Verdict = { outcome: 'ok' } | { outcome: 'failed'; codes: string[] };

const STACK_FRAME = /\n\s+at \S|node:internal|node_modules\/|\/src\/[a-z]+\//;

/** Why a diagnostic is not one a study author can act on, or undefined when it is. */
export function diagnosticFlaw(diagnostic: Diagnostic, source: string): string | undefined {
  if (typeof diagnostic.code !== 'string' || !isDiagnosticCode(diagnostic.code) || diagnostic.code === 'internal') return `code "${diagnostic.code}"`;
  if (typeof diagnostic.message !== 'string' || diagnostic.message.trim() === '') return 'no message';
  for (const text of [diagnostic.message, diagnostic.hint ?? '']) {
    if (STACK_FRAME.test(text)) return `internal detail in "${text.slice(0, 200)}"`;
  }
  // Every problem a study run finds lies in the study, so every one must say where.
  if (!diagnostic.at) return 'no location';
  const lineCount = source.split('\n').length;
  if (!Number.isInteger(diagnostic.at.line) || diagnostic.at.line < 1 || diagnostic.at.line > lineCount + 1)
    return `line ${diagnostic.at.line} outside 1..${lineCount}`;
  if (diagnostic.at.column !== undefined && (!Number.isInteger(diagnostic.at.column) || diagnostic.at.column < 1))
    return `column ${diagnostic.at.column}`;
  return undefined;
}

/** Runs a stage, classifying its end; anything but success or a well-formed StudyFailure is thrown as a finding. */
export async function judge(source: string, stage: () => unknown): Promise<Verdict> {
  try {
    await stage();
    return { outcome: 'ok' };
  } catch (error) {
    if (!(error instanceof StudyFailure)) {
      throw new Error(`a stage threw ${(error as Error)?.name ?? typeof error} instead of a StudyFailure: ${(error as Error)?.message}`, {
        cause: error,
      });
    }
    if (error.diagnostics.length === 0) throw new Error('a StudyFailure without diagnostics');
    for (const diagnostic of error.diagnostics) {
      const flaw = diagnosticFlaw(diagnostic, source);
      if (flaw) throw new Error(`diagnostic [${diagnostic.code}] ${diagnostic.message}: ${flaw}`);
    }
    return { outcome: 'failed', codes: error.diagnostics.map((diagnostic) => diagnostic.code) };
  }
}

/** Parse, inputs and transpile: everything before the calculation process, cheap enough for thousands of mutants. */
export function staticStages(file: string, source: string): void {
  const study = parseStudy(file, source);
  effectiveInputs(study.inputs, []);
  transpileBlocks(study);
  transpileInlines(study);
}

/** Every text a run computed (records of every kind, inline values): where a NaN written as text would hide. */
function computedTexts(product: RunProduct): string[] {
  const texts: string[] = [...product.run.outcome.inlineTexts.values()];
  const collect = (value: unknown): void => {
    if (typeof value === 'string') texts.push(value);
    else if (Array.isArray(value)) value.forEach(collect);
    else if (typeof value === 'object' && value !== null) Object.values(value).forEach(collect);
  };
  for (const block of product.run.outcome.blocks) collect(block.records);
  return texts;
}

/** The whole pipeline on a mutant; a success that wrote NaN or Infinity anywhere in its output is a finding. */
export async function fullStages(file: string, source: string): Promise<RunProduct> {
  const product = await runStudy({ file, source, overrides: [], typecheck: false, environment: TEST_ENVIRONMENT, stylesheet: TEST_STYLESHEET });
  const written = computedTexts(product).find(saysNonFinite);
  if (written !== undefined) throw new Error(`the run succeeded but its output says ${JSON.stringify(written.slice(0, 200))}`);
  return product;
}

/** Mutants that get through the static stages, so that each one exercises the calculation process. */
export function mutantsReachingExecution(seed: number, count: number): Mutant[] {
  const found: Mutant[] = [];
  // About one mutant in seven survives the static stages; the bound only stops a pathological seed from spinning.
  for (let round = 0; found.length < count && round < 100; round++) {
    for (const mutant of fc.sample(mutantArbitrary, { seed: seed + round, numRuns: count * 10 })) {
      if (found.length === count) break;
      try {
        staticStages('mutant.study.md', mutantSource(mutant));
        found.push(mutant);
      } catch {
        // A mutant the static stages refuse is the static test's business.
      }
    }
  }
  return found;
}
