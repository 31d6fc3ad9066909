import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { SolverDomainError, lineCharacteristics, lineModel, solveFixedSendingVoltage } from '../../src/solver/index.ts';

const perKm = { frequencyHz: 50, seriesResistanceOhmPerKm: 0.03, seriesReactanceOhmPerKm: 0.32, shuntSusceptanceUsPerKm: 3.6 };

function caught(action: () => unknown): SolverDomainError {
  try {
    action();
  } catch (error) {
    if (error instanceof SolverDomainError) return error;
    throw error;
  }
  throw new Error('expected a SolverDomainError');
}

describe('SolverDomainError', () => {
  test('reads on its own for a negative length', () => {
    const error = caught(() => lineModel({ ...perKm, lengthKm: -5 }));
    expect(error.message).toMatch(/^lengthKm = -5 is outside the allowed range \(0, 5000\] km\. /);
    expect(error).toMatchObject({ code: 'out-of-range', quantity: 'lengthKm', value: -5, allowedRange: '(0, 5000] km' });
    expect(error.hint.length).toBeGreaterThan(0);
  });

  test('quotes a number rounded in its sentence and keeps it exact in its value', () => {
    const lengthKm = 5000.000000000123;
    const error = caught(() => lineModel({ ...perKm, lengthKm }));
    expect(error.message).toMatch(/^lengthKm = 5000 is outside the allowed range/);
    expect(error.diagnostics[0]?.actual).toBe(lengthKm);
  });

  test('rejects zero frequency', () => {
    expect(caught(() => lineModel({ ...perKm, frequencyHz: 0, lengthKm: 100 })).quantity).toBe('frequencyHz');
  });

  test('reports a missing quantity as missing-quantity', () => {
    const options = { frequencyHz: 50, seriesResistanceOhmPerKm: 0.03, shuntSusceptanceUsPerKm: 3.6, lengthKm: 100 };
    expect(caught(() => lineModel(options as never)).code).toBe('missing-quantity');
  });

  test('reports NaN and Infinity inputs as not-a-finite-number', () => {
    expect(caught(() => lineModel({ ...perKm, lengthKm: Number.NaN })).code).toBe('not-a-finite-number');
    expect(caught(() => lineModel({ ...perKm, lengthKm: Number.POSITIVE_INFINITY })).code).toBe('not-a-finite-number');
  });

  test('flags inconsistent reactance and inductance', () => {
    expect(caught(() => lineModel({ ...perKm, seriesInductanceMhPerKm: 2, lengthKm: 100 })).code).toBe('inconsistent-quantities');
  });

  test('survives JSON with its fields', () => {
    const error = caught(() => lineModel({ ...perKm, lengthKm: -5 }));
    expect(JSON.parse(JSON.stringify(error))).toMatchObject({ name: 'SolverDomainError', code: 'out-of-range', quantity: 'lengthKm', value: -5 });
  });

  test('reports a load beyond the nose as no-operating-point', () => {
    const line = lineModel({ ...perKm, lengthKm: 300 });
    expect(caught(() => solveFixedSendingVoltage({ network: line, sendingVoltageKv: 400, load: { pMw: 50000, qMvar: 0 } })).code).toBe(
      'no-operating-point',
    );
  });

  // Property: any numeric input either gives finite results or a SolverDomainError, never NaN or Infinity.
  test('never returns NaN or Infinity for arbitrary numeric inputs', () => {
    fc.assert(
      fc.property(fc.double(), fc.double(), fc.double(), fc.double(), (lengthKm, resistance, reactance, susceptance) => {
        try {
          const result = lineCharacteristics({
            frequencyHz: 50,
            seriesResistanceOhmPerKm: resistance,
            seriesReactanceOhmPerKm: reactance,
            shuntSusceptanceUsPerKm: susceptance,
            lengthKm,
            nominalVoltageKv: 400,
          });
          expect(JSON.stringify(result)).not.toMatch(/null|NaN|Infinity/);
        } catch (error) {
          expect(error).toBeInstanceOf(SolverDomainError);
        }
      }),
    );
  });
});
