import { describe, expect, test } from 'vitest';
import { SolverDomainError, compareCompensationAlternatives, type CompensationAlternativeInput, type CorridorInput } from '../../src/solver/index.ts';
import { perKm } from './corridorSupport.ts';

const lossless = { seriesResistanceOhmPerKm: 0, seriesReactanceOhmPerKm: 0.32, shuntSusceptanceUsPerKm: 3.6 };

/** An invented two-section corridor, uncompensated: Aldwyn - Brecken Moor - Corrish, 400 kV. */
function corridor(
  constants: typeof perKm,
  lengthKm = 190,
  extra: Partial<Pick<CorridorInput, 'buses'>> & { segmentOhm?: number } = {},
): CorridorInput {
  return {
    label: 'Aldwyn - Corrish',
    frequencyHz: 50,
    nominalVoltageKv: 400,
    sendingSystem: { shortCircuitMva: 20000, xOverR: 15, emfKv: 400 },
    receivingSystem: { shortCircuitMva: 20000, xOverR: 15, emfKv: 400 },
    buses: extra.buses ?? [{ name: 'Aldwyn' }, { name: 'Brecken Moor' }, { name: 'Corrish' }],
    sections: [
      { from: 'Aldwyn', to: 'Brecken Moor', lengthKm, ...constants },
      {
        from: 'Brecken Moor',
        to: 'Corrish',
        lengthKm,
        ...constants,
        ...(extra.segmentOhm === undefined
          ? {}
          : { seriesCapacitors: [{ name: 'BM-SC', position: 'sending-end' as const, reactanceOhm: extra.segmentOhm, ratedCurrentA: 2000 }] }),
      },
    ],
  };
}

const cases = [
  { label: 'energised from Aldwyn', loading: { kind: 'energisation' as const, closedEnd: 'sending' as const } },
  { label: 'transfer', loading: { kind: 'transfer' as const, pMw: 500 } },
];
const prices = {
  shuntReactor: { costPerMvar: 10, lossPercent: 0.2 },
  shuntCapacitor: { costPerMvar: 6, lossPercent: 0.05 },
  svc: { costPerMvar: 40, lossPercent: 0.5 },
  seriesCapacitor: { costPerMvar: 12, lossPercent: 0.05 },
};
const costs = { discountRatePercent: 8, lifeYears: 30, energyCostPerMwh: 50, loadFactor: 0.6, prices };

function compare(alternatives: CompensationAlternativeInput[], more: Record<string, unknown> = {}) {
  return compareCompensationAlternatives({
    alternatives,
    cases,
    noLoadCase: 'energised from Aldwyn',
    peakCase: 'transfer',
    bandPu: { min: 0.9, max: 1.1 },
    angleLimitDeg: 30,
    costs,
    profilePointCount: 11,
    ...more,
  });
}

const reactor = (name: string, qMvar: number) => ({ name, qMvar, ratedVoltageKv: 400 });
const withMid = (unit: Record<string, unknown>) => [{ name: 'Aldwyn' }, { name: 'Brecken Moor', ...unit }, { name: 'Corrish' }];

