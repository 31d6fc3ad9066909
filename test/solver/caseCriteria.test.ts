import { describe, expect, test } from 'vitest';
import { corridorCaseCriteria, solveCorridorCases, type CorridorInput } from '../../src/solver/index.ts';
import { perKm } from './corridorSupport.ts';

/** An invented two-section corridor with a series segment on the second section and a reactor that light-load cases switch in. */
const corridor: CorridorInput = {
  frequencyHz: 50,
  nominalVoltageKv: 400,
  sendingSystem: { shortCircuitMva: 12000, xOverR: 12, emfKv: 410 },
  receivingSystem: { shortCircuitMva: 9000, xOverR: 12, emfKv: 400 },
  buses: [
    { name: 'Wendle', reactors: [{ name: 'RW', qMvar: 100, ratedVoltageKv: 420, inService: false }] },
    { name: 'Carrick Moss' },
    { name: 'Brannock' },
  ],
  sections: [
    { from: 'Wendle', to: 'Carrick Moss', lengthKm: 180, ...perKm },
    {
      from: 'Carrick Moss',
      to: 'Brannock',
      lengthKm: 200,
      ...perKm,
      seriesCapacitors: [{ name: 'SC-B', position: 'mid-section', reactanceOhm: 25, ratedCurrentA: 1500, emergencyCurrentA: 2000 }],
    },
  ],
};

const table = solveCorridorCases({
  corridor,
  cases: [
    { label: 'night, reactor in', loading: { kind: 'transfer', pMw: 200 }, unitsIn: ['RW'] },
    { label: 'peak', loading: { kind: 'transfer', pMw: 1000 } },
    { label: 'energised from Wendle', loading: { kind: 'energisation', closedEnd: 'sending' } },
    { label: 'beyond the nose', loading: { kind: 'transfer', pMw: 40000 } },
  ],
});
const segmentCurrentA = (label: string) => {
  const solution = table.cases.find((candidate) => candidate.label === label);
  if (!solution?.solved) throw new Error(`${label} unsolved`);
  return solution.sections[1]!.seriesCapacitors[0]!.currentA;
};

describe('design criteria over a case table', () => {
  test('judges an unsolved case as failing its operating point, with the reason, without stopping the others', () => {
    const criteria = corridorCaseCriteria({ table, bandPu: { min: 0.9, max: 1.1 } });
    const unsolved = criteria.rows.filter((row) => row.case === 'beyond the nose');
    expect(unsolved).toHaveLength(1);
    expect(unsolved[0]).toMatchObject({ criterion: 'operating-point', passed: false, margin: null });
    expect(unsolved[0]!.note).not.toBe('');
    expect(criteria.rows.filter((row) => row.case === 'peak').length).toBeGreaterThan(1);
    expect(criteria.allPassed).toBe(false);
  });

  test('finds the highest voltage of every case, the worst case being the open line, and fails it against a tight band', () => {
    const criteria = corridorCaseCriteria({ table, bandPu: { min: 0.9, max: 1.05 } });
    const band = criteria.summary.find((entry) => entry.criterion === 'voltage-band')!;
    const energised = table.cases.find((solution) => solution.label === 'energised from Wendle');
    if (!energised?.solved) throw new Error('energisation unsolved');
    const highestPu = Math.max(...energised.buses.map((bus) => bus.voltagePu), ...energised.sections.map((section) => section.maximum.voltagePu));
    expect(highestPu).toBeGreaterThan(1.05);
    expect(band.worst).toMatchObject({ case: 'energised from Wendle', passed: false, limit: 1.05 });
    expect(band.worst.value).toBe(highestPu);
    expect(band.worst.margin).toBeCloseTo(1.05 - highestPu, 12);
  });

  test('holds a normal case to the continuous bank rating and a case marked as a contingency to the emergency rating', () => {
    const peakA = segmentCurrentA('peak');
    // The example is made so that the peak current lies between the two ratings.
    expect(peakA).toBeGreaterThan(1500);
    expect(peakA).toBeLessThan(2000);
    const normal = corridorCaseCriteria({ table, bandPu: { min: 0.8, max: 1.2 } });
    const emergency = corridorCaseCriteria({ table, bandPu: { min: 0.8, max: 1.2 }, cases: { peak: { bankRating: 'emergency' } } });
    const peakRow = (criteria: typeof normal) => criteria.rows.find((row) => row.case === 'peak' && row.criterion === 'series-bank-current')!;
    expect(peakRow(normal)).toMatchObject({ passed: false, limit: 1500, where: 'SC-B' });
    expect(peakRow(emergency)).toMatchObject({ passed: true, limit: 2000 });
  });

  test('judges the angle between the end buses only in cases with both systems connected', () => {
    const criteria = corridorCaseCriteria({ table, bandPu: { min: 0.8, max: 1.2 }, maxAngleDeg: 30 });
    const angleCases = criteria.rows.filter((row) => row.criterion === 'corridor-angle').map((row) => row.case);
    expect(angleCases).toEqual(['night, reactor in', 'peak']);
    const peak = table.cases.find((solution) => solution.label === 'peak');
    if (!peak?.solved) throw new Error('peak unsolved');
    const row = criteria.rows.find((candidate) => candidate.case === 'peak' && candidate.criterion === 'corridor-angle')!;
    expect(row.value).toBeCloseTo(Math.abs(peak.buses[0]!.angleDeg - peak.buses[2]!.angleDeg), 12);
  });

  test('holds a case with its own angle limit to that limit', () => {
    const peakAngle = (() => {
      const peak = table.cases.find((solution) => solution.label === 'peak');
      if (!peak?.solved) throw new Error('peak unsolved');
      return Math.abs(peak.buses[0]!.angleDeg - peak.buses[2]!.angleDeg);
    })();
    const criteria = corridorCaseCriteria({
      table,
      bandPu: { min: 0.8, max: 1.2 },
      maxAngleDeg: peakAngle - 1,
      cases: { peak: { maxAngleDeg: peakAngle + 1 } },
    });
    const rows = criteria.rows.filter((row) => row.criterion === 'corridor-angle');
    expect(rows.find((row) => row.case === 'peak')).toMatchObject({ passed: true, limit: peakAngle + 1 });
    expect(rows.find((row) => row.case === 'night, reactor in')).toMatchObject({ limit: peakAngle - 1 });
  });

  test('gives the study band to every case unless a case has its own', () => {
    const criteria = corridorCaseCriteria({
      table,
      bandPu: { min: 0.9, max: 1.05 },
      cases: { 'energised from Wendle': { bandPu: { min: 0.9, max: 1.2 } } },
    });
    const energisedHigh = criteria.rows.find((row) => row.case === 'energised from Wendle' && row.criterion === 'voltage-band' && row.limit === 1.2);
    expect(energisedHigh?.passed).toBe(true);
  });

  test('refuses settings for a case the table does not have', () => {
    expect(() => corridorCaseCriteria({ table, bandPu: { min: 0.9, max: 1.05 }, cases: { Peak: { bankRating: 'emergency' } } })).toThrow(
      expect.objectContaining({ code: 'out-of-range', quantity: 'cases.Peak' }),
    );
  });
});
