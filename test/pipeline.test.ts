// The run of one study: the calculation child starts before the type check ends and charts are drawn while blocks run, yet a run reports exactly what the stages one after another would.
import { describe, expect, it } from 'vitest';
import { diagnosticsOf, lineOf, runSource, studyText } from './support/studies.ts';

const fence = (...lines: string[]) => ['```ts', ...lines, '```'].join('\n');
const points = '[{ x: 1, y: 2 }, { x: 2, y: 3 }]';
const goodChart = `chart({ data: { values: ${points} }, mark: 'line', encoding: { x: { field: 'x', type: 'quantitative' }, y: { field: 'y', type: 'quantitative' } } }, { caption: 'Good' });`;
const refusedChart = `chart({ data: { values: ${points} }, mark: 'line', encoding: { x: { field: 'x', type: 'quantitative' } }, transform: [{ calculate: '1', as: 'z' }] } as any, { caption: 'Refused' });`;

describe('a run whose stages overlap', () => {
  it('reports the type check, not a block that fails, when a study has both wrong', async () => {
    const source = studyText({ body: fence("const length: number = 'long';", "throw new Error('block fails');") });
    const problems = await diagnosticsOf(runSource(source, { typecheck: true }));
    expect(problems.map((problem) => problem.code)).toEqual(['type-2322']);
  });

  it('reports a failing block, not a chart above it that cannot be drawn', async () => {
    const source = studyText({ body: [fence(refusedChart), fence("throw new Error('later block fails');")].join('\n\n') });
    const problems = await diagnosticsOf(runSource(source));
    expect(problems).toMatchObject([{ code: 'block-threw', at: { line: lineOf(source, 'later block fails') } }]);
  });

  it('reports every chart that cannot be drawn at its chart() call, in study order, once all blocks are done', async () => {
    const source = studyText({ body: [fence(refusedChart), fence(goodChart), fence(refusedChart.replace('Refused', 'Refused too'))].join('\n\n') });
    const problems = await diagnosticsOf(runSource(source));
    const chartLines = source.split('\n').flatMap((line, index) => (line.includes("caption: 'Refused") ? [index + 1] : []));
    expect(problems.map((problem) => [problem.code, problem.at?.line])).toEqual(chartLines.map((line) => ['chart-spec', line]));
  });

  it('draws every chart of a study into its report', async () => {
    const source = studyText({ body: [fence(goodChart), fence("result('after', 1);"), fence(goodChart.replace('Good', 'Also good'))].join('\n\n') });
    const product = await runSource(source);
    expect(product.report.body.match(/<svg/g)).toHaveLength(2);
  });
});
