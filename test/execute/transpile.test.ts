// Transpiling blocks and inline values (src/execute/transpile.ts): types stripped, each value located at its own line and column.
import { describe, expect, it } from 'vitest';
import { diagnosticsOf, lineOf, runSource, studyText } from '../support/studies.ts';

const fence = (code: string, options = '') => `\`\`\`ts${options ? ` ${options}` : ''}\n${code}\n\`\`\``;

describe('inline values under the type check', () => {
  it('strips the types of every inline value and shows each one', async () => {
    const source = studyText({
      body: `${fence("const lengthKm = 380;\nconst names = ['a', 'b'];")}\n\nLength {{ lengthKm as number }} km, {{ names.length }} names, {{ \`\${lengthKm}\` }}.`,
    });
    expect([...(await runSource(source)).run.outcome.inlineTexts.values()]).toEqual(['380.0', '2.000', '380']);
  });

  it('refuses an inline value that does not parse, at its line and column', async () => {
    const source = studyText({ body: `${fence('const a = 1;')}\n\nGood {{ a }}, broken {{ a + }}.` });
    const [problem] = await diagnosticsOf(runSource(source));
    const line = lineOf(source, 'broken {{');
    expect(problem).toMatchObject({ code: 'inline-syntax', at: { line, column: source.split('\n')[line - 1]!.indexOf('{{ a +') + 1 } });
  });

  it('refuses an inline value that closes its own parenthesis and goes on', async () => {
    const source = studyText({ body: `${fence('const a = 1;')}\n\nShown {{ a); (globalThis as any).marker = (2 }}.` });
    const [problem] = await diagnosticsOf(runSource(source));
    expect(problem).toMatchObject({ code: 'inline-syntax', at: { line: lineOf(source, 'Shown {{') } });
    expect(problem?.message).toContain('not a single expression');
  });

  it('keeps a line comment inside an inline value from swallowing the rest', async () => {
    const source = studyText({ body: `${fence('const a = 1;')}\n\nValue {{ a // the count }} and {{ a + 1 }}.` });
    expect([...(await runSource(source)).run.outcome.inlineTexts.values()]).toEqual(['1.000', '2.000']);
  });
});
