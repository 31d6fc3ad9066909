import { describe, expect, it } from 'vitest';
import {
  loadabilityChart,
  powerAngleChart,
  pvCurveChart,
  stabilityMarginPercent,
  svcCharacteristicChart,
  svcCharacteristicCorners,
  tornadoChart,
  voltageProfileChart,
} from '../../src/blocks/charts.ts';
import { ChartInputError } from '../../src/blocks/chartInputError.ts';
import { renderChartSvg } from '../../src/report/chart/render.ts';
import { stabilityMarginPercent as solverStabilityMarginPercent } from '../../src/solver/curves.ts';
import { SolverDomainError } from '../../src/solver/errors.ts';
import { svcCharacteristicCorners as solverSvcCharacteristicCorners } from '../../src/solver/sizing.ts';
import { axisTicks, linePaths, pixelOf, tickSnapPx, pointShapes, textPlacements, texts } from '../report/chart/svg-probe.ts';

const degree = Math.PI / 180;

// Voltage along a lossless open-ended line, V(x) = V_R·cos(βx') with x' the distance from the open
// end: Glover, Sarma & Overbye, Power System Analysis and Design, 5th ed., §5.4 (lossless line).
// β = 0.06 °/km is the free-space phase constant at 50 Hz (360° per 6000 km wavelength).
function openEndedProfile(lengthKm: number, receivingPu: number): { distanceKm: number; voltagePu: number }[] {
  return [0, 0.25, 0.5, 0.75, 1].map((fraction) => {
    const distanceKm = fraction * lengthKm;
    return { distanceKm, voltagePu: receivingPu * Math.cos(0.06 * degree * (lengthKm - distanceKm)) };
  });
}

function expectError(errorClass: typeof ChartInputError | typeof SolverDomainError, build: () => unknown, code: string, quantity: string): void {
  try {
    build();
  } catch (error) {
    expect(error).toBeInstanceOf(errorClass);
    expect((error as ChartInputError | SolverDomainError).code).toBe(code);
    expect((error as ChartInputError | SolverDomainError).quantity).toBe(quantity);
    return;
  }
  throw new Error(`expected a ${errorClass.name}`);
}

function expectInputError(build: () => unknown, code: string, quantity: string): void {
  expectError(ChartInputError, build, code, quantity);
}

