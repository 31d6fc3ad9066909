// Attacks through chart specifications, which are drawn outside the sandbox: only the Vega-Lite features the chart
// builders need are drawn, and the drawing itself runs in a worker that a deadline and a heap limit bound.
import { describe, expect, it } from 'vitest';
import { diagnosticsOf, lineOf, runSource, studyText } from '../support/studies.ts';

const rows = JSON.stringify([
  { distanceKm: 0, voltagePu: 1, label: `${'a'.repeat(40)}!` },
  { distanceKm: 100, voltagePu: 1.04, label: 'b' },
]);
const encoding = "{ x: { field: 'distanceKm', type: 'quantitative' }, y: { field: 'voltagePu', type: 'quantitative' } }";

/** A study whose one block draws `spec` (TypeScript text); the chart() call is on its own line. */
function chartStudy(spec: string): string {
  return studyText({ body: ['```ts', `const spec: any = ${spec};`, "chart(spec, { caption: 'Attack' });", '```'].join('\n') });
}

async function refusedAtChart(spec: string, path: string) {
  const source = chartStudy(spec);
  const [problem] = await diagnosticsOf(runSource(source));
  expect(problem, JSON.stringify(problem)).toMatchObject({ code: 'chart-spec', at: { line: lineOf(source, 'chart(spec') } });
  expect(problem?.message).toContain(`at ${path}:`);
  expect(problem?.message).toMatch(/feature reports do not draw|more data than a report chart draws/);
  return problem!;
}

describe('a chart cannot make the host work without end', () => {
  it('refuses a regular expression that backtracks without end', async () => {
    await refusedAtChart(
      `{ data: { values: ${rows} }, mark: 'point', encoding: ${encoding}, transform: [{ filter: "test(/^(a+)+$/, datum.label)" }] }`,
      'transform.0.filter',
    );
  });

  it('refuses an expression that builds a huge sequence', async () => {
    await refusedAtChart(
      `{ data: { values: ${rows} }, mark: 'point', encoding: ${encoding}, transform: [{ calculate: 'length(sequence(0, 1e9))', as: 'n' }] }`,
      'transform.0.calculate',
    );
  });

  it('refuses a signal expression that runs on every update', async () => {
    await refusedAtChart(
      `{ data: { values: ${rows} }, mark: 'point', encoding: ${encoding}, params: [{ name: 'spin', expr: 'pad("", 1e9)' }] }`,
      'params',
    );
  });

  it('refuses a generated sequence of data rows', async () => {
    await refusedAtChart(
      `{ data: { sequence: { start: 0, stop: 1e9 } }, mark: 'point', encoding: { x: { field: 'data', type: 'quantitative' } } }`,
      'data.sequence',
    );
  });

  it('refuses a flatten transform, which multiplies rows', async () => {
    await refusedAtChart(
      `{ data: { values: ${rows} }, mark: 'point', encoding: ${encoding}, transform: [{ flatten: ['label'] }] }`,
      'transform.0.flatten',
    );
  });

  it('refuses data rows holding lists, which a flatten would multiply', async () => {
    await refusedAtChart(
      `{ data: { values: [{ list: Array.from({ length: 1000 }, (_, index) => index) }] }, mark: 'point', encoding: { x: { field: 'list', type: 'quantitative' } } }`,
      'data.values.0.list',
    );
  });

  it('refuses a fold transform', async () => {
    await refusedAtChart(
      `{ data: { values: ${rows} }, mark: 'point', encoding: ${encoding}, transform: [{ fold: ['distanceKm', 'voltagePu'] }] }`,
      'transform.0.fold',
    );
  });

  it('refuses more data rows than a report chart draws', async () => {
    await refusedAtChart(
      `{ data: { values: Array.from({ length: 20_001 }, (_, index) => ({ distanceKm: index, voltagePu: 1 })) }, mark: 'point', encoding: ${encoding} }`,
      'data.values',
    );
  });
});

describe('a chart cannot crash the host or reach out of the report', () => {
  it('refuses an href channel, which crashed the host while writing the SVG', async () => {
    await refusedAtChart(
      `{ data: { values: ${rows} }, mark: 'point', encoding: { ...${encoding}, href: { field: 'label', type: 'nominal' } } }`,
      'encoding.href',
    );
  });

  it('refuses a url channel', async () => {
    await refusedAtChart(
      `{ data: { values: ${rows} }, mark: 'point', encoding: { ...${encoding}, url: { value: 'https://tracker.invalid/pixel.png' } } }`,
      'encoding.url',
    );
  });

  it('refuses an image mark', async () => {
    await refusedAtChart(`{ data: { values: ${rows} }, mark: 'image', encoding: ${encoding} }`, 'mark');
  });

  it('refuses a fill that points to an outside resource', async () => {
    await refusedAtChart(
      `{ data: { values: ${rows} }, mark: { type: 'point', fill: 'url(https://tracker.invalid/#g)' }, encoding: ${encoding} }`,
      'mark.fill',
    );
  });

  it('refuses an axis label expression', async () => {
    await refusedAtChart(
      `{ data: { values: ${rows} }, mark: 'point', encoding: { x: { field: 'distanceKm', type: 'quantitative', axis: { labelExpr: 'datum.label' } }, y: { field: 'voltagePu', type: 'quantitative' } } }`,
      'encoding.x.axis.labelExpr',
    );
  });
});

describe('charts the builders draw', () => {
  it('are drawn as before', async () => {
    const source = studyText({
      body: [
        '```ts',
        "chart(charts.voltageProfileChart({ cases: [{ label: 'open end', points: [{ distanceKm: 0, voltagePu: 1 }, { distanceKm: 300, voltagePu: 1.08 }] }], bandPu: { min: 0.95, max: 1.05 } }), { caption: 'Profile' });",
        "chart(charts.loadabilityChart({ points: [{ lengthKm: 100, multipleOfSil: 3 }, { lengthKm: 400, multipleOfSil: 1.2 }], thermalLimitSil: 3 }), { caption: 'Loadability' });",
        '```',
      ].join('\n'),
    });
    const product = await runSource(source);
    expect(product.report.body.match(/<svg /g)).toHaveLength(2);
  });
});
