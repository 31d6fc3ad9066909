// The type check of a study's blocks against the block API (src/execute/typecheck.ts).
import { describe, expect, it } from 'vitest';
import { diagnosticsOf, lineOf, runSource, studyText } from '../support/studies.ts';

const fence = (code: string, options = '') => `\`\`\`ts${options ? ` ${options}` : ''}\n${code}\n\`\`\``;

describe('type checking', () => {
  it('locates a type error at its study line and column', async () => {
    const source = studyText({ body: fence('const lengthKm: number = "three hundred";') });
    const [problem] = await diagnosticsOf(runSource(source, { typecheck: true }));
    expect(problem?.code).toBe('type-2322');
    expect(problem?.at).toEqual({ file: 'test.study.md', line: lineOf(source, 'three hundred'), column: 7 });
  });

  it('knows the declared inputs and nothing else', async () => {
    const source = studyText({ inputs: '  lineLength: 320 km', body: fence('const a = inputs.lineLength.in("km");\nconst b = inputs.lineLenght;') });
    const [problem] = await diagnosticsOf(runSource(source, { typecheck: true }));
    expect(problem?.at?.line).toBe(lineOf(source, 'lineLenght'));
  });

  it('accepts a well-typed study', async () => {
    const source = studyText({
      inputs: '  lineLength: 320 km',
      body: fence('const a = inputs.lineLength.in("km");\nresult("a", a, { unit: "km" });'),
    });
    expect((await runSource(source, { typecheck: true })).results.results).toHaveLength(1);
  });
});
