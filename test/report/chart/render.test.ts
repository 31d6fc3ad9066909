import { describe, expect, it } from 'vitest';
import { ChartSpecError, renderChartSvg } from '../../../src/report/chart/render.ts';
import { axisTicks, linePaths, pixelOf, tickSnapPx, texts } from './svg-probe.ts';

const simpleLine = {
  data: {
    values: [
      { distanceKm: 0, voltagePu: 1.0 },
      { distanceKm: 100, voltagePu: 1.02 },
      { distanceKm: 200, voltagePu: 1.05 },
    ],
  },
  mark: 'line',
  encoding: {
    x: { field: 'distanceKm', type: 'quantitative', title: 'Distance (km)' },
    y: { field: 'voltagePu', type: 'quantitative', title: 'Voltage (pu)', scale: { zero: false } },
  },
};

async function specError(spec: unknown): Promise<ChartSpecError> {
  const error = await renderChartSvg(spec).then(
    () => undefined,
    (thrown: unknown) => thrown,
  );
  if (!(error instanceof ChartSpecError)) throw new Error(`expected ChartSpecError, got ${String(error)}`);
  return error;
}

describe('renderChartSvg', () => {
  it('produces a standalone SVG document', async () => {
    const svg = await renderChartSvg(simpleLine);
    expect(svg.startsWith('<svg xmlns="http://www.w3.org/2000/svg"')).toBe(true);
    expect(svg.trimEnd().endsWith('</svg>')).toBe(true);
  });

  it('writes the axis titles, units included', async () => {
    const svg = await renderChartSvg(simpleLine);
    expect(texts(svg)).toEqual(expect.arrayContaining(['Distance (km)', 'Voltage (pu)']));
  });

  it('places each data point where the axis ticks say its value is', async () => {
    const svg = await renderChartSvg(simpleLine);
    const [line] = linePaths(svg);
    const xTicks = axisTicks(svg, 'X');
    const yTicks = axisTicks(svg, 'Y');
    expect(line?.vertices).toHaveLength(3);
    simpleLine.data.values.forEach((point, index) => {
      const [xPixel, yPixel] = line?.vertices[index] ?? [Number.NaN, Number.NaN];
      expect(Math.abs(xPixel - pixelOf(xTicks, point.distanceKm))).toBeLessThanOrEqual(tickSnapPx);
      expect(Math.abs(yPixel - pixelOf(yTicks, point.voltagePu))).toBeLessThanOrEqual(tickSnapPx);
    });
  });

  it('gives byte-identical SVG for the same spec, also when renders overlap', async () => {
    const withClip = { ...simpleLine, mark: { type: 'line', clip: true } };
    const sequential = await renderChartSvg(withClip);
    const [first, second] = await Promise.all([renderChartSvg(withClip), renderChartSvg(withClip)]);
    expect(sequential).toContain('clip-path');
    expect(first).toBe(sequential);
    expect(second).toBe(sequential);
  });

  it('names the chart font stack in the SVG instead of a machine-dependent default', async () => {
    const svg = await renderChartSvg(simpleLine);
    expect(svg).toContain('font-family="&quot;Liberation Sans&quot;');
  });

  it('sizes the plot from widthPx and heightPx', async () => {
    const svg = await renderChartSvg(simpleLine, { widthPx: 321, heightPx: 123 });
    expect(svg).toContain('d="M0.25,0.25h321v123h-321Z"');
  });

  it('evaluates the field predicates Vega-Lite compiles to expressions without compiling them to JavaScript functions', async () => {
    const spec = { ...simpleLine, transform: [{ filter: { field: 'voltagePu', gt: 1.01 } }] };
    const realFunction = globalThis.Function;
    // Code generation would call the Function constructor; make any such call fail loudly.
    globalThis.Function = new Proxy(realFunction, {
      apply: () => {
        throw new Error('Function() called');
      },
      construct: () => {
        throw new Error('new Function() called');
      },
    });
    try {
      const svg = await renderChartSvg(spec);
      expect(linePaths(svg)[0]?.vertices).toHaveLength(2);
    } finally {
      globalThis.Function = realFunction;
    }
  });

  it('rejects a spec that is not an object', async () => {
    const error = await specError('{"mark":"line"}');
    expect(error.code).toBe('chart-spec-not-object');
  });

  it('rejects an unknown mark type and says where it is', async () => {
    const error = await specError({ layer: [simpleLine, { ...simpleLine, mark: 'curvy' }] });
    expect(error.code).toBe('chart-spec-invalid');
    expect(error.quantity).toBe('layer.1.mark');
    expect(error.message).toContain('"curvy"');
  });

  it('rejects an unknown field type and says which encoding has it', async () => {
    const error = await specError({ ...simpleLine, encoding: { ...simpleLine.encoding, x: { field: 'distanceKm', type: 'number' } } });
    expect(error.code).toBe('chart-spec-invalid');
    expect(error.quantity).toBe('encoding.x.type');
  });

  it.each([
    ['a calculate transform', { transform: [{ calculate: 'datum.distanceKm / 100', as: 'section' }] }, 'transform.0.calculate'],
    ['a filter written as an expression', { transform: [{ filter: 'datum.voltagePu > 1.01' }] }, 'transform.0.filter'],
    [
      'an axis label expression',
      { encoding: { ...simpleLine.encoding, x: { ...simpleLine.encoding.x, axis: { labelExpr: 'datum.label' } } } },
      'encoding.x.axis.labelExpr',
    ],
    ['a parameter', { params: [{ name: 'p', expr: '1 + 1' }] }, 'params'],
  ])('refuses %s: reports draw no Vega expressions of a study', async (_what, change, path) => {
    const error = await specError({ ...simpleLine, ...change });
    expect(error.code).toBe('chart-spec-not-allowed');
    expect(error.quantity).toBe(path);
  });

  it('treats a Vega-Lite warning about a dropped property as an error', async () => {
    const error = await specError({
      ...simpleLine,
      mark: 'rule',
      encoding: { ...simpleLine.encoding, text: { field: 'distanceKm', type: 'nominal' } },
    });
    expect(error.code).toBe('chart-spec-invalid');
    expect(error.message).toContain('text dropped');
  });

  it('refuses data loaded from a URL', async () => {
    const error = await specError({ ...simpleLine, data: { url: 'https://example.invalid/profile.csv' } });
    expect(error.code).toBe('chart-data-not-inline');
    expect(error.quantity).toBe('data.url');
  });

  it('refuses file data hidden in a nested layer', async () => {
    const error = await specError({ layer: [simpleLine, { ...simpleLine, data: { url: 'file:///etc/passwd' } }] });
    expect(error.code).toBe('chart-data-not-inline');
    expect(error.quantity).toBe('layer.1.data.url');
  });

  it('refuses external data in a lookup transform', async () => {
    const spec = {
      ...simpleLine,
      transform: [{ lookup: 'distanceKm', from: { data: { url: 'towers.json' }, key: 'km', fields: ['tower'] } }],
    };
    const error = await specError(spec);
    expect(error.code).toBe('chart-data-not-inline');
    expect(error.quantity).toBe('transform.0.from.data.url');
  });
});
