import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import {
  SolverDomainError,
  cascade,
  checkReciprocity,
  lineModel,
  seriesCapacitor,
  seriesReactor,
  shuntCapacitor,
  shuntReactor,
  sourceEquivalent,
} from '../../src/solver/index.ts';
import type { TwoPort } from '../../src/solver/index.ts';

const lineArbitrary = fc.record({
  frequencyHz: fc.constantFrom(50, 60),
  seriesResistanceOhmPerKm: fc.double({ min: 0, max: 0.1, noNaN: true }),
  seriesReactanceOhmPerKm: fc.double({ min: 0.2, max: 0.5, noNaN: true }),
  shuntSusceptanceUsPerKm: fc.double({ min: 2.5, max: 5.5, noNaN: true }),
  lengthKm: fc.double({ min: 1, max: 800, noNaN: true }),
  model: fc.constantFrom('distributed' as const, 'nominal-pi' as const, 'short' as const),
});

const elementArbitrary: fc.Arbitrary<TwoPort> = fc.oneof(
  lineArbitrary.map((options) => lineModel(options)),
  fc.double({ min: 1, max: 200, noNaN: true }).map((reactanceOhm) => seriesCapacitor({ reactanceOhm })),
  fc.double({ min: 1, max: 200, noNaN: true }).map((reactanceOhm) => seriesReactor({ reactanceOhm })),
  fc.double({ min: 10, max: 300, noNaN: true }).map((qMvar) => shuntReactor({ qMvar, ratedVoltageKv: 500 })),
  fc.double({ min: 10, max: 300, noNaN: true }).map((qMvar) => shuntCapacitor({ qMvar, ratedVoltageKv: 500 })),
  fc
    .double({ min: 1000, max: 50000, noNaN: true })
    .map((shortCircuitMva) => sourceEquivalent({ end: 'sending', shortCircuitMva, xOverR: 15, nominalVoltageKv: 500 })),
);

describe('cascade', () => {
  // Identity: every passive reciprocal two-port, and so every cascade of them, has AD - BC = 1.
  test('keeps AD - BC = 1 for any cascade of line sections and compensation elements', () => {
    fc.assert(
      fc.property(fc.array(elementArbitrary, { minLength: 1, maxLength: 8 }), (elements) => {
        const network = cascade({ elements });
        const determinant = {
          re: network.A.re * network.D.re - network.A.im * network.D.im - (network.B.re * network.C.re - network.B.im * network.C.im),
          im: network.A.re * network.D.im + network.A.im * network.D.re - (network.B.re * network.C.im + network.B.im * network.C.re),
        };
        expect(Math.hypot(determinant.re - 1, determinant.im)).toBeLessThan(1e-9);
        expect(checkReciprocity({ network }).ok).toBe(true);
      }),
    );
  });

  // Identity: a network that reads the same from both ends has A = D.
  test('gives A = D for a symmetric arrangement of reactor, half line, capacitor, half line, reactor', () => {
    fc.assert(
      fc.property(
        lineArbitrary,
        fc.double({ min: 0.1, max: 0.7, noNaN: true }),
        fc.double({ min: 10, max: 300, noNaN: true }),
        (lineOptions, degree, reactorMvar) => {
          const half = lineModel({ ...lineOptions, lengthKm: lineOptions.lengthKm / 2 });
          const whole = lineModel(lineOptions);
          const reactor = shuntReactor({ qMvar: reactorMvar, ratedVoltageKv: 500 });
          const network = cascade({
            elements: [reactor, half, seriesCapacitor({ degreeOfCompensation: degree, compensatedLine: whole }), half, reactor],
          });
          expect(network.A.re).toBeCloseTo(network.D.re, 9);
          expect(network.A.im).toBeCloseTo(network.D.im, 9);
        },
      ),
    );
  });

  test('flattens nested cascades into one element list', () => {
    const line = lineModel({
      frequencyHz: 50,
      seriesResistanceOhmPerKm: 0.03,
      seriesReactanceOhmPerKm: 0.3,
      shuntSusceptanceUsPerKm: 3.8,
      lengthKm: 100,
    });
    const inner = cascade({ elements: [line, line] });
    expect(cascade({ elements: [inner, line] }).elements).toHaveLength(3);
  });
});

describe('checkReciprocity', () => {
  test('names the element whose ABCD values were tampered with', () => {
    const line = lineModel({
      frequencyHz: 50,
      seriesResistanceOhmPerKm: 0.03,
      seriesReactanceOhmPerKm: 0.3,
      shuntSusceptanceUsPerKm: 3.8,
      lengthKm: 100,
      label: 'Heronsgate circuit',
    });
    const tampered = { ...line, A: { re: line.A.re * 1.01, im: line.A.im } };
    const network = { ...cascade({ elements: [line] }), elements: [line, tampered] };
    expect(() => checkReciprocity({ network })).toThrow(SolverDomainError);
    expect(() => checkReciprocity({ network })).toThrow(/element 1 \('Heronsgate circuit', line-section\)/);
    try {
      checkReciprocity({ network });
    } catch (error) {
      expect((error as SolverDomainError).code).toBe('reciprocity-violated');
    }
  });

  // Consistency: a cascade's ABCD is the product of its elements' ABCD; a hand-edited total that still has AD - BC = 1 is caught.
  test('names a cascade whose stored ABCD differs from the product of its elements', () => {
    const line = lineModel({
      frequencyHz: 50,
      seriesResistanceOhmPerKm: 0.03,
      seriesReactanceOhmPerKm: 0.3,
      shuntSusceptanceUsPerKm: 3.8,
      lengthKm: 100,
    });
    const other = lineModel({
      frequencyHz: 50,
      seriesResistanceOhmPerKm: 0.03,
      seriesReactanceOhmPerKm: 0.3,
      shuntSusceptanceUsPerKm: 3.8,
      lengthKm: 150,
    });
    const network = { ...cascade({ elements: [line] }), A: other.A, B: other.B, C: other.C, D: other.D };
    expect(() => checkReciprocity({ network })).toThrow(/product of its 1 element/);
  });
});