describe('compareCompensationAlternatives: reference checks', () => {
  // Glover, Sarma & Overbye, Power System Analysis and Design, 5th ed., sec. 5.4-5.5 (from memory): a lossless line between
  // buses held at V has B = j Zc sin(beta l), so P_max = V^2 / (Zc sin(beta l)), and SIL = V^2 / Zc. Exact for the distributed model.
  test('gives the lossless line maximum transfer V^2 / (Zc sin beta l) and its natural load V^2 / Zc', () => {
    const result = compare([{ label: 'none', corridor: corridor(lossless) }]);
    const zcOhm = Math.sqrt(0.32 / 3.6e-6);
    const betaL = 380 * Math.sqrt(0.32 * 3.6e-6);
    expect(result.surgeImpedanceLoadingMw / (400 ** 2 / zcOhm)).toBeCloseTo(1, 12);
    expect(result.alternatives[0]!.maximumTransferMw / (400 ** 2 / (zcOhm * Math.sin(betaL)))).toBeCloseTo(1, 9);
  });

  // The same source, sec. 5.4 (from memory): at angle delta the lossless line carries P = V^2 sin(delta) / (Zc sin beta l).
  test('gives the loadability at the 30 deg limit as V^2 sin 30 deg / (Zc sin beta l) on a lossless line', () => {
    const result = compare([{ label: 'none', corridor: corridor(lossless) }]);
    const zcOhm = Math.sqrt(0.32 / 3.6e-6);
    const betaL = 380 * Math.sqrt(0.32 * 3.6e-6);
    expect(result.alternatives[0]!.loadabilityMw / ((400 ** 2 * 0.5) / (zcOhm * Math.sin(betaL)))).toBeCloseTo(1, 9);
    expect(result.alternatives[0]!.loadabilityLimitedBy).toBe('angle');
  });

  // Glover, Sarma & Overbye (5th ed.), sec. 5.4 and 5.7 (from memory): each lossless half has [cos t, j Zc sin t; j sin t / Zc, cos t]
  // (t = beta l / 2); with -j Xc between the halves B = j (Zc sin beta l - Xc cos^2 t) and A is real, so P_max = V^2 / |B| exactly.
  test('gives a series-compensated lossless line the maximum transfer V^2 / (Zc sin beta l - Xc cos^2 (beta l / 2))', () => {
    const zcOhm = Math.sqrt(0.32 / 3.6e-6);
    const betaL = 380 * Math.sqrt(0.32 * 3.6e-6);
    for (const degree of [0.3, 0.5]) {
      const xcOhm = degree * 380 * 0.32;
      const result = compare([{ label: `series ${degree}`, corridor: corridor(lossless, 190, { segmentOhm: xcOhm }) }]);
      const expectedMw = 400 ** 2 / (zcOhm * Math.sin(betaL) - xcOhm * Math.cos(betaL / 2) ** 2);
      expect(result.alternatives[0]!.maximumTransferMw / expectedMw).toBeCloseTo(1, 9);
    }
  });

  // The same source's planning form, X (1 - k) (sec. 5.7, from memory): on a short line it neglects the charging, a relative error
  // of about (beta l)^2 (1/6 - k/4) / (1 - k), 0.6 % at k = 0.3 on 200 km (beta l = 0.21 rad).
  test('comes within 1 % of V^2 / (X (1 - k)) on a short series-compensated line', () => {
    const xOhm = 2 * 100 * 0.32;
    for (const degree of [0.3, 0.5]) {
      const result = compare([{ label: `series ${degree}`, corridor: corridor(lossless, 100, { segmentOhm: degree * xOhm }) }]);
      expect(Math.abs(result.alternatives[0]!.maximumTransferMw / (400 ** 2 / (xOhm * (1 - degree))) - 1)).toBeLessThan(0.01);
    }
  });
});

describe('compareCompensationAlternatives: the order theory gives the alternatives', () => {
  // Theory (Miller, Reactive Power Control in Electric Systems, 1982, ch. 2, from memory): shunt compensation changes the effective
  // surge impedance, Zc' = Zc / sqrt(1 - k_sh), and the natural load with it, but a shunt element at a bus held at nominal voltage
  // changes nothing between the held buses; at the mid bus an inductive susceptance adds j X1 X2 b to B (lower limit) and a capacitive
  // one subtracts it (higher limit); series capacitors remove k X from B. So: reactors switched out at the peak = none; reactors at
  // the mid bus < none < capacitors at the mid bus; series at a low degree < series at a higher degree.
  const result = compare([
    { label: 'none', corridor: corridor(perKm) },
    {
      label: 'end reactors',
      corridor: corridor(perKm, 190, {
        buses: [{ name: 'Aldwyn', reactors: [reactor('A-R', 100)] }, { name: 'Brecken Moor' }, { name: 'Corrish', reactors: [reactor('C-R', 100)] }],
      }),
      switching: { transfer: { unitsOut: ['A-R', 'C-R'] } },
    },
    {
      label: 'end reactors left in',
      corridor: corridor(perKm, 190, {
        buses: [{ name: 'Aldwyn', reactors: [reactor('A-R', 100)] }, { name: 'Brecken Moor' }, { name: 'Corrish', reactors: [reactor('C-R', 100)] }],
      }),
    },
    { label: 'mid reactors in', corridor: corridor(perKm, 190, { buses: withMid({ reactors: [reactor('B-R', 150)] }) }) },
    { label: 'mid capacitors', corridor: corridor(perKm, 190, { buses: withMid({ capacitors: [reactor('B-C', 150)] }) }) },
    { label: 'series 30 %', corridor: corridor(perKm, 190, { segmentOhm: 0.3 * 380 * 0.32 }) },
    { label: 'series 50 %', corridor: corridor(perKm, 190, { segmentOhm: 0.5 * 380 * 0.32 }) },
  ]);
  const limit = (label: string) => result.alternatives.find((item) => item.label === label)!.maximumTransferMw;

  test('leaves the maximum transfer unchanged with shunt reactors switched out, or in at the held end buses', () => {
    expect(limit('end reactors')).toBe(limit('none'));
    expect(limit('end reactors left in') / limit('none')).toBeCloseTo(1, 9);
  });

  test('lowers the maximum transfer with reactors in at the mid bus and raises it with capacitors there', () => {
    expect(limit('mid reactors in')).toBeLessThan(limit('none'));
    expect(limit('mid capacitors')).toBeGreaterThan(limit('none'));
  });

  test('raises the maximum transfer more with series capacitors than with the shunt alternatives, and more at the higher degree', () => {
    expect(limit('series 30 %')).toBeGreaterThan(limit('mid capacitors'));
    expect(limit('series 50 %')).toBeGreaterThan(limit('series 30 %'));
  });

  test('gives the loadability in multiples of the uncompensated natural load', () => {
    for (const item of result.alternatives) expect(item.loadabilitySil).toBeCloseTo(item.loadabilityMw / result.surgeImpedanceLoadingMw, 12);
  });
});

