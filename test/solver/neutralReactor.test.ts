import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { SolverDomainError, neutralReactorDesign } from '../../src/solver/index.ts';

// An invented 500 kV, 60 Hz, 400 km line (C1 12.5, C0 8.0 nF/km), 70 % shunt compensation: data for the identities below.
const line = {
  frequencyHz: 60,
  voltageKv: 525,
  lengthKm: 400,
  positiveSequenceCapacitanceNfPerKm: 12.5,
  zeroSequenceCapacitanceNfPerKm: 8,
  shuntCompensationDegree: 0.7,
};
const omega = 2 * Math.PI * 60;
const phaseVoltageV = 525e3 / Math.sqrt(3);
const interphaseF = ((12.5 - 8) / 3) * 1e-9 * 400;
const groundF = 8e-9 * 400;

describe('neutralReactorDesign', () => {
  // Kimbark, "Suppression of ground-fault arcs on single-pole-switched EHV lines by shunt reactors", IEEE Trans. PAS-83 (1964),
  // the neutral reactor for full cancellation (from memory): Xn = Xp^2 / (X12 - 3 Xp), X12 the interphase capacitive reactance.
  test('gives the neutral reactor of full cancellation as Xp^2 / (X12 - 3 Xp)', () => {
    const design = neutralReactorDesign(line);
    const xp = design.phaseReactor.reactanceOhmPerPhase;
    const x12 = 1 / (omega * interphaseF);
    expect(design.neutralReactor.reactanceOhm / (xp ** 2 / (x12 - 3 * xp))).toBeCloseTo(1, 12);
  });

  test('sizes the phase reactors from the shunt compensation degree', () => {
    const design = neutralReactorDesign(line);
    expect(design.phaseReactor.qMvarThreePhase / design.chargingMvar).toBeCloseTo(0.7, 12);
  });

  // Without reactors the open phase is a capacitive divider (Kimbark 1964, from memory): I = V w C12 l, V_r = V C12 / (C0 + 2 C12).
  test('gives the capacitive-divider arc current and recovery voltage of an uncompensated line', () => {
    const { withoutReactors } = neutralReactorDesign(line).secondaryArc;
    expect(withoutReactors.capacitiveCurrentA).toBeCloseTo(phaseVoltageV * omega * interphaseF, 9);
    expect(withoutReactors.recoveryVoltagePu).toBeCloseTo(interphaseF / (groundF + 2 * interphaseF), 12);
  });

  test('leaves the arc current of a solidly grounded reactor bank equal to that of the bare line', () => {
    const { solidlyGroundedNeutral, withoutReactors } = neutralReactorDesign(line).secondaryArc;
    expect(solidlyGroundedNeutral.capacitiveCurrentA).toBeCloseTo(withoutReactors.capacitiveCurrentA, 9);
  });

  test('drives the capacitive secondary arc current and the recovery voltage to zero at full cancellation (identity)', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 9, max: 15, noNaN: true }),
        fc.double({ min: 0.4, max: 0.85, noNaN: true }),
        fc.double({ min: 0.05, max: 0.6, noNaN: true }),
        fc.double({ min: 50, max: 800, noNaN: true }),
        (c1, c0Share, headroom, lengthKm) => {
          const degree = 1 - c0Share + headroom * c0Share;
          const design = neutralReactorDesign({
            frequencyHz: 50,
            voltageKv: 420,
            lengthKm,
            positiveSequenceCapacitanceNfPerKm: c1,
            zeroSequenceCapacitanceNfPerKm: c0Share * c1,
            shuntCompensationDegree: degree,
          });
          const reference = design.secondaryArc.withoutReactors.capacitiveCurrentA;
          expect(design.secondaryArc.withNeutralReactor.capacitiveCurrentA).toBeLessThan(1e-9 * reference);
          expect(design.secondaryArc.withNeutralReactor.recoveryVoltagePu).toBeLessThan(1e-9);
        },
      ),
      { numRuns: 80 },
    );
  });

  test('scales the capacitive arc current with the uncancelled share of the interphase capacitance', () => {
    const half = neutralReactorDesign({ ...line, interphaseCancellation: 0.5 });
    expect(half.secondaryArc.withNeutralReactor.capacitiveCurrentA / half.secondaryArc.withoutReactors.capacitiveCurrentA).toBeCloseTo(0.5, 12);
  });

  test('needs no neutral reactor for zero cancellation', () => {
    expect(neutralReactorDesign({ ...line, interphaseCancellation: 0 }).neutralReactor.reactanceOhm).toBeCloseTo(0, 9);
  });

  test('refuses full cancellation below the degree 1 - C0/C1, naming that degree', () => {
    const call = () => neutralReactorDesign({ ...line, shuntCompensationDegree: 0.3 });
    expect(call).toThrow(SolverDomainError);
    expect(call).toThrow(/1 - C0\/C1 = 0\.36/);
  });

  test('rates the neutral reactor for V Xn / (3 Xn + Xp) while the arc burns, per bank', () => {
    const single = neutralReactorDesign(line);
    const twoBanks = neutralReactorDesign({ ...line, reactorBankCount: 2 });
    const { reactanceOhm } = single.neutralReactor;
    const xp = single.phaseReactor.reactanceOhmPerPhase;
    expect(single.neutralReactor.rating.arcingVoltageKv).toBeCloseTo((phaseVoltageV * reactanceOhm) / (3 * reactanceOhm + xp) / 1e3, 9);
    expect(twoBanks.neutralReactor.perBank.reactanceOhm).toBeCloseTo(2 * reactanceOhm, 6);
    expect(twoBanks.neutralReactor.rating.shortTimeCurrentAPerBank).toBeCloseTo(single.neutralReactor.rating.shortTimeCurrentAPerBank / 2, 9);
  });

  test('makes the induced arc current vanish for a fault at mid-line and peak at the line ends', () => {
    const coupling = { loadCurrentA: 1500, mutualImpedanceOhmPerKm: { re: 0.09, im: 0.28 } };
    const middle = neutralReactorDesign({ ...line, interphaseCancellation: 0.8, inductiveCoupling: { ...coupling, faultPositionPu: 0.5 } });
    const end = neutralReactorDesign({ ...line, interphaseCancellation: 0.8, inductiveCoupling: coupling });
    const quarter = neutralReactorDesign({ ...line, interphaseCancellation: 0.8, inductiveCoupling: { ...coupling, faultPositionPu: 0.25 } });
    expect(middle.secondaryArc.inductiveCurrentA).toBeCloseTo(0, 12);
    expect(quarter.secondaryArc.inductiveCurrentA! / end.secondaryArc.inductiveCurrentA!).toBeCloseTo(0.5, 12);
  });

  test('flags an arc current over the common-practice limit', () => {
    const design = neutralReactorDesign({ ...line, interphaseCancellation: 0, secondaryArcLimitA: 20 });
    expect(design.secondaryArc.withinLimit).toBe(false);
    expect(design.secondaryArc.limitBasis).toBe('common practice');
    expect(design.warnings.some((warning) => warning.includes('self-extinction limit'))).toBe(true);
  });
});
