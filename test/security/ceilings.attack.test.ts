// Attacks on the checker's time and memory: a study may ask for long limits, but the checker's ceilings bound them;
// the host's own stages (transpile, type check) stay bounded whatever the study's size or types.
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { DEFAULT_CEILINGS } from '../../src/execute/limits.ts';
import { typecheckStudy } from '../../src/execute/typecheck.ts';
import { transpileBlocks } from '../../src/execute/transpile.ts';
import { parseStudy } from '../../src/study/parse.ts';
import { runStudy } from '../../src/pipeline.ts';
import { UNSEALED_NOTICE, assembleReport } from '../../src/report/html.ts';
import { kvarbook, scratchFolder } from '../support/cli.ts';
import { TEST_ENVIRONMENT, TEST_STYLESHEET, diagnosticsOf, lineOf, studyText } from '../support/studies.ts';

const fence = (code: string) => `\`\`\`ts\n${code}\n\`\`\``;
const GREEDY = 'limits: { blockSeconds: 3600, studySeconds: 36000, heapMb: 16384 }';

describe("the checker's ceilings bound what a study asks for", () => {
  it('stops a block that asked for an hour at the ceiling for one block', async () => {
    const source = studyText({ frontMatter: GREEDY, body: fence('for (;;) {}') });
    const [problem] = await diagnosticsOf(
      runStudy({
        file: 'greedy.study.md',
        source,
        overrides: [],
        typecheck: false,
        environment: TEST_ENVIRONMENT,
        stylesheet: TEST_STYLESHEET,
        ceilings: { ...DEFAULT_CEILINGS, blockSeconds: 1 },
      }),
    );
    expect(problem).toMatchObject({ code: 'time-limit', at: { line: lineOf(source, '```ts') } });
    expect(problem?.message).toContain('1 s per block');
    expect(problem?.hint).toContain('--ceiling-block-seconds');
    expect(problem?.hint).toContain('3600');
  });

  it('starts the calculation process with the heap ceiling, not the 16 GB the study asks for', async () => {
    const source = studyText({
      frontMatter: GREEDY,
      body: fence('const hoard: number[][] = [];\nwhile (true) hoard.push(new Array(100_000).fill(1.5));'),
    });
    const [problem] = await diagnosticsOf(
      runStudy({
        file: 'greedy.study.md',
        source,
        overrides: [],
        typecheck: false,
        environment: TEST_ENVIRONMENT,
        stylesheet: TEST_STYLESHEET,
        ceilings: { ...DEFAULT_CEILINGS, heapMb: 64, blockSeconds: 30 },
      }),
    );
    expect(problem?.code).toBe('memory-limit');
    expect(problem?.message).toContain('64 MB heap');
  });

  it('applies default ceilings when the caller names none', async () => {
    const source = studyText({ frontMatter: GREEDY, body: fence("result('one', 1);") });
    const product = await runStudy({
      file: 'greedy.study.md',
      source,
      overrides: [],
      typecheck: false,
      environment: TEST_ENVIRONMENT,
      stylesheet: TEST_STYLESHEET,
    });
    expect(product.run.provenance.limits).toEqual(DEFAULT_CEILINGS);
  });

  it('states in the report that the ceilings capped what the study asked for', async () => {
    const source = studyText({ frontMatter: GREEDY, body: fence("result('one', 1);") });
    const product = await runStudy({
      file: 'greedy.study.md',
      source,
      overrides: [],
      typecheck: false,
      environment: TEST_ENVIRONMENT,
      stylesheet: TEST_STYLESHEET,
    });
    const html = assembleReport(product.report, UNSEALED_NOTICE);
    expect(html.slice(html.indexOf('id="provenance"'))).toContain(
      `${DEFAULT_CEILINGS.blockSeconds} s per block, ${DEFAULT_CEILINGS.studySeconds} s per study, ${DEFAULT_CEILINGS.heapMb} MB heap (capped by the ceilings of the run: the study asks 3600 s per block, 36000 s per study, 16384 MB heap)`,
    );
  });

  it('leaves a study within the ceilings as it asked, and says nothing of ceilings', async () => {
    const source = studyText({ frontMatter: 'limits: { blockSeconds: 5, studySeconds: 30, heapMb: 256 }', body: fence("result('one', 1);") });
    const product = await runStudy({
      file: 'modest.study.md',
      source,
      overrides: [],
      typecheck: false,
      environment: TEST_ENVIRONMENT,
      stylesheet: TEST_STYLESHEET,
    });
    expect(product.run.provenance.limits).toEqual({ blockSeconds: 5, studySeconds: 30, heapMb: 256 });
    expect(product.report.body).not.toContain('capped');
  });

  it('takes the ceilings from the command line of run and check', () => {
    const folder = scratchFolder('kvarbook-ceiling-');
    writeFileSync(join(folder, 'greedy.study.md'), studyText({ frontMatter: GREEDY, body: fence('for (;;) {}') }));
    const run = kvarbook(['run', 'greedy.study.md', '--no-typecheck', '--ceiling-block-seconds', '1'], folder);
    expect(run.status).toBe(1);
    expect(run.stderr).toContain('[time-limit]');
    expect(run.stderr).toContain('1 s per block');
    const wrong = kvarbook(['run', 'greedy.study.md', '--ceiling-heap-mb', 'lots'], folder);
    expect(wrong.status).toBe(2);
    const check = kvarbook(['check', '--help'], folder);
    expect(check.stdout).toMatch(/--ceiling-block-seconds[\s\S]*--ceiling-study-seconds[\s\S]*--ceiling-heap-mb/);
  });
});

describe("the host's own stages stay bounded", () => {
  it('transpiles a block of 20,000 declarations, each still located at its own line', () => {
    const declarations = Array.from({ length: 20_000 }, (_, index) => `const value${index} = ${index};`);
    const source = studyText({ body: fence(declarations.join('\n')) });
    const [block] = transpileBlocks(parseStudy('big.study.md', source));
    expect(block?.declarations).toHaveLength(20_000);
    expect(block?.script).toContain('(value19999 = 19999);');
  });

  it('stops a type the compiler would expand without end at the type check limits, and the host goes on', async () => {
    const code =
      "type D = '0'|'1'|'2'|'3'|'4'|'5'|'6'|'7'|'8'|'9';\ntype A = `${D}${D}${D}${D}`;\ntype B = { [K in A]: { [J in A]: K } };\nconst x: B[A][A] = 1 as any as number;";
    const source = studyText({ body: fence(code) });
    const [problem] = await diagnosticsOf(typecheckStudy(parseStudy('types.study.md', source), { heapMb: 256, callSeconds: 60 }));
    expect(problem).toMatchObject({ code: 'typecheck-limit', at: { line: lineOf(source, '```ts') } });
    expect(problem?.message).toMatch(/256 MB/);
  });
});
