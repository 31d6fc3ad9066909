// Smaller defects the attack review found on the way: each one reproduced as a study, each one now a located refusal
// or a correct result.
import { describe, expect, it } from 'vitest';
import { parseStudy } from '../../src/study/parse.ts';
import { diagnosticsOf, lineOf, runSource, studyText } from '../support/studies.ts';

const fence = (code: string) => `\`\`\`ts\n${code}\n\`\`\``;

describe('a compound unit in a range bound', () => {
  it('reads "1 km h" as a bound of "5 km h"', () => {
    const study = parseStudy('s.study.md', studyText({ inputs: '  exposure: { value: 5 km h, min: 1 km h }', body: '' }));
    expect(study.inputs[0]).toMatchObject({ given: { value: 5, unit: 'km h' }, min: { value: 1, unit: 'km h' } });
  });

  it('refuses a compound bound of another dimension with a located error, not an internal one', async () => {
    const source = studyText({ inputs: '  seriesR: { value: 0.3 ohm/km, min: 0.1 ohm km }', body: '' });
    const [problem] = await diagnosticsOf(() => parseStudy('s.study.md', source));
    expect(problem).toMatchObject({ code: 'input-unit-mismatch', at: { line: lineOf(source, 'seriesR') } });
  });
});

describe('an inline value inside a table cell', () => {
  const table = ['| Case | Voltage |', '|---|---|', '| light load | {{ lightPu }} |', '| peak load | {{ peakPu }} |'].join('\n');

  it('is evaluated and shown in its cell', async () => {
    const product = await runSource(
      studyText({ body: `${fence("const lightPu = figure(1.04, 'pu');\nconst peakPu = figure(0.97, 'pu');")}\n\n${table}\n` }),
    );
    expect(product.report.body).toContain('<td><span class="value">1.040 pu</span></td>');
    expect(product.report.body).toContain('<td><span class="value">0.9700 pu</span></td>');
  });

  it('is located at its own row when it fails', async () => {
    const source = studyText({ body: `${fence("const lightPu = figure(1.04, 'pu');")}\n\n${table}\n` });
    const [problem] = await diagnosticsOf(runSource(source));
    const line = lineOf(source, '| peak load');
    expect(problem).toMatchObject({ code: 'inline-undefined', at: { line, column: source.split('\n')[line - 1]!.indexOf('{{') + 1 } });
  });
});

describe('two inline values on one line', () => {
  it('are each located at their own column', async () => {
    const source = studyText({ body: `${fence('const known = 1;')}\n\nFirst {{ known }}, then {{ unknownName }}.\n` });
    const [problem] = await diagnosticsOf(runSource(source));
    const line = lineOf(source, 'First {{');
    expect(problem?.at).toEqual({ file: 'test.study.md', line, column: source.split('\n')[line - 1]!.indexOf('{{ unknownName') + 1 });
  });
});

describe('NaN and Infinity never reach a report, not even as text', () => {
  async function refusedNonFinite(code: string, needle: string, expectedCode = 'block-non-finite') {
    const source = studyText({ body: fence(`const ratio = 0 / 0;\nconst growth = 1 / 0;\n${code}`) });
    const [problem] = await diagnosticsOf(runSource(source));
    expect(problem, JSON.stringify(problem)).toMatchObject({ code: expectedCode, at: { line: lineOf(source, needle) } });
    return problem!;
  }

  it('refuses a text result that says NaN', async () => {
    await refusedNonFinite("result('Ratio', `${ratio}`);", "result('Ratio'");
  });

  it('refuses a table cell that says Infinity', async () => {
    await refusedNonFinite("table([{ case: 'open end', gain: String(growth) }]);", 'table([');
  });

  it('refuses a printed line that says NaN', async () => {
    await refusedNonFinite("console.log('ratio is', ratio);", 'console.log');
  });

  it('refuses a caution that says -Infinity', async () => {
    await refusedNonFinite('caution(`The margin is ${-growth} %.`);', 'caution(');
  });

  it('refuses a note that says NaN', async () => {
    await refusedNonFinite("result('Length', 380, { unit: 'km', note: `ratio ${ratio}` });", "result('Length'");
  });

  it('refuses an inline value whose text says NaN, at the inline value', async () => {
    const source = studyText({ body: `${fence('const ratio = 0 / 0;')}\n\nThe ratio is {{ \`\${ratio}\` }}.` });
    const [problem] = await diagnosticsOf(runSource(source));
    expect(problem).toMatchObject({ code: 'inline-non-finite', at: { line: lineOf(source, 'The ratio is') } });
  });

  it('writes a non-finite solver argument in the calculation log in words', async () => {
    const source = studyText({ body: fence('solver.polarForm({ value: { re: 3, im: 4 }, unused: 0 / 0 } as any);') });
    const product = await runSource(source);
    const log = product.report.body.slice(product.report.body.indexOf('id="calculation-log"'));
    expect(log).not.toMatch(/NaN|Infinity/);
    expect(log).toContain('not a finite number');
  });

  it('still allows the words in ordinary text', async () => {
    const product = await runSource(studyText({ body: fence("caution('Nanometre-scale pollution layers are not modelled.');") }));
    expect(product.results.cautions.at(-1)?.text).toContain('Nanometre');
  });
});
