import { describe, expect, test } from 'vitest';
import { SolverDomainError, lineModel, seriesCompensationDesign } from '../../src/solver/index.ts';

// A short lossless 400 km line model isolates the textbook relation P = V^2 sin(delta) / (X (1 - k)).
const line = lineModel({ frequencyHz: 50, seriesResistanceOhmPerKm: 0, seriesReactanceOhmPerKm: 0.3, shuntSusceptanceUsPerKm: 0, lengthKm: 400, model: 'short', label: 'Marrow Fen line' });
const base = {
  line,
  sendingVoltageKv: 400,
  receivingVoltageKv: 400,
  angleLimitDeg: 30,
  ratedCurrentA: 2000,
  emergencyCurrentA: 2500,
  throughFaultCurrentA: 20000,
};

describe('seriesCompensationDesign', () => {
  test('finds k = 1 - V^2 sin(delta) / (X P) for a lossless reactance', () => {
    const design = seriesCompensationDesign({ ...base, targetTransferMw: 1000 });
    const expected = 1 - (400 ** 2 * Math.sin(Math.PI / 6)) / (120 * 1000);
    expect(design.degreeOfCompensation).toBeCloseTo(expected, 9);
    expect(design.reactanceOhm).toBeCloseTo(expected * 120, 7);
  });

  test('rates the bank at 3 I^2 Xc and the capacitor voltage at I Xc', () => {
    const design = seriesCompensationDesign({ ...base, targetTransferMw: 1000 });
    expect(design.threePhaseMvarAtRatedCurrent).toBeCloseTo((3 * 2000 ** 2 * design.reactanceOhm) / 1e6, 9);
    expect(design.capacitorVoltageAtRatedCurrentKv).toBeCloseTo((2000 * design.reactanceOhm) / 1e3, 9);
    expect(design.capacitorVoltageAtEmergencyCurrentKv).toBeCloseTo((2500 * design.reactanceOhm) / 1e3, 9);
  });

  // 2.0 to 2.5 pu of rated capacitor voltage is common practice for the MOV protective level; default 2.3 pu.
  test('sets the protective level at the chosen multiple of the rated capacitor peak voltage', () => {
    const design = seriesCompensationDesign({ ...base, targetTransferMw: 1000, protectiveLevelPu: 2.2 });
    expect(design.protectiveLevelPeakKv).toBeCloseTo(2.2 * Math.SQRT2 * design.capacitorVoltageAtRatedCurrentKv, 9);
  });

  test('calls for a bypass when a through fault drives the capacitor above the protective level', () => {
    expect(seriesCompensationDesign({ ...base, targetTransferMw: 1000 }).bypass.needed).toBe(true);
    expect(seriesCompensationDesign({ ...base, targetTransferMw: 1000, throughFaultCurrentA: 3000 }).bypass.needed).toBe(false);
  });

  test('splits the line around a mid-line bank', () => {
    const design = seriesCompensationDesign({ ...base, targetTransferMw: 1000 });
    expect(design.compensatedNetwork.elements.map((element) => element.kind)).toEqual(['line-section', 'series-capacitor', 'line-section']);
  });

  test('throws TRANSFER_LIMIT_EXCEEDED when even the largest degree falls short', () => {
    const attempt = () => seriesCompensationDesign({ ...base, targetTransferMw: 5000 });
    expect(attempt).toThrow(SolverDomainError);
    expect(attempt).toThrow(/targetTransferMw = 5000 is outside the allowed range \(0, 3333\.33\] MW/);
  });

  test('needs no bank when the line already carries the target', () => {
    expect(seriesCompensationDesign({ ...base, targetTransferMw: 500 }).compensationNeeded).toBe(false);
  });
});