describe('voltageProfileChart', () => {
  const cases = [
    { label: 'no load, no reactors', points: openEndedProfile(400, 1.1) },
    { label: 'no load, 2 × 50 Mvar', points: openEndedProfile(400, 1.03) },
    { label: 'peak load', points: openEndedProfile(400, 0.97) },
  ];

  it('labels both axes with their units', async () => {
    const svg = await renderChartSvg(voltageProfileChart({ cases }));
    expect(texts(svg)).toEqual(expect.arrayContaining(['Distance from sending end (km)', 'Voltage (pu)']));
  });

  it('shows a long case label whole in the legend', async () => {
    const label = 'C4: peak, Fennick Cross at half strength, one circuit out';
    const svg = await renderChartSvg(voltageProfileChart({ cases: [...cases, { label, points: openEndedProfile(400, 0.95) }] }));
    expect(texts(svg)).toContain(label);
  });

  it('draws one line per case, each with its own colour and dash pattern', async () => {
    const lines = linePaths(await renderChartSvg(voltageProfileChart({ cases })));
    expect(lines).toHaveLength(3);
    expect(new Set(lines.map((line) => line.stroke)).size).toBe(3);
    expect(new Set(lines.map((line) => line.dash ?? 'solid')).size).toBe(3);
  });

  it('marks each case with its own point shape for black-and-white prints', async () => {
    const shapes = pointShapes(await renderChartSvg(voltageProfileChart({ cases })));
    expect(new Set(shapes).size).toBeGreaterThanOrEqual(3);
  });

  it('keeps markers legible on a long series: about a dozen, spaced evenly, with both ends marked', async () => {
    const dense = [{ label: 'dense', points: Array.from({ length: 200 }, (_, index) => ({ distanceKm: index * 2, voltagePu: 1 + index * 1e-4 })) }];
    const svg = await renderChartSvg(voltageProfileChart({ cases: dense }));
    const markers = pointShapes(svg);
    expect(markers.length).toBeGreaterThanOrEqual(10);
    expect(markers.length).toBeLessThanOrEqual(14);
    expect(linePaths(svg)[0]?.vertices).toHaveLength(200);
  });

  it('plots the open-end voltage rise where the axes put it', async () => {
    const svg = await renderChartSvg(voltageProfileChart({ cases }));
    const [firstCase] = linePaths(svg);
    const openEnd = cases[0]?.points[4];
    const [xPixel, yPixel] = firstCase?.vertices[4] ?? [Number.NaN, Number.NaN];
    expect(Math.abs(xPixel - pixelOf(axisTicks(svg, 'X'), openEnd?.distanceKm ?? Number.NaN))).toBeLessThanOrEqual(tickSnapPx);
    expect(Math.abs(yPixel - pixelOf(axisTicks(svg, 'Y'), openEnd?.voltagePu ?? Number.NaN))).toBeLessThanOrEqual(tickSnapPx);
  });

  it('shades and labels the allowed band', async () => {
    const svg = await renderChartSvg(voltageProfileChart({ cases, bandPu: { min: 0.95, max: 1.05 } }));
    expect(svg).toContain('aria-roledescription="rect mark"');
    expect(texts(svg)).toContain('allowed 0.95–1.05 pu');
  });

  it('lists the cases in the legend in the order given', async () => {
    const svg = await renderChartSvg(voltageProfileChart({ cases }));
    const shown = texts(svg).filter((text) => cases.some((series) => series.label === text));
    expect(shown).toEqual(cases.map((series) => series.label));
  });

  it('refuses two cases with the same label', () => {
    const twice = [cases[0], cases[0]].filter((series) => series !== undefined);
    expectInputError(() => voltageProfileChart({ cases: twice }), 'chart-input-out-of-range', 'cases[1].label');
  });

  it('refuses a voltage that is not a number', () => {
    const broken = [{ label: 'broken', points: [{ distanceKm: 0, voltagePu: Number.NaN }] }];
    expectInputError(() => voltageProfileChart({ cases: broken }), 'chart-input-not-finite', 'cases[0].points[0].voltagePu');
  });

  it('refuses a band whose minimum is not below its maximum', () => {
    expectInputError(() => voltageProfileChart({ cases, bandPu: { min: 1.05, max: 0.95 } }), 'chart-input-out-of-range', 'bandPu.min');
  });
});

