import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { SolverDomainError, varistorEnergy } from '../../src/solver/index.ts';
import { goldsworthyEquivalent } from '../../src/solver/varistorEnergy.ts';

// An invented bank: 30 ohm per phase, rated 2000 A, protective level 2.3 pu of the rated peak capacitor voltage.
const bank = {
  capacitorReactanceOhm: 30,
  ratedCurrentA: 2000,
  protectiveLevelPu: 2.3,
  faultDurationMs: 100,
  capabilityMjPerPhase: 40,
  faultLocation: 'external' as const,
};
const protectiveCurrentA = 2.3 * 2000; // Vpl / (sqrt 2 Xc) with Vpl = 2.3 sqrt 2 I_rated Xc

describe('varistorEnergy', () => {
  test('leaves the varistor idle below 0.98 of the protective-level current (Goldsworthy threshold)', () => {
    const duty = varistorEnergy({ ...bank, faultCurrentA: 0.95 * protectiveCurrentA });
    expect(duty.varistorConducts).toBe(false);
    expect(duty.energyMjPerPhase).toBe(0);
    expect(duty.equivalentReactanceOhm).toBe(30);
    expect(duty.bypassNeeded).toBe(false);
  });

  test('finds the protective-level current Vpl / (sqrt 2 Xc) from either form of the protective level', () => {
    const fromPu = varistorEnergy({ ...bank, faultCurrentA: 8000 });
    const fromKv = varistorEnergy({
      ...bank,
      ratedCurrentA: undefined,
      protectiveLevelPu: undefined,
      protectiveLevelKvPeak: (2.3 * Math.SQRT2 * 2000 * 30) / 1e3,
      faultCurrentA: 8000,
    });
    expect(fromPu.protectiveLevelCurrentA).toBeCloseTo(protectiveCurrentA, 9);
    expect(fromKv.energyMjPerPhase).toBeCloseTo(fromPu.energyMjPerPhase, 12);
  });

  // Goldsworthy (IEEE Trans. Power Delivery, 1987), as used by Anderson & Farmer (1996): the fitted reactance starts at Xc at the threshold (from memory).
  test('starts the fitted reactance at Xc where the varistor begins to conduct', () => {
    expect(goldsworthyEquivalent(0.98 + 1e-9).reactancePu).toBeCloseTo(1, 2);
  });

  test('keeps the fundamental capacitor voltage below 4/pi of the protective level, the bound for any waveform clipped there (identity)', () => {
    fc.assert(
      fc.property(fc.double({ min: 0.99, max: 10, noNaN: true }), (ratio) => {
        const duty = varistorEnergy({ ...bank, faultCurrentA: ratio * protectiveCurrentA });
        expect(duty.capacitorVoltageKvRms * Math.SQRT2).toBeLessThanOrEqual((4 / Math.PI) * duty.protectiveLevelKvPeak);
      }),
      { numRuns: 200 },
    );
  });

  test('puts the power I^2 R_eq into the varistor, equal to V times its in-phase current from the current split (identity)', () => {
    fc.assert(
      fc.property(fc.double({ min: 0.99, max: 10, noNaN: true }), (ratio) => {
        const currentA = ratio * protectiveCurrentA;
        const duty = varistorEnergy({ ...bank, faultCurrentA: currentA });
        const r = duty.equivalentResistanceOhm / 30;
        const x = duty.equivalentReactanceOhm / 30;
        // V = I (R - jX), I_mov = I (1 - x - j r): Re(V conj(I_mov)) = I^2 (R (1 - x) + X r).
        const varistorPowerW = currentA ** 2 * 30 * (r * (1 - x) + x * r);
        expect(duty.varistorPowerMwPerPhase * 1e6).toBeCloseTo(varistorPowerW, 3);
        expect(duty.energyMjPerPhase).toBeCloseTo(duty.varistorPowerMwPerPhase * 0.1, 9);
      }),
      { numRuns: 100 },
    );
  });

  test('calls for a fast bypass, with the time it has, when the energy exceeds the capability', () => {
    const duty = varistorEnergy({ ...bank, faultCurrentA: 20000, faultDurationMs: 250, capabilityMjPerPhase: 20 });
    expect(duty.bypassNeeded).toBe(true);
    expect(duty.timeToCapabilityMs).toBeCloseTo((20 / duty.varistorPowerMwPerPhase) * 1e3, 9);
    expect(duty.reason).toMatch(/fast bypass/);
    expect(duty.warnings.some((warning) => warning.includes('external fault'))).toBe(true);
  });

  test('solves the fault current with the bank in the loop: I |Z + Z_eq(I)| = E', () => {
    const impedanceOhm = { re: 2, im: 20 };
    const duty = varistorEnergy({ ...bank, faultCircuit: { sourceVoltageKv: 420, impedanceOhm } });
    const loopOhm = Math.hypot(impedanceOhm.re + duty.equivalentResistanceOhm, impedanceOhm.im - duty.equivalentReactanceOhm);
    expect(duty.varistorConducts).toBe(true);
    expect((duty.faultCurrentA * loopOhm) / (420e3 / Math.sqrt(3))).toBeCloseTo(1, 6);
  });

  test('refuses a fault current beyond the range of the linearised model', () => {
    expect(() => varistorEnergy({ ...bank, faultCurrentA: 11 * protectiveCurrentA })).toThrow(SolverDomainError);
  });
});
