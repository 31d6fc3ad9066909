import { describe, expect, it } from 'vitest';
import { busVoltagesChart, corridorProfileChart, costComparisonChart, frequencyScanChart, transferComparisonChart } from '../../src/blocks/charts.ts';
import { renderChartSvg } from '../../src/report/chart/render.ts';
import { capitalisedCostComparison, frequencyScan, solveCorridorCases, type CorridorInput } from '../../src/solver/index.ts';
import { linePaths, texts } from '../report/chart/svg-probe.ts';

const perKm = { seriesResistanceOhmPerKm: 0.028, seriesReactanceOhmPerKm: 0.32, shuntSusceptanceUsPerKm: 3.6 };
const corridor: CorridorInput = {
  frequencyHz: 50,
  nominalVoltageKv: 400,
  sendingSystem: { shortCircuitMva: 12000, xOverR: 12, emfKv: 405 },
  receivingSystem: { shortCircuitMva: 8000, xOverR: 12, emfKv: 400 },
  buses: [{ name: 'Upper Lode' }, { name: 'Marrow Gap' }, { name: 'Sallow' }],
  sections: [
    { from: 'Upper Lode', to: 'Marrow Gap', lengthKm: 150, ...perKm },
    {
      from: 'Marrow Gap',
      to: 'Sallow',
      lengthKm: 180,
      ...perKm,
      seriesCapacitors: [{ name: 'S1', position: 'sending-end', reactanceOhm: 20, ratedCurrentA: 2000 }],
    },
  ],
};
const table = solveCorridorCases({
  corridor,
  cases: [
    { label: 'open end', loading: { kind: 'energisation', closedEnd: 'sending' } },
    { label: 'transfer', loading: { kind: 'transfer', pMw: 700 } },
    { label: 'beyond the nose', loading: { kind: 'transfer', pMw: 40000 } },
  ],
});

describe('corridorProfileChart', () => {
  it('draws one line for each solved case and leaves an unsolved case out', async () => {
    const svg = await renderChartSvg(corridorProfileChart({ cases: table.cases, bandPu: { min: 0.95, max: 1.05 } }));
    expect(linePaths(svg)).toHaveLength(2);
    expect(texts(svg)).toEqual(expect.arrayContaining(['open end', 'transfer']));
    expect(texts(svg)).not.toContain('beyond the nose');
  });

  it('runs along the whole corridor, from its sending bus to its far end', () => {
    const spec = corridorProfileChart({ cases: table.cases }) as { layer: { data: { values: { distanceKm: number }[] } }[] };
    const distances = spec.layer.at(-1)!.data.values.map((value) => value.distanceKm);
    expect(Math.min(...distances)).toBe(0);
    expect(Math.max(...distances)).toBeCloseTo(330, 9);
  });
});

describe('busVoltagesChart', () => {
  it('puts the buses on the axis in corridor order, one line per solved case', async () => {
    const svg = await renderChartSvg(busVoltagesChart({ cases: table.cases }));
    const labels = texts(svg);
    expect(labels.indexOf('Upper Lode')).toBeLessThan(labels.indexOf('Marrow Gap'));
    expect(labels.indexOf('Marrow Gap')).toBeLessThan(labels.indexOf('Sallow'));
    expect(linePaths(svg)).toHaveLength(2);
  });
});

describe('frequencyScanChart', () => {
  // A lumped chain resonating at 50 sqrt(60 / 150) = 31.6 Hz (the series LC identity).
  const scan = frequencyScan({
    frequencyHz: 50,
    elements: [
      { kind: 'generator', subtransientReactanceOhm: 50 },
      { kind: 'series-impedance', reactanceOhm: 80 },
      { kind: 'series-capacitor', reactanceOhm: 60 },
      { kind: 'system', reactanceOhm: 20 },
    ],
  });

  it('draws the reactance and the resistance, marks the resonance and a rule at f0 - f_m for each torsional mode', async () => {
    const svg = await renderChartSvg(frequencyScanChart({ scan, torsionalModesHz: [18, 25] }));
    expect(linePaths(svg)).toHaveLength(2);
    const labels = texts(svg);
    expect(labels).toEqual(expect.arrayContaining(['Frequency (Hz)', 'f0 - 18 Hz', 'f0 - 25 Hz']));
    expect(labels).toContain('31.62 Hz');
  });

  it('writes the impedance axis in ohms as Ω', async () => {
    const svg = await renderChartSvg(frequencyScanChart({ scan }));
    expect(texts(svg)).toContain('Driving-point impedance (Ω)');
  });

  it('cuts the reactance axis where asked, so a pole does not flatten the curve', () => {
    const spec = frequencyScanChart({ scan, reactanceLimitOhm: 100 }) as { layer: { data: { values: { ohm: number }[] } }[] };
    const ohms = spec.layer[0]!.data.values.map((value) => value.ohm);
    expect(Math.max(...ohms)).toBeLessThanOrEqual(100);
    expect(Math.min(...ohms)).toBeGreaterThanOrEqual(-100);
  });
});

