import { describe, expect, test } from 'vitest';
import {
  SolverDomainError,
  cascade,
  lineModel,
  reverseTwoPort,
  seriesCapacitor,
  seriesImpedance,
  shuntCapacitor,
  shuntReactor,
  sourceEquivalent,
  symmetricalPi,
  twoPortFromAbcd,
} from '../../src/solver/index.ts';

const line = lineModel({
  frequencyHz: 50,
  seriesResistanceOhmPerKm: 0.03,
  seriesReactanceOhmPerKm: 0.32,
  shuntSusceptanceUsPerKm: 3.6,
  lengthKm: 250,
});

describe('seriesCapacitor', () => {
  test('puts -jXc in the B parameter', () => {
    const capacitor = seriesCapacitor({ reactanceOhm: 40 });
    expect(capacitor.B).toEqual({ re: 0, im: -40 });
    expect(capacitor.A).toEqual({ re: 1, im: 0 });
    expect(capacitor.C).toEqual({ re: 0, im: 0 });
  });

  test('sizes the reactance as a degree of the line series reactance x * length', () => {
    expect(seriesCapacitor({ degreeOfCompensation: 0.5, compensatedLine: line }).reactanceOhm).toBeCloseTo(0.5 * 0.32 * 250, 12);
  });

  test('rejects a degree of compensation of 1 with a readable message', () => {
    expect(() => seriesCapacitor({ degreeOfCompensation: 1, compensatedLine: line })).toThrow(
      'degreeOfCompensation = 1 is outside the allowed range (0, 1)',
    );
  });
});

describe('shunt elements', () => {
  // Definition: Q = V^2 B (three-phase, line-to-line V), reactor susceptance negative.
  test('gives a shunt reactor the susceptance -Q / V^2', () => {
    expect(shuntReactor({ qMvar: 150, ratedVoltageKv: 500 }).C.im).toBeCloseTo(-150e6 / 500e3 ** 2, 15);
  });

  test('gives a shunt capacitor the susceptance +Q / V^2', () => {
    expect(shuntCapacitor({ qMvar: 100, ratedVoltageKv: 230 }).admittanceS.im).toBeCloseTo(100e6 / 230e3 ** 2, 15);
  });

  test('refuses a capacitive admittance for a reactor', () => {
    expect(() => shuntReactor({ admittanceS: { re: 0, im: 1e-4 } })).toThrow(SolverDomainError);
  });
});

describe('sourceEquivalent', () => {
  // Definition: |Z| = V^2 / S_sc at angle atan(X/R).
  test('derives the Thevenin impedance from short-circuit MVA and X/R', () => {
    const source = sourceEquivalent({ end: 'sending', shortCircuitMva: 10_000, xOverR: 10, nominalVoltageKv: 400 });
    expect(Math.hypot(source.B.re, source.B.im)).toBeCloseTo(16, 10);
    expect(source.B.im / source.B.re).toBeCloseTo(10, 10);
  });
});

describe('lumped elements from totals', () => {
  test('gives a series impedance R + jX the ABCD [1, Z; 0, 1]', () => {
    const element = seriesImpedance({ resistanceOhm: 4, reactanceOhm: 35 });
    expect(element.B).toEqual({ re: 4, im: 35 });
    expect(element.A).toEqual({ re: 1, im: 0 });
    expect(element.C).toEqual({ re: 0, im: 0 });
  });

  // Glover, Sarma & Overbye, Example 5.2 (from memory): the nominal pi of the 765 kV, 300 km line has B = 99.3 ohm at 87.14 deg;
  // a symmetrical pi from the totals Z = z l and Y = y l is that nominal pi.
  test('builds the nominal pi of the Glover example from total Z and Y', () => {
    const pi = symmetricalPi({ seriesImpedanceOhm: { re: 0.0165 * 300, im: 0.3306 * 300 }, shuntAdmittanceS: { re: 0, im: 4.674e-6 * 300 } });
    const nominal = lineModel({
      frequencyHz: 60,
      seriesResistanceOhmPerKm: 0.0165,
      seriesReactanceOhmPerKm: 0.3306,
      shuntSusceptanceUsPerKm: 4.674,
      lengthKm: 300,
      model: 'nominal-pi',
    });
    expect(Math.abs(Math.hypot(pi.B.re, pi.B.im) - 99.3)).toBeLessThanOrEqual(0.05);
    for (const key of ['A', 'B', 'C', 'D'] as const) {
      expect(pi[key].re).toBeCloseTo(nominal[key].re, 12);
      expect(pi[key].im).toBeCloseTo(nominal[key].im, 12);
    }
  });

  // Glover, Sarma & Overbye, Example 5.2 (from memory): exact ABCD A = D = 0.9313 at 0.209 deg, B = 97.0 ohm at 87.2 deg,
  // C = 1.37e-3 S at 90.06 deg; rounded to the printed digits they keep AD - BC = 1 to about 1e-4.
  const polarValue = (magnitude: number, angleDeg: number) => ({
    re: magnitude * Math.cos((angleDeg * Math.PI) / 180),
    im: magnitude * Math.sin((angleDeg * Math.PI) / 180),
  });
  const gloverAbcd = { A: polarValue(0.9313, 0.209), B: polarValue(97.0, 87.2), C: polarValue(1.37e-3, 90.06), D: polarValue(0.9313, 0.209) };

  test('accepts the printed ABCD of the Glover example within the rounding tolerance given', () => {
    const element = twoPortFromAbcd({ ...gloverAbcd, tolerance: 1e-3, label: 'printed ABCD' });
    expect(element.kind).toBe('given-two-port');
    expect(element.B).toEqual(gloverAbcd.B);
  });

  test('refuses given ABCD values that break AD - BC = 1', () => {
    expect(() => twoPortFromAbcd({ ...gloverAbcd, A: polarValue(0.95, 0.209), tolerance: 1e-3 })).toThrow(/AD - BC/);
  });
});

describe('reverseTwoPort', () => {
  // Identity: energised from the other end, a reciprocal two-port [A B; C D] becomes [D B; C A].
  test('swaps A and D and keeps B and C, element by element', () => {
    const line = lineModel({
      frequencyHz: 50,
      seriesResistanceOhmPerKm: 0.03,
      seriesReactanceOhmPerKm: 0.32,
      shuntSusceptanceUsPerKm: 3.6,
      lengthKm: 250,
    });
    const source = sourceEquivalent({ end: 'sending', shortCircuitMva: 8000, xOverR: 12, nominalVoltageKv: 400 });
    const network = cascade({ elements: [source, line, shuntReactor({ qMvar: 90, ratedVoltageKv: 400 }), seriesCapacitor({ reactanceOhm: 20 })] });
    const reversed = reverseTwoPort({ network });
    for (const [mine, theirs] of [
      ['A', 'D'],
      ['B', 'B'],
      ['C', 'C'],
      ['D', 'A'],
    ] as const) {
      expect(reversed[mine].re).toBeCloseTo(network[theirs].re, 9);
      expect(reversed[mine].im).toBeCloseTo(network[theirs].im, 9);
    }
    expect(reversed.elements.map((element) => element.kind)).toEqual(['series-capacitor', 'shunt-reactor', 'line-section', 'source-equivalent']);
    const last = reversed.elements[3];
    expect(last?.kind === 'source-equivalent' ? last.end : null).toBe('receiving');
  });
});