describe('pvCurveChart', () => {
  // Lossless radial line, source E = 1 pu behind X = 1 pu, unity-power-factor load:
  // P = V·sqrt(E² − V²)/X, nose at P = E²/(2X) = 0.5 pu, V = E/√2 (Van Cutsem & Vournas,
  // Voltage Stability of Electric Power Systems, 1998, ch. 2 — chapter from memory).
  const baseMva = 1000;
  const points = Array.from({ length: 19 }, (_, index) => {
    const voltagePu = 0.95 - index * 0.05;
    return { pMw: baseMva * voltagePu * Math.sqrt(1 - voltagePu * voltagePu), voltagePu };
  });
  const input = { curves: [{ label: 'unity power factor', points, nose: { pMw: 500, voltagePu: Math.SQRT1_2 } }] };

  it('labels both axes with their units', async () => {
    const svg = await renderChartSvg(pvCurveChart(input));
    expect(texts(svg)).toEqual(expect.arrayContaining(['Receiving-end active power P (MW)', 'Receiving-end voltage (pu)']));
  });

  it('draws the curve in the given order so the upper and lower branches both show', async () => {
    const svg = await renderChartSvg(pvCurveChart(input));
    const [curve] = linePaths(svg);
    const yTicks = axisTicks(svg, 'Y');
    expect(Math.abs((curve?.vertices[0]?.[1] ?? Number.NaN) - pixelOf(yTicks, 0.95))).toBeLessThanOrEqual(tickSnapPx);
    expect(Math.abs((curve?.vertices[18]?.[1] ?? Number.NaN) - pixelOf(yTicks, 0.05))).toBeLessThanOrEqual(tickSnapPx);
  });

  it('marks the nose with its power and voltage', async () => {
    const svg = await renderChartSvg(pvCurveChart(input));
    expect(texts(svg)).toContain('nose 500.0 MW, 0.7071 pu');
  });

  it('writes the noses of all its curves in one format', async () => {
    const curves = [
      { label: 'bare', points, nose: { pMw: 812, voltagePu: 0.685 } },
      { label: 'one step', points, nose: { pMw: 1005.3, voltagePu: 0.6717 } },
    ];
    const notes = texts(await renderChartSvg(pvCurveChart({ curves }))).filter((text) => text.includes('nose'));
    expect(notes.sort()).toEqual(['bare: nose 812 MW, 0.6850 pu', 'one step: nose 1005 MW, 0.6717 pu']);
  });

  // A fixed shuffle, so that the test is the same on every run: the order a study happens to pass its points in.
  const shuffled = [7, 0, 18, 3, 12, 9, 1, 16, 5, 14, 10, 2, 17, 6, 11, 4, 15, 8, 13].map((index) => points[index]!);

  it('draws a curve from no load over the nose to the lower branch whatever order its points come in', async () => {
    const svg = await renderChartSvg(pvCurveChart({ curves: [{ label: 'unity power factor', points: shuffled }] }));
    const [curve] = linePaths(svg);
    const vertices = curve?.vertices ?? [];
    expect(vertices).toHaveLength(points.length);
    // Pixel y grows downwards: along the curve the voltage only falls, and the power rises to the nose and then falls.
    const noseIndex = vertices.reduce((best, vertex, index) => (vertex[0] > vertices[best]![0] ? index : best), 0);
    for (let index = 1; index < vertices.length; index++) {
      expect(vertices[index]![1]).toBeGreaterThan(vertices[index - 1]![1]);
      if (index <= noseIndex) expect(vertices[index]![0]).toBeGreaterThanOrEqual(vertices[index - 1]![0]);
      else expect(vertices[index]![0]).toBeLessThanOrEqual(vertices[index - 1]![0]);
    }
    const yTicks = axisTicks(svg, 'Y');
    expect(Math.abs(vertices[0]![1] - pixelOf(yTicks, 0.95))).toBeLessThanOrEqual(tickSnapPx);
    expect(Math.abs(vertices[vertices.length - 1]![1] - pixelOf(yTicks, 0.05))).toBeLessThanOrEqual(tickSnapPx);
  });

  it('writes the nose label beside the curve, clear of it', async () => {
    const svg = await renderChartSvg(pvCurveChart({ curves: [{ label: 'unity power factor', points: shuffled, nose: input.curves[0]!.nose }] }));
    const [curve] = linePaths(svg);
    const label = textPlacements(svg).find((text) => text.text.startsWith('nose'));
    expect(label).toBeDefined();
    // The nose is the curve's rightmost point: a label that starts to the right of it cannot touch the curve.
    const rightmostPx = Math.max(...(curve?.vertices ?? []).map((vertex) => vertex[0]));
    expect(label!.align).toBe('start');
    expect(label!.x).toBeGreaterThan(rightmostPx);
  });

  it('keeps the nose labels of nested curves clear of every curve and of each other', async () => {
    // Curves of one power factor have their noses at one voltage: their labels would fall on one line.
    const inner = {
      label: 'weaker source',
      points: shuffled.map((point) => ({ pMw: 0.8 * point.pMw, voltagePu: point.voltagePu })),
      nose: { pMw: 400, voltagePu: Math.SQRT1_2 },
    };
    const svg = await renderChartSvg(
      pvCurveChart({ curves: [inner, { label: 'unity power factor', points: shuffled, nose: input.curves[0]!.nose }] }),
    );
    const rightmostPx = Math.max(...linePaths(svg).flatMap((curve) => curve.vertices.map((vertex) => vertex[0])));
    const labels = textPlacements(svg).filter((text) => text.text.includes('nose'));
    expect(labels.map((label) => label.text).sort()).toEqual([
      'unity power factor: nose 500.0 MW, 0.7071 pu',
      'weaker source: nose 400.0 MW, 0.7071 pu',
    ]);
    for (const label of labels) expect(label.x).toBeGreaterThan(rightmostPx);
    expect(Math.abs(labels[0]!.y - labels[1]!.y)).toBeGreaterThanOrEqual(10);
  });
});