describe('costComparisonChart', () => {
  const twoSchemes = () =>
    capitalisedCostComparison({
      discountRatePercent: 7,
      lifeYears: 30,
      energyCostPerMwh: 55,
      costUnit: 'EMK',
      options: [
        { label: 'series capacitor', equipmentCost: 28e6, lineLosses: { peakLossMw: 21, loadFactor: 0.62 } },
        { label: 'shunt reactors only', equipmentCost: 9e6, lineLosses: { peakLossMw: 26, loadFactor: 0.62 } },
      ],
    });

  it('names the compared items in neutral words unless told what the study calls them', async () => {
    const words = texts(await renderChartSvg(costComparisonChart({ comparison: twoSchemes() }))).join(' ');
    expect(words).not.toMatch(/option/i);
  });

  it('calls the compared items what the study calls them', async () => {
    const svg = await renderChartSvg(costComparisonChart({ comparison: twoSchemes(), itemName: 'alternative' }));
    expect(texts(svg)).toEqual(expect.arrayContaining(['Capitalised cost of each alternative', 'Alternative']));
  });

  it('stacks equipment, losses and maintenance for each option', async () => {
    const comparison = capitalisedCostComparison({
      discountRatePercent: 7,
      lifeYears: 30,
      energyCostPerMwh: 55,
      costUnit: 'EMK',
      options: [
        { label: 'series capacitor', equipmentCost: 28e6, lineLosses: { peakLossMw: 21, loadFactor: 0.62 } },
        { label: 'shunt reactors only', equipmentCost: 9e6, lineLosses: { peakLossMw: 26, loadFactor: 0.62 } },
      ],
    });
    const svg = await renderChartSvg(costComparisonChart({ comparison }));
    expect(texts(svg)).toEqual(expect.arrayContaining(['series capacitor', 'shunt reactors only', 'Capitalised cost (EMK)', 'equipment']));
    const bars = svg.match(/<g class="mark-rect role-mark[^"]*"[^>]*>([\s\S]*?)<\/g>/)?.[1] ?? '';
    // Three parts for each of the two options.
    expect(bars.match(/<path/g)).toHaveLength(6);
  });
});

describe('transferComparisonChart', () => {
  const alternatives = [
    { label: 'none', maximumTransferMw: 1350, loadabilityMw: 680 },
    { label: 'series 40 %', maximumTransferMw: 2200, loadabilityMw: 1100 },
  ];

  it('draws the steady-state limit and the transfer within the angle limit for each alternative, with the target marked', async () => {
    const svg = await renderChartSvg(transferComparisonChart({ alternatives, targetTransferMw: 1000 }));
    expect(texts(svg)).toEqual(expect.arrayContaining(['none', 'series 40 %', 'Transfer (MW)', 'steady-state limit', 'target 1000 MW']));
    const bars = svg.match(/<g class="mark-rect role-mark[^"]*"[^>]*>([\s\S]*?)<\/g>/)?.[1] ?? '';
    expect(bars.match(/<path/g)).toHaveLength(4);
  });

  it('calls the compared items what the study calls them', async () => {
    const svg = await renderChartSvg(transferComparisonChart({ alternatives, itemName: 'scheme' }));
    expect(texts(svg)).toEqual(expect.arrayContaining(['Transfer limits of each scheme', 'Scheme']));
  });

  it('refuses two alternatives with one label', () => {
    expect(() => transferComparisonChart({ alternatives: [alternatives[0]!, alternatives[0]!] })).toThrow(/unique/);
  });
});
