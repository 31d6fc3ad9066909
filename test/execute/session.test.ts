// Running blocks and inline values in the calculation process (src/execute/session.ts): order, shared scope, located errors, limits.
import { describe, expect, it } from 'vitest';
import { diagnosticsOf, lineOf, runSource, studyText } from '../support/studies.ts';

const fence = (code: string, options = '') => `\`\`\`ts${options ? ` ${options}` : ''}\n${code}\n\`\`\``;

describe('running calculation blocks', () => {
  it('runs blocks in document order in one shared scope', async () => {
    const source = studyText({
      body: [
        fence('const base = 2;'),
        fence('function doubled(x: number) { return 2 * x; }\nlet counter = base;'),
        fence('counter += 1;\nresult("shared", doubled(base) + counter);'),
      ].join('\n\n'),
    });
    const product = await runSource(source);
    expect(product.results.results.map((r) => [r.name, r.value])).toEqual([['shared', 7]]);
  });

  it('supports top-level await in a block', async () => {
    const source = studyText({ body: fence('const settled = await Promise.resolve(42);\nresult("awaited", settled);') });
    expect((await runSource(source)).results.results[0]?.value).toBe(42);
  });

  it('skips a no-run block', async () => {
    const source = studyText({ body: [fence('throw new Error("must not run");', 'no-run'), fence('result("ran", 1);')].join('\n\n') });
    expect((await runSource(source)).results.results.map((r) => r.name)).toEqual(['ran']);
  });

  it('refuses to reassign a constant from an earlier block, at the assigning line', async () => {
    const source = studyText({ body: [fence('const limit = 1;'), fence('// later\nlimit = 2;')].join('\n\n') });
    const [problem] = await diagnosticsOf(runSource(source));
    expect(problem?.message).toContain('"limit" is a constant');
    expect(problem?.at?.line).toBe(lineOf(source, 'limit = 2'));
  });

  it('refuses to declare the same name in two blocks, naming the first', async () => {
    const source = studyText({ body: [fence('const x = 1;'), fence('const x = 2;')].join('\n\n') });
    const [problem] = await diagnosticsOf(runSource(source));
    expect(problem).toMatchObject({ code: 'block-redeclared' });
    expect(problem?.message).toContain(`line ${lineOf(source, 'const x = 1') - 1}`);
  });

  it('refuses an import in a block, pointing at it', async () => {
    const source = studyText({ body: fence('import fs from "node:fs";\nresult("x", fs.readFileSync("a").length);') });
    const [problem] = await diagnosticsOf(runSource(source));
    expect(problem).toMatchObject({ code: 'block-module-syntax', at: { line: lineOf(source, 'import fs') } });
  });

  it('locates a thrown error at the study line and column where the error was raised', async () => {
    const source = studyText({ body: fence('const ok = 1;\nconst values = [1, 2];\n    throw new Error("boom at four");') });
    const [problem] = await diagnosticsOf(runSource(source));
    expect(problem?.message).toBe('boom at four');
    // V8 places an error where it is constructed: the `new` of `new Error`, column 11 here.
    expect(problem?.at).toEqual({ file: 'test.study.md', line: lineOf(source, 'boom at four'), column: 11 });
  });

  it('never shows kvarbook internals in a located error', async () => {
    const source = studyText({ body: fence('const n: any = undefined;\nn.deeper.value;') });
    const [problem] = await diagnosticsOf(runSource(source));
    expect(problem?.at?.line).toBe(lineOf(source, 'n.deeper'));
    expect(JSON.stringify(problem)).not.toMatch(/src\/execute|node:internal|calculation-child/);
  });

  it('reports a syntax error at its study line', async () => {
    const source = studyText({ body: fence('const a = 1;\nconst b = (2 + ;') });
    const [problem] = await diagnosticsOf(runSource(source));
    expect(problem).toMatchObject({ code: 'block-syntax', at: { line: lineOf(source, 'const b') } });
  });

  it('stops a synchronous endless loop at the block time limit, naming the block', async () => {
    const source = studyText({ frontMatter: 'limits: { blockSeconds: 0.5 }', body: fence('while (true) {}') });
    const [problem] = await diagnosticsOf(runSource(source));
    expect(problem?.code).toBe('time-limit');
    expect(problem?.at?.line).toBe(lineOf(source, '```ts'));
  });

  it('stops a block that never settles after an await', async () => {
    const source = studyText({ frontMatter: 'limits: { blockSeconds: 0.5 }', body: fence('await new Promise(() => {});') });
    const [problem] = await diagnosticsOf(runSource(source));
    expect(problem?.code).toBe('time-limit');
    expect(problem?.at?.line).toBe(lineOf(source, '```ts'));
  });
});

describe('inline values', () => {
  it('splices a value computed by the blocks above into the prose, with its unit', async () => {
    const source = studyText({
      body: `${fence('const chargingMvar = 123.456;')}\n\nCharging is {{ figure(chargingMvar, 'Mvar', 3) }} and twice {{ chargingMvar * 2 }}.`,
    });
    const product = await runSource(source);
    expect([...product.run.outcome.inlineTexts.values()]).toEqual(['123 Mvar', '246.9']);
    expect(product.report.body).toContain('<span class="value">123 Mvar</span>');
  });

  it('refuses an inline value that refers to a name no block above defines', async () => {
    const source = studyText({ body: `Too early: {{ later }}.\n\n${fence('const later = 1;')}` });
    const [problem] = await diagnosticsOf(runSource(source));
    expect(problem).toMatchObject({ code: 'inline-undefined', at: { line: lineOf(source, 'Too early') } });
  });

  it('refuses a NaN inline value', async () => {
    const source = studyText({ body: `${fence('const zero = 0;')}\n\nRatio {{ zero / zero }}.` });
    const [problem] = await diagnosticsOf(runSource(source));
    expect(problem?.message).toContain('NaN');
  });
});
