import { describe, expect, test } from 'vitest';
import { SolverDomainError, lineModel, seriesCapacitor, shuntCapacitor, shuntReactor, sourceEquivalent } from '../../src/solver/index.ts';

const line = lineModel({ frequencyHz: 50, seriesResistanceOhmPerKm: 0.03, seriesReactanceOhmPerKm: 0.32, shuntSusceptanceUsPerKm: 3.6, lengthKm: 250 });

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
    expect(() => seriesCapacitor({ degreeOfCompensation: 1, compensatedLine: line })).toThrow('degreeOfCompensation = 1 is outside the allowed range (0, 1)');
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
