import { describe, expect, it } from 'vitest';
import { parseStudy } from '../../src/study/parse.ts';
import { diagnosticsOf, lineOf, studyText } from '../support/studies.ts';

describe('parsing a study', () => {
  it('reads the metadata from the front matter', () => {
    const study = parseStudy('s.study.md', studyText({ frontMatter: 'checker: { name: Second Person }', body: '# Body' }));
    expect(study.meta).toMatchObject({
      title: 'Test study',
      id: 'TEST-1',
      revision: 1,
      date: '2026-11-20',
      engineer: { name: 'Test Engineer', licence: 'T-0' },
      checker: { name: 'Second Person' },
    });
  });

  it('refuses a file without front matter, at line 1', async () => {
    const [problem] = await diagnosticsOf(() => parseStudy('s.study.md', '# Just prose\n'));
    expect(problem).toMatchObject({ code: 'front-matter-missing', at: { file: 's.study.md', line: 1 } });
  });

  it('locates invalid YAML at its study line', async () => {
    const source = studyText({ frontMatter: 'limits: { blockSeconds: 5', body: '' });
    const [problem] = await diagnosticsOf(() => parseStudy('s.study.md', source));
    expect(problem?.code).toBe('front-matter-yaml');
    expect(problem?.at?.line).toBeGreaterThanOrEqual(lineOf(source, 'limits:'));
  });

  it('gives one error for one YAML mistake', async () => {
    const source = studyText({ inputs: '  lineLength: { value: "320 km, description: Route length }', body: '' });
    const problems = await diagnosticsOf(() => parseStudy('s.study.md', source));
    expect(problems).toHaveLength(1);
    expect(problems[0]).toMatchObject({ code: 'front-matter-yaml', at: { line: lineOf(source, 'lineLength:') } });
  });

  it('names an unquoted comma in a number inside { } as the cause, in one error spanning the value', async () => {
    const source = studyText({ inputs: '  peak: { value: 1,000 MW, quantity: active power }', body: '' });
    const problems = await diagnosticsOf(() => parseStudy('s.study.md', source));
    expect(problems).toHaveLength(1);
    const line = source.split('\n')[lineOf(source, 'peak:') - 1]!;
    expect(problems[0]).toMatchObject({
      code: 'front-matter-flow-comma',
      at: { line: lineOf(source, 'peak:'), column: line.indexOf('1,000') + 1, endColumn: line.indexOf(', quantity') + 1 },
    });
    expect(problems[0]?.message).toContain('"1,000 MW"');
    expect(problems[0]?.hint).toContain('value: "1,000 MW"');
    expect(problems[0]?.hint).toContain('1000 MW');
  });

  it('gives one error for a value cut by several commas', async () => {
    const source = studyText({ inputs: '  peak: { value: 1,000,000 kW, quantity: active power }', body: '' });
    const problems = await diagnosticsOf(() => parseStudy('s.study.md', source));
    expect(problems).toHaveLength(1);
    expect(problems[0]?.hint).toContain('value: "1,000,000 kW" (or write the number without the separator: 1000000 kW)');
  });

  it('names an unquoted comma in a text inside { } as the cause', async () => {
    const source = studyText({ inputs: '  peak: { value: 100 MW, description: Winter peak, radial }', body: '' });
    const problems = await diagnosticsOf(() => parseStudy('s.study.md', source));
    expect(problems).toHaveLength(1);
    expect(problems[0]?.code).toBe('front-matter-flow-comma');
    expect(problems[0]?.hint).toContain('description: "Winter peak, radial"');
  });

  it('names a misspelt front-matter key and where it is', async () => {
    const source = studyText({ frontMatter: 'revison: 2', body: '' });
    const [problem] = await diagnosticsOf(() => parseStudy('s.study.md', source));
    expect(problem).toMatchObject({ code: 'front-matter-unknown-key', at: { line: lineOf(source, 'revison') } });
    expect(problem?.message).toContain('revison');
  });

  it('refuses a date that is not a calendar date', async () => {
    const source = studyText({ body: '' }).replace('2026-11-20', '2026-02-30');
    const [problem] = await diagnosticsOf(() => parseStudy('s.study.md', source));
    expect(problem).toMatchObject({ code: 'front-matter-date', at: { line: lineOf(source, 'date:') } });
  });

  it('collects ts blocks in order with their options and first code line', () => {
    const source = studyText({
      body: [
        '```ts',
        'const a = 1;',
        '```',
        '',
        '```python',
        'x = 1',
        '```',
        '',
        '```ts hide-code',
        'const b = 2;',
        '```',
        '```ts no-run',
        'never();',
        '```',
      ].join('\n'),
    });
    const study = parseStudy('s.study.md', source);
    expect(study.blocks.map((block) => [block.firstCodeLine, block.options])).toEqual([
      [lineOf(source, 'const a'), { hideCode: false, noRun: false }],
      [lineOf(source, 'const b'), { hideCode: true, noRun: false }],
      [lineOf(source, 'never()'), { hideCode: false, noRun: true }],
    ]);
  });

  it('runs a block fenced as typescript like one fenced as ts, options and all', () => {
    const source = studyText({ body: '```typescript\nconst a = 1;\n```\n\n```TypeScript hide-code\nconst b = 2;\n```\n' });
    const study = parseStudy('s.study.md', source);
    expect(study.blocks.map((block) => [block.firstCodeLine, block.options])).toEqual([
      [lineOf(source, 'const a'), { hideCode: false, noRun: false }],
      [lineOf(source, 'const b'), { hideCode: true, noRun: false }],
    ]);
  });

  it('refuses an unknown block option, naming the allowed ones', async () => {
    const source = studyText({ body: '```ts hidden\nconst a = 1;\n```' });
    const [problem] = await diagnosticsOf(() => parseStudy('s.study.md', source));
    expect(problem).toMatchObject({ code: 'block-option-unknown', at: { line: lineOf(source, '```ts hidden') } });
    expect(problem?.hint).toContain('hide-code');
  });

  it('refuses a calculation block that is never closed', async () => {
    const source = studyText({ body: 'Text.\n\n```ts\nconst a = 1;\n' });
    const [problem] = await diagnosticsOf(() => parseStudy('s.study.md', source));
    expect(problem).toMatchObject({ code: 'fence-unclosed', at: { line: lineOf(source, '```ts') } });
  });

  it('places each inline value after the blocks above it, with its line', () => {
    const source = studyText({ body: 'Before {{ 1 + 1 }}.\n\n```ts\nconst a = 1;\n```\n\nAfter *{{ a * 2 }}*.' });
    const study = parseStudy('s.study.md', source);
    expect(study.inlines).toEqual([
      { id: 0, expression: '1 + 1', at: { file: 's.study.md', line: lineOf(source, 'Before'), column: 8 }, afterRunnableBlocks: 0 },
      { id: 1, expression: 'a * 2', at: { file: 's.study.md', line: lineOf(source, 'After'), column: 8 }, afterRunnableBlocks: 1 },
    ]);
  });
});
