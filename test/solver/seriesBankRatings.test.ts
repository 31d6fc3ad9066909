import { describe, expect, test } from 'vitest';
import { seriesBankRatings, solveCorridorCases, type CorridorInput } from '../../src/solver/index.ts';
import { perKm } from './corridorSupport.ts';

const REACTANCE_OHM = 25;
/** An invented double-circuit corridor whose second section carries a mid-section series segment on each circuit. */
const corridor: CorridorInput = {
  frequencyHz: 50,
  nominalVoltageKv: 400,
  sendingSystem: { shortCircuitMva: 15000, xOverR: 12, emfKv: 410 },
  receivingSystem: { shortCircuitMva: 12000, xOverR: 12, emfKv: 400 },
  buses: [{ name: 'Ferrow' }, { name: 'Gallin Cross' }, { name: 'Ardwick Sound' }],
  sections: [
    { from: 'Ferrow', to: 'Gallin Cross', lengthKm: 160, circuits: 2, ...perKm },
    {
      from: 'Gallin Cross',
      to: 'Ardwick Sound',
      lengthKm: 220,
      circuits: 2,
      ...perKm,
      seriesCapacitors: [{ name: 'SC-G', position: 'mid-section', reactanceOhm: REACTANCE_OHM, ratedCurrentA: 2000 }],
    },
  ],
};
const table = solveCorridorCases({
  corridor,
  cases: [
    { label: 'winter peak', loading: { kind: 'transfer', pMw: 1400 } },
    { label: 'summer day', loading: { kind: 'transfer', pMw: 900 } },
    { label: 'one circuit out, peak', loading: { kind: 'transfer', pMw: 1400 }, circuitsOut: ['Gallin Cross - Ardwick Sound'] },
  ],
});
const currentIn = (label: string) => {
  const solution = table.cases.find((candidate) => candidate.label === label);
  if (!solution?.solved) throw new Error(`${label} unsolved`);
  return solution.sections[1]!.seriesCapacitors[0]!.currentA;
};

describe('series capacitor segment ratings from the case table', () => {
  test('rates for the highest normal-case current with the margin, rounded up to the rating step', () => {
    const ratings = seriesBankRatings({ table, segment: 'SC-G', designMarginPercent: 10, ratingStepA: 100 });
    const peakA = currentIn('one circuit out, peak');
    // Unmarked, the contingency is a normal case too, and the largest current.
    expect(ratings.continuousDuty).toEqual({ currentArms: peakA, case: 'one circuit out, peak' });
    expect(ratings.ratedCurrentArms).toBe(Math.ceil((peakA * 1.1) / 100) * 100);
    expect(ratings.governedBy).toBe('continuous');
  });

  test('holds a contingency to the 30-minute overload duty of 1.35 pu, so the rating may be set by the emergency', () => {
    const ratings = seriesBankRatings({ table, segment: 'SC-G', emergencyCases: ['one circuit out, peak'], ratingStepA: 10 });
    const normalA = currentIn('winter peak');
    const emergencyA = currentIn('one circuit out, peak');
    expect(ratings.continuousDuty.case).toBe('winter peak');
    expect(ratings.emergencyDuty).toMatchObject({
      currentArms: emergencyA,
      case: 'one circuit out, peak',
      heldTo: { currentPu: 1.35, durationMinutes: 30 },
    });
    expect(ratings.ratedCurrentArms).toBe(Math.ceil(Math.max(normalA, emergencyA / 1.35) / 10) * 10);
    expect(ratings.overloadDuties.find((duty) => duty.durationMinutes === 30)!.currentArms).toBeGreaterThanOrEqual(emergencyA);
  });

  test('gives the capacitor rated voltage I Xc (rms), three-phase Mvar 3 I^2 Xc and the protective level k sqrt 2 I Xc (peak)', () => {
    const ratings = seriesBankRatings({ table, segment: 'SC-G', protectiveLevelPu: 2.2 });
    const ratedA = ratings.ratedCurrentArms;
    expect(ratings.reactanceOhm).toBeCloseTo(REACTANCE_OHM, 9);
    expect(ratings.ratedVoltageKvRms).toBeCloseTo((ratedA * REACTANCE_OHM) / 1e3, 9);
    expect(ratings.ratedMvar).toBeCloseTo((3 * ratedA ** 2 * REACTANCE_OHM) / 1e6, 9);
    // Q = 3 V I per phase quantities: the identity ties the two ratings together.
    expect(ratings.ratedMvar).toBeCloseTo((3 * ratings.ratedVoltageKvRms * ratedA) / 1e3, 9);
    expect(ratings.protectiveLevelKvPeak).toBeCloseTo(2.2 * Math.SQRT2 * ratings.ratedVoltageKvRms, 9);
  });

  test('refuses an emergency case the table does not have, and a segment it does not have', () => {
    expect(() => seriesBankRatings({ table, segment: 'SC-G', emergencyCases: ['N-1'] })).toThrow(
      expect.objectContaining({ code: 'out-of-range', quantity: 'emergencyCases[0]' }),
    );
    expect(() => seriesBankRatings({ table, segment: 'SC-X' })).toThrow(
      expect.objectContaining({ code: 'out-of-range', quantity: 'segment', allowedRange: "one of 'SC-G'" }),
    );
  });

  test('rates for a swing current held to its swing capability, and says whether the swing stays below the protective level', () => {
    // Twice the highest case current, held to 1.7 pu, needs more than the cases do.
    const swingA = 2 * currentIn('one circuit out, peak');
    const ratings = seriesBankRatings({
      table,
      segment: 'SC-G',
      ratingStepA: 10,
      protectiveLevelPu: 2.3,
      swing: { currentArms: swingA, capabilityPu: 1.7, durationSeconds: 3 },
    });
    expect(ratings.governedBy).toBe('swing');
    expect(ratings.ratedCurrentArms).toBe(Math.ceil(swingA / 1.7 / 10) * 10);
    // The swing's peak capacitor voltage sqrt 2 I Xc against k sqrt 2 I_rated Xc: below it exactly when I_swing < k I_rated.
    expect(ratings.swingDuty!.capacitorVoltageKvPeak).toBeCloseTo((Math.SQRT2 * swingA * REACTANCE_OHM) / 1e3, 6);
    expect(ratings.swingDuty!.belowProtectiveLevel).toBe(swingA < 2.3 * ratings.ratedCurrentArms);
  });
});