describe('powerAngleChart', () => {
  // P = Pmax·sin δ for a lossless link (Kundur, Power System Stability and Control, 1994, §2.x —
  // section from memory); at δ0 = 30° the load is Pmax/2, so the margin is exactly 50 %.
  const sine = (pMaxMw: number) => Array.from({ length: 19 }, (_, index) => ({ angleDeg: index * 10, pMw: pMaxMw * Math.sin(index * 10 * degree) }));
  const input = {
    curves: [
      { label: 'both circuits', points: sine(1200) },
      { label: 'one circuit out', points: sine(800) },
    ],
    operatingPoint: { angleDeg: 30, pMw: 1200 * Math.sin(30 * degree) },
  };

  it('annotates the margin taken from the first curve’s peak when Pmax is not given', async () => {
    const svg = await renderChartSvg(powerAngleChart(input));
    expect(texts(svg)).toContain('Stability margin (Pmax − P0)/Pmax = 50.0 %');
  });

  it('uses the given Pmax for the margin', async () => {
    const svg = await renderChartSvg(powerAngleChart({ ...input, maxPowerMw: 800 }));
    expect(texts(svg)).toContain('Stability margin (Pmax − P0)/Pmax = 25.0 %');
  });

  it('draws Pmax and P0 as reference lines at their values', async () => {
    const svg = await renderChartSvg(powerAngleChart(input));
    expect(texts(svg)).toEqual(expect.arrayContaining(['Pmax = 1200 MW', 'P0 = 600 MW']));
    const yTicks = axisTicks(svg, 'Y');
    const ruleRows = [...svg.matchAll(/aria-roledescription="rule mark" transform="translate\([-\d.]+,([-\d.]+)\)"/g)].map((match) =>
      Number(match[1]),
    );
    expect(ruleRows.some((row) => Math.abs(row - pixelOf(yTicks, 1200)) <= tickSnapPx)).toBe(true);
    expect(ruleRows.some((row) => Math.abs(row - pixelOf(yTicks, 600)) <= tickSnapPx)).toBe(true);
  });

  it('labels both axes with their units', async () => {
    const svg = await renderChartSvg(powerAngleChart(input));
    expect(texts(svg)).toEqual(expect.arrayContaining(['Power angle δ (°)', 'Active power P (MW)']));
  });

  it('refuses an operating point above Pmax', () => {
    expectError(
      SolverDomainError,
      () => powerAngleChart({ ...input, operatingPoint: { angleDeg: 90, pMw: 1300 } }),
      'out-of-range',
      'operatingPowerMw',
    );
  });
});

describe('svcCharacteristicChart', () => {
  // Control range V = Vref + Xs·I (I > 0 inductive) meets the limit lines I = −B_C·V and I = B_L·V
  // (Hingorani & Gyugyi, Understanding FACTS, 2000, ch. 5 — chapter from memory). Hand calculation
  // for Vref = 1, Xs = 0.05, B_C = 1, B_L = 0.5: V_C = 1/1.05, V_L = 1/0.975.
  const input = {
    slopePercent: 5,
    referenceVoltagePu: 1,
    bMaxCapacitivePu: 1,
    bMaxInductivePu: 0.5,
    operatingPoints: [
      { label: 'light load', currentPu: 0.2, voltagePu: 1.01 },
      { label: 'peak load', currentPu: -0.6, voltagePu: 0.97 },
    ],
  };

  it('draws the characteristic through the origin and both corners', async () => {
    const svg = await renderChartSvg(svcCharacteristicChart(input));
    const { capacitiveCorner } = svcCharacteristicCorners(input);
    const characteristic = linePaths(svg).find((line) => line.dash === undefined && line.vertices.length === 4);
    const [xPixel, yPixel] = characteristic?.vertices[1] ?? [Number.NaN, Number.NaN];
    expect(Math.abs(xPixel - pixelOf(axisTicks(svg, 'X'), capacitiveCorner.currentPu))).toBeLessThanOrEqual(tickSnapPx);
    expect(Math.abs(yPixel - pixelOf(axisTicks(svg, 'Y'), capacitiveCorner.voltagePu))).toBeLessThanOrEqual(tickSnapPx);
  });

  it('shows each operating point with its own shape', async () => {
    const svg = await renderChartSvg(svcCharacteristicChart(input));
    expect(new Set(pointShapes(svg)).size).toBe(2);
    expect(texts(svg)).toEqual(expect.arrayContaining(['light load', 'peak load']));
  });

  it('labels both axes with their units', async () => {
    const svg = await renderChartSvg(svcCharacteristicChart(input));
    expect(texts(svg)).toEqual(expect.arrayContaining(['SVC current (pu; − capacitive, + inductive)', 'Bus voltage (pu)']));
  });

  it('refuses a slope that never meets the inductive limit', () => {
    expectError(
      SolverDomainError,
      () => svcCharacteristicChart({ ...input, slopePercent: 50, bMaxInductivePu: 2 }),
      'inconsistent-quantities',
      'slopePercent × bMaxInductivePu / 100',
    );
  });

  it('offers the solver’s margin and corners beside the charts that draw them', () => {
    expect(stabilityMarginPercent).toBe(solverStabilityMarginPercent);
    expect(svcCharacteristicCorners).toBe(solverSvcCharacteristicCorners);
  });
});

