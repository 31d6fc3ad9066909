import { describe, expect, test } from 'vitest';
import { SolverDomainError, lineModel, seriesCompensationDesign } from '../../src/solver/index.ts';

// A short lossless 400 km line model isolates the textbook relation P = V^2 sin(delta) / (X (1 - k)).
const line = lineModel({
  frequencyHz: 50,
  seriesResistanceOhmPerKm: 0,
  seriesReactanceOhmPerKm: 0.3,
  shuntSusceptanceUsPerKm: 0,
  lengthKm: 400,
  model: 'short',
  label: 'Marrow Fen line',
});
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

  test('quotes the through-fault current rounded in its note', () => {
    // 15 000 MVA at 400 kV: I = S / (sqrt(3) V) = 21650.635... A.
    const throughFaultCurrentA = 15000e3 / (Math.sqrt(3) * 400);
    const { note } = seriesCompensationDesign({ ...base, targetTransferMw: 1000, throughFaultCurrentA }).throughFault;
    expect(note).toContain('A through fault of 21650.6 A');
  });

  test('reports that the varistor conducts when a through fault drives the capacitor above the protective level', () => {
    expect(seriesCompensationDesign({ ...base, targetTransferMw: 1000 }).throughFault.varistorConducts).toBe(true);
    expect(seriesCompensationDesign({ ...base, targetTransferMw: 1000, throughFaultCurrentA: 3000 }).throughFault.varistorConducts).toBe(false);
  });

  // A varistor conducting on an external fault is its normal duty; whether the bypass must close depends on the energy it absorbs.
  test('says plainly that the bypass decision rests on varistor energy, not on conduction', () => {
    expect(seriesCompensationDesign({ ...base, targetTransferMw: 1000 }).throughFault.note).toMatch(/normal.*energy/s);
  });

  // Lossless series path: the current is the same everywhere, I = |Vs - Vr| / (sqrt(3) X (1 - k)) with X (1 - k) = V^2 sin(delta) / P = 80 ohm.
  test('gives the current the bank carries at the design point and warns when it exceeds the rating', () => {
    const design = seriesCompensationDesign({ ...base, targetTransferMw: 1000, ratedCurrentA: 1000, emergencyCurrentA: 1600 });
    const expectedA = (400e3 * 2 * Math.sin(Math.PI / 12)) / (Math.sqrt(3) * 80);
    expect(design.designPoint.bankCurrentA).toBeCloseTo(expectedA, 6);
    expect(design.designPoint.angleDeg).toBeCloseTo(30, 6);
    expect(design.warnings.join(' ')).toMatch(/carries 1494 A at the design point, above its rated current of 1000 A/);
  });

  test('checks the bank current in the cases given', () => {
    const design = seriesCompensationDesign({ ...base, targetTransferMw: 1000, cases: [{ label: 'winter export', transferMw: 1200 }] });
    const [winter] = design.cases;
    expect(winter?.label).toBe('winter export');
    // P = V^2 sin(delta) / 80 ohm gives delta = asin(0.6) for 1200 MW.
    expect(winter?.angleDeg).toBeCloseTo((Math.asin(0.6) * 180) / Math.PI, 6);
    expect(winter?.bankCurrentA).toBeCloseTo((400e3 * 2 * Math.sin(Math.asin(0.6) / 2)) / (Math.sqrt(3) * 80), 6);
  });

  // Lossless path: on each side of a mid-line bank V = Vs - j (X / 2) I and V + j Xc I.
  test('reports the voltages at the bank terminals and mid-line at the design point', () => {
    const design = seriesCompensationDesign({ ...base, targetTransferMw: 1000 });
    const angle = Math.PI / 6;
    const current = { re: (400 * Math.cos(angle) - 400) / 80, im: (400 * Math.sin(angle)) / 80 }; // (Vs - Vr) / (j 80), in kV / ohm
    const i = { re: current.im, im: -current.re };
    const before = { re: 400 * Math.cos(angle) + 60 * i.im, im: 400 * Math.sin(angle) - 60 * i.re };
    const after = { re: before.re - design.reactanceOhm * i.im, im: before.im + design.reactanceOhm * i.re };
    expect(design.designPoint.bankTerminalVoltagesKv.sendingSide).toBeCloseTo(Math.hypot(before.re, before.im), 6);
    expect(design.designPoint.bankTerminalVoltagesKv.receivingSide).toBeCloseTo(Math.hypot(after.re, after.im), 6);
    expect(design.designPoint.midLineVoltageKv).toBeCloseTo(Math.hypot(before.re, before.im), 6);
  });

  test('splits the line around a mid-line bank', () => {
    const design = seriesCompensationDesign({ ...base, targetTransferMw: 1000 });
    expect(design.compensatedNetwork.elements.map((element) => element.kind)).toEqual(['line-section', 'series-capacitor', 'line-section']);
  });

  test('throws transfer-limit-exceeded when even the largest degree falls short', () => {
    const attempt = () => seriesCompensationDesign({ ...base, targetTransferMw: 5000 });
    expect(attempt).toThrow(SolverDomainError);
    expect(attempt).toThrow(expect.objectContaining({ code: 'transfer-limit-exceeded' }));
    expect(attempt).toThrow(/targetTransferMw = 5000 is outside the allowed range \(0, 3333\.33\] MW/);
  });

  test('needs no bank when the line already carries the target', () => {
    expect(seriesCompensationDesign({ ...base, targetTransferMw: 500 }).compensationNeeded).toBe(false);
  });
});

// A short line with much resistance (R = 40 ohm, X = 120 ohm): at a fixed angle the transfer peaks near k = 0.5 and falls toward
// k = 0.8 as the net reactance goes to zero and arg Z falls toward the resistance angle.
describe('seriesCompensationDesign on a lossy line', () => {
  const lossy = lineModel({
    frequencyHz: 50,
    seriesResistanceOhmPerKm: 0.1,
    seriesReactanceOhmPerKm: 0.3,
    shuntSusceptanceUsPerKm: 0,
    lengthKm: 400,
    model: 'short',
    label: 'Sallow Moss line',
  });
  const lossyBase = { ...base, line: lossy };
  // P_r = V^2 (cos(beta - delta) - cos beta) / |Z| with Z = R + jX(1 - k), beta = arg Z.
  const transferMw = (degree: number) => {
    const reactance = 120 * (1 - degree);
    const beta = Math.atan2(reactance, 40);
    return (400 ** 2 * (Math.cos(beta - Math.PI / 6) - Math.cos(beta))) / Math.hypot(40, reactance);
  };

  test('finds the smallest degree reaching a target that the largest degree no longer reaches', () => {
    expect(transferMw(0.8)).toBeLessThan(700);
    const design = seriesCompensationDesign({ ...lossyBase, targetTransferMw: 700 });
    expect(transferMw(design.degreeOfCompensation)).toBeCloseTo(700, 6);
    expect(transferMw(design.degreeOfCompensation - 1e-4)).toBeLessThan(700);
  });

  test('quotes the true maximum transfer when the target is out of reach', () => {
    const degrees = Array.from({ length: 8001 }, (_, index) => (0.8 * index) / 8000);
    const maximumMw = Math.max(...degrees.map(transferMw));
    const attempt = () => seriesCompensationDesign({ ...lossyBase, targetTransferMw: 900 });
    expect(attempt).toThrow(SolverDomainError);
    expect(attempt).toThrow(new RegExp(`\\(0, ${maximumMw.toPrecision(6).replace('.', '\\.')}\\] MW`));
  });
});