describe('compareCompensationAlternatives: costs, criteria and the recommendation', () => {
  test('prices each unit by its rating and a series segment by 3 I^2 Xc', () => {
    const result = compare([
      { label: 'mixed', corridor: corridor(perKm, 190, { buses: withMid({ reactors: [reactor('B-R', 150)] }), segmentOhm: 30 }), otherCost: 100 },
    ]);
    const item = result.alternatives[0]!;
    const seriesMvar = (3 * 2000 ** 2 * 30) / 1e6;
    expect(item.equipment.map((unit) => [unit.name, unit.ratingMvar])).toEqual([
      ['B-R', 150],
      ['BM-SC', seriesMvar],
    ]);
    expect(item.equipmentCost).toBeCloseTo(100 + 150 * 10 + seriesMvar * 12, 9);
  });

  test('recommends the cheapest alternative that meets every criterion, not the cheapest outright', () => {
    const result = compare(
      [
        { label: 'none', corridor: corridor(perKm) },
        { label: 'series 50 %', corridor: corridor(perKm, 190, { segmentOhm: 0.5 * 380 * 0.32 }) },
      ],
      { targetTransferMw: 1200 },
    );
    const [none, series] = result.alternatives;
    expect(none!.costRank).toBe(1);
    expect(none!.criteria.find((item) => item.criterion === 'transfer')!.passed).toBe(false);
    expect(series!.allCriteriaMet).toBe(true);
    expect(result.recommended).toBe('series 50 %');
  });

  test('counts a criterion the study judges itself, so that an alternative failing it is not recommended', () => {
    const series = { label: 'series 50 %', corridor: corridor(perKm, 190, { segmentOhm: 0.5 * 380 * 0.32 }) };
    const result = compare([{ ...series, studyCriteria: [{ name: 'resonance screen', passed: false, value: 1.2, limit: 2, unit: 'Hz' }] }], {
      targetTransferMw: 1200,
    });
    const item = result.alternatives[0]!;
    expect(item.criteria.at(-1)).toMatchObject({ criterion: 'study', name: 'resonance screen', passed: false, value: 1.2, limit: 2 });
    expect(item.allCriteriaMet).toBe(false);
    expect(result.recommended).toBeNull();
  });

  test('keeps an alternative whose peak case has no operating point, with no peak figures and its operating-point criterion failed', () => {
    const heavy = [cases[0]!, { label: 'transfer', loading: { kind: 'transfer' as const, pMw: 4000 } }];
    const result = compare([{ label: 'none', corridor: corridor(perKm) }], { cases: heavy });
    const item = result.alternatives[0]!;
    expect(item.peakLowestPu).toBeNull();
    expect(item.peakLossesMw).toBeNull();
    expect(item.criteria.find((entry) => entry.criterion === 'operating-point')!.passed).toBe(false);
  });

  test('names the allowed cases when the peak case is not one of them (out-of-range)', () => {
    expect(() => compare([{ label: 'none', corridor: corridor(perKm) }], { peakCase: 'winter' })).toThrow(SolverDomainError);
    try {
      compare([{ label: 'none', corridor: corridor(perKm) }], { peakCase: 'winter' });
    } catch (error) {
      expect((error as SolverDomainError).code).toBe('out-of-range');
      expect((error as SolverDomainError).quantity).toBe('peakCase');
    }
  });
});
