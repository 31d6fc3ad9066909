// Attacks by sheer size: a study cannot make its report (or any one output in it) grow without bound; each refusal
// is located at the call that went over, and the bounds are stated in the report.
import { describe, expect, it } from 'vitest';
import { OUTPUT_LIMITS } from '../../src/execute/limits.ts';
import { formatCount } from '../../src/blocks/format.ts';
import { UNSEALED_NOTICE, assembleReport } from '../../src/report/html.ts';
import { diagnosticsOf, lineOf, runSource, studyText } from '../support/studies.ts';

const fence = (code: string) => `\`\`\`ts\n${code}\n\`\`\``;
const OVER_ONE_TEXT = OUTPUT_LIMITS.textCharacters + 1;

async function refusedAt(source: string, needle: string) {
  const [problem] = await diagnosticsOf(runSource(source));
  expect(problem, JSON.stringify(problem).slice(0, 400)).toMatchObject({ code: 'block-output-limit', at: { line: lineOf(source, needle) } });
  return problem!;
}

describe('no one output is unbounded', () => {
  it('refuses an inline value of twenty million characters, at the inline value', async () => {
    const source = studyText({ body: `${fence("const filler = 'x'.repeat(20_000_000);")}\n\nThe text: {{ filler }}.` });
    const [problem] = await diagnosticsOf(runSource(source));
    expect(problem).toMatchObject({ code: 'inline-output-limit', at: { line: lineOf(source, '{{ filler }}') } });
    expect(problem?.message).toContain(`${formatCount(OUTPUT_LIMITS.textCharacters)} characters`);
  });

  it('refuses a caution of twenty million characters', async () => {
    const problem = await refusedAt(studyText({ body: fence("const filler = 'Caution. '.repeat(2_000_000);\ncaution(filler);") }), 'caution(filler)');
    expect(problem.message).toContain('caution');
  });

  it('refuses a solver call whose arguments, logged in full, would outgrow the report, at the call', async () => {
    const label = `'x'.repeat(${OUTPUT_LIMITS.studyOutputBytes + 1})`;
    const problem = await refusedAt(
      studyText({
        body: fence(
          `const label = ${label};\nsolver.lineModel({ frequencyHz: 50, seriesResistanceOhmPerKm: 0.03, seriesReactanceOhmPerKm: 0.3, shuntSusceptanceUsPerKm: 4, lengthKm: 100, label });`,
        ),
      }),
      'solver.lineModel',
    );
    expect(problem.message).toContain('every solver call, which the calculation log records in full');
  });

  it('refuses a result name longer than a name', async () => {
    await refusedAt(studyText({ body: fence(`result('${'n'.repeat(OUTPUT_LIMITS.nameCharacters + 1)}', 1);`) }), "result('nnn");
  });

  it('refuses a result note over the text limit', async () => {
    await refusedAt(studyText({ body: fence(`const note = 'x'.repeat(${OVER_ONE_TEXT});\nresult('r', 1, { note });`) }), "result('r'");
  });

  it('refuses a text result value over the text limit', async () => {
    await refusedAt(studyText({ body: fence(`const long = 'x'.repeat(${OVER_ONE_TEXT});\nresult('r', long);`) }), "result('r'");
  });

  it('refuses a table of more cells than a report table holds', async () => {
    const problem = await refusedAt(
      studyText({
        body: fence(
          `const rows = Array.from({ length: ${OUTPUT_LIMITS.tableCells / 2 + 1} }, (_, index) => ({ a: index, b: index }));\ntable(rows, { caption: 'huge' });`,
        ),
      }),
      'table(rows',
    );
    expect(problem.message).toContain(`at most ${formatCount(OUTPUT_LIMITS.tableCells)}`);
  });

  it('refuses a table cell over the text limit', async () => {
    await refusedAt(studyText({ body: fence(`const long = 'x'.repeat(${OVER_ONE_TEXT});\ntable([{ a: long }]);`) }), 'table([{ a: long }])');
  });

  it('refuses a printed line over the text limit', async () => {
    await refusedAt(studyText({ body: fence(`const long = 'x'.repeat(${OVER_ONE_TEXT});\nconsole.log(long);`) }), 'console.log(long)');
  });

  it('refuses a chart caption over the text limit', async () => {
    const spec = "{ data: { values: [{ x: 1 }] }, mark: 'point', encoding: { x: { field: 'x', type: 'quantitative' } } }";
    await refusedAt(studyText({ body: fence(`chart(${spec}, { caption: 'c'.repeat(${OVER_ONE_TEXT}) });`) }), 'chart(');
  });

  it('refuses a chart specification over its size limit', async () => {
    const spec = `{ data: { values: [{ x: 1, note: 'x'.repeat(${OUTPUT_LIMITS.chartSpecCharacters}) }] }, mark: 'point', encoding: { x: { field: 'x', type: 'quantitative' } } }`;
    await refusedAt(studyText({ body: fence(`chart(${spec}, { caption: 'big' });`) }), 'chart(');
  });
});

describe('the whole of what a study writes is bounded', () => {
  it('refuses printing in a loop once the study has written its allowance, at the printing line', async () => {
    const problem = await refusedAt(
      studyText({ body: fence("const line = 'x'.repeat(9_000);\nfor (let index = 0; index < 10_000; index++) console.log(line);") }),
      'console.log(line)',
    );
    expect(problem.message).toContain(`${OUTPUT_LIMITS.studyOutputBytes / 1024 / 1024} MB`);
  });

  it('refuses many small results once their total passes the allowance', async () => {
    const source = studyText({
      body: fence(`const note = 'x'.repeat(9_000);\nfor (let index = 0; index < 10_000; index++) result('r' + index, index, { note });`),
    });
    await refusedAt(source, "result('r' + index");
  });

  it('refuses a report larger than a report may be, pointing at the block that wrote most', async () => {
    const printing = "const line = 'x'.repeat(9_000);\nfor (let index = 0; index < 3_300; index++) console.log(line);";
    // Prose of angle brackets grows fourfold in the body and sixfold in the source the report carries.
    const source = studyText({ body: `${fence(printing)}\n\n${'<'.repeat(8_000_000)}\n` });
    const [problem] = await diagnosticsOf(runSource(source));
    expect(problem).toMatchObject({ code: 'report-too-large', at: { line: lineOf(source, '```ts') } });
    expect(problem?.message).toContain(`at most ${OUTPUT_LIMITS.reportBytes / 1024 / 1024} MB`);
  });

  it('states the output limits in the provenance of every report', async () => {
    const product = await runSource(studyText({ body: fence("result('one', 1);") }));
    const html = assembleReport(product.report, UNSEALED_NOTICE);
    const provenance = html.slice(html.indexOf('id="provenance"'));
    expect(provenance).toContain(`${formatCount(OUTPUT_LIMITS.textCharacters)} characters per text`);
    expect(provenance).toContain(`${OUTPUT_LIMITS.studyOutputBytes / 1024 / 1024} MB of output in all`);
    expect(provenance).toContain(`report at most ${OUTPUT_LIMITS.reportBytes / 1024 / 1024} MB`);
  });
});
