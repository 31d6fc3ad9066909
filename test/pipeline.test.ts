// The run of one study: the calculation child starts before the type check ends and charts are drawn while blocks run, yet a run reports exactly what the stages one after another would.
import { describe, expect, it } from 'vitest';
import { runStudy, type ChartCache } from '../src/pipeline.ts';
import { TEST_ENVIRONMENT, TEST_STYLESHEET, diagnosticsOf, lineOf, runSource, studyText } from './support/studies.ts';

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

describe('a run with a chart cache', () => {
  /** A cache in memory that answers `known` for every specification it was not given. */
  const memoryCache = (known?: string) => {
    const kept = new Map<string, string>();
    const cache: ChartCache = { read: (spec) => kept.get(spec) ?? known, write: (spec, svg) => void kept.set(spec, svg) };
    return { cache, kept };
  };
  const run = (source: string, chartCache: ChartCache) =>
    runStudy({
      file: 'test.study.md',
      source,
      overrides: [],
      typecheck: false,
      environment: TEST_ENVIRONMENT,
      stylesheet: TEST_STYLESHEET,
      chartCache,
    });

  it('keeps each chart it drew, and not one that cannot be drawn', async () => {
    const { cache, kept } = memoryCache();
    await diagnosticsOf(run(studyText({ body: [fence(goodChart), fence(refusedChart)].join('\n\n') }), cache));
    expect([...kept.keys()].map((spec) => JSON.parse(spec).mark)).toEqual(['line']);
    expect([...kept.values()][0]).toMatch(/^<svg/);
  });

  it('puts a chart the cache holds into the report without drawing it', async () => {
    const { cache } = memoryCache('<svg class="from-the-cache"></svg>');
    const product = await run(studyText({ body: fence(goodChart) }), cache);
    expect(product.report.body).toContain('<svg class="from-the-cache"></svg>');
  });
});