describe('loadabilityChart', () => {
  // Points shaped like the St. Clair curve (about 3 × SIL at 80 km falling towards 1 × SIL near 500 km);
  // common practice, values from memory, used here only as plotting data.
  const points = [
    { lengthKm: 80, multipleOfSil: 3 },
    { lengthKm: 160, multipleOfSil: 2 },
    { lengthKm: 320, multipleOfSil: 1.3 },
    { lengthKm: 480, multipleOfSil: 1 },
  ];

  it('labels both axes with their units', async () => {
    const svg = await renderChartSvg(loadabilityChart({ points }));
    expect(texts(svg)).toEqual(expect.arrayContaining(['Line length (km)', 'Loadability (multiples of SIL)']));
  });

  it('plots every point where the axes put it', async () => {
    const svg = await renderChartSvg(loadabilityChart({ points }));
    const [line] = linePaths(svg);
    points.forEach((point, index) => {
      const [xPixel, yPixel] = line?.vertices[index] ?? [Number.NaN, Number.NaN];
      expect(Math.abs(xPixel - pixelOf(axisTicks(svg, 'X'), point.lengthKm))).toBeLessThanOrEqual(tickSnapPx);
      expect(Math.abs(yPixel - pixelOf(axisTicks(svg, 'Y'), point.multipleOfSil))).toBeLessThanOrEqual(tickSnapPx);
    });
  });

  it('draws the thermal limit as a labelled line', async () => {
    const svg = await renderChartSvg(loadabilityChart({ points, thermalLimitSil: 3.5 }));
    expect(texts(svg)).toContain('thermal limit 3.5 × SIL');
  });

  it('refuses an empty point list', () => {
    expectInputError(() => loadabilityChart({ points: [] }), 'chart-input-empty', 'points.length');
  });
});

describe('tornadoChart', () => {
  const input = {
    figure: 'Open-end voltage',
    unit: 'pu',
    asRun: 1.0675,
    bars: [
      { label: 'seriesReactance', low: 1.0653, high: 1.0697 },
      { label: 'lineLength', low: 1.0661, high: 1.0689 },
    ],
  };

  it('draws the bars in the order given, from the top, with the value as run marked', async () => {
    const svg = await renderChartSvg(tornadoChart(input));
    const labels = texts(svg);
    expect(labels.indexOf('seriesReactance')).toBeGreaterThanOrEqual(0);
    expect(labels.indexOf('seriesReactance')).toBeLessThan(labels.indexOf('lineLength'));
    expect(labels).toContain('as run');
    expect(labels).toContain('Open-end voltage (pu)');
  });

  it('refuses two bars with the same label', () => {
    expectInputError(() => tornadoChart({ ...input, bars: [input.bars[0]!, input.bars[0]!] }), 'chart-input-out-of-range', 'bars[1].label');
  });

  it('refuses a bar end that is not finite', () => {
    expectInputError(
      () => tornadoChart({ ...input, bars: [{ label: 'lineLength', low: Number.NaN, high: 1 }] }),
      'chart-input-not-finite',
      'bars[0].low',
    );
  });
});
