import { Complex } from 'complex.js';
import { describe, expect, test } from 'vitest';
import { sizeReactorsAcrossCases, type CorridorInput } from '../../src/solver/index.ts';
import { perKm } from './corridorSupport.ts';

const LENGTH_KM = 400;
const RATED_KV = 420;
const HELD_KV = 400;

/** One section energised from a bus held at 400 kV; the far end is open. */
const radial: CorridorInput = {
  frequencyHz: 50,
  nominalVoltageKv: 400,
  sendingSystem: { shortCircuitMva: 20000, xOverR: 15, heldVoltageKv: HELD_KV },
  receivingSystem: { shortCircuitMva: 8000, xOverR: 12, emfKv: 400 },
  buses: [{ name: 'Harlow Gate' }, { name: 'Osric Fell' }],
  sections: [{ from: 'Harlow Gate', to: 'Osric Fell', lengthKm: LENGTH_KM, ...perKm }],
};
const energise = { label: 'energised from Harlow Gate', loading: { kind: 'energisation' as const, closedEnd: 'sending' as const } };

/**
 * The highest voltage along the line (in per unit of 400 kV) with a reactor of totalMvar (at RATED_KV) at the open end, from the
 * exact long-line equations measured from the open end: V(d) = V_r (cosh(gamma d) + Zc Y sinh(gamma d)), Y = -j Q / V_rated^2, and
 * V_s = V(l) held (Glover, Sarma & Overbye, Power System Analysis and Design, 5th ed., §5.2, the distributed-parameter line). With a
 * reactor that over-compensates the open end, the highest voltage is inside the line, not at its end.
 */
function highestAlongLinePu(totalMvar: number): number {
  const z = new Complex(perKm.seriesResistanceOhmPerKm, perKm.seriesReactanceOhmPerKm);
  const y = new Complex(0, perKm.shuntSusceptanceUsPerKm * 1e-6);
  const gamma = z.mul(y).sqrt();
  const surgeImpedance = z.div(y).sqrt();
  const reactorAdmittance = new Complex(0, -totalMvar / RATED_KV ** 2);
  const gain = (distanceKm: number) =>
    gamma
      .mul(distanceKm)
      .cosh()
      .add(surgeImpedance.mul(gamma.mul(distanceKm).sinh()).mul(reactorAdmittance));
  const openEndKv = HELD_KV / gain(LENGTH_KM).abs();
  let highestKv = 0;
  for (let point = 0; point <= 4000; point += 1) highestKv = Math.max(highestKv, openEndKv * gain((LENGTH_KM * point) / 4000).abs());
  return highestKv / 400;
}

/** The rise of the open-end voltage, in per cent, when one unit of unitMvar of the reactor total is switched out (same closed form). */
function openEndStepPercent(totalMvar: number, unitMvar: number): number {
  const z = new Complex(perKm.seriesResistanceOhmPerKm, perKm.seriesReactanceOhmPerKm);
  const y = new Complex(0, perKm.shuntSusceptanceUsPerKm * 1e-6);
  const gammaL = z.mul(y).sqrt().mul(LENGTH_KM);
  const surgeImpedance = z.div(y).sqrt();
  const openEndKv = (mvar: number) =>
    HELD_KV /
    gammaL
      .cosh()
      .add(surgeImpedance.mul(gammaL.sinh()).mul(new Complex(0, -mvar / RATED_KV ** 2)))
      .abs();
  return ((openEndKv(totalMvar - unitMvar) - openEndKv(totalMvar)) / openEndKv(totalMvar)) * 100;
}

/** The smallest reactor (Mvar at RATED_KV) that holds the open end at or below maxPu, by bisection on the closed form. */
function requiredMvar(maxPu: number): number {
  let low = 0;
  let high = 1000;
  for (let step = 0; step < 60; step += 1) {
    const middle = (low + high) / 2;
    if (highestAlongLinePu(middle) > maxPu) low = middle;
    else high = middle;
  }
  return high;
}

describe('reactor sizing across operating cases', () => {
  test('picks the smallest standard rating that holds the open end of an energised line within the band, as the exact two-port says', () => {
    const ratingsMvar = [30, 50, 80, 100, 150];
    const required = requiredMvar(1.05);
    // The example is chosen so that the answer is not near a rating.
    expect(required).toBeGreaterThan(55);
    expect(required).toBeLessThan(75);
    const sizing = sizeReactorsAcrossCases({
      corridor: radial,
      buses: ['Osric Fell'],
      ratingsMvar,
      ratedVoltageKv: RATED_KV,
      cases: [{ case: energise }],
      bandPu: { min: 0.95, max: 1.05 },
      stepLimitPercent: 12,
      maxUnitsPerBus: 1,
    });
    const expected = ratingsMvar.find((rating) => rating >= required);
    expect(sizing.chosen?.totalMvar).toBe(expected);
    expect(sizing.chosen?.cases[0]?.highestPu).toBeCloseTo(highestAlongLinePu(expected!), 4);
  });

  test('lists every smaller option as considered and failing on the high voltage it leaves', () => {
    const sizing = sizeReactorsAcrossCases({
      corridor: radial,
      buses: ['Osric Fell'],
      ratingsMvar: [30, 50, 80],
      ratedVoltageKv: RATED_KV,
      cases: [{ case: energise }],
      bandPu: { min: 0.95, max: 1.05 },
      stepLimitPercent: 12,
      maxUnitsPerBus: 1,
    });
    expect(sizing.considered.map((option) => [option.totalMvar, option.feasible])).toEqual([
      [0, false],
      [30, false],
      [50, false],
      [80, true],
    ]);
    const failure = sizing.considered[1]!.failure!;
    expect(failure).toMatchObject({ case: 'energised from Harlow Gate', criterion: 'voltage-high', limit: 1.05 });
    expect(failure.value).toBeCloseTo(highestAlongLinePu(30), 4);
  });

  test('with the largest unit out as a case, sizes so that the units left still hold the band', () => {
    const ratingsMvar = [30, 50, 80, 100];
    const required = requiredMvar(1.05);
    const sizing = sizeReactorsAcrossCases({
      corridor: radial,
      buses: ['Osric Fell'],
      ratingsMvar,
      ratedVoltageKv: RATED_KV,
      cases: [
        { case: energise, sizedUnits: 'in' },
        { case: { ...energise, label: 'energised, one reactor out' }, sizedUnits: 'largest-out' },
      ],
      bandPu: { min: 0.9, max: 1.05 },
      stepLimitPercent: 12,
      maxUnitsPerBus: 2,
    });
    // Two identical units, each alone enough: the smallest rating at or above the requirement, twice.
    const each = ratingsMvar.find((rating) => rating >= required)!;
    expect(sizing.chosen?.allotment).toEqual([{ bus: 'Osric Fell', unitCount: 2, unitMvar: each, totalMvar: 2 * each }]);
  });

  test('refuses an option whose switching step exceeds the limit, the step being the closed-form change on switching one unit out', () => {
    const stepLimitPercent = 4;
    const sizing = sizeReactorsAcrossCases({
      corridor: radial,
      buses: ['Osric Fell'],
      ratingsMvar: [30, 40, 50, 80],
      ratedVoltageKv: RATED_KV,
      cases: [{ case: energise, checkSteps: true }],
      bandPu: { min: 0.9, max: 1.05 },
      stepLimitPercent,
      maxUnitsPerBus: 2,
    });
    // Independently: options in ascending total, the first within the band whose one-unit-out step is within the limit.
    const options = [30, 40, 50, 80]
      .flatMap((unitMvar) => [1, 2].map((count) => ({ unitMvar, count, totalMvar: unitMvar * count })))
      .sort((a, b) => a.totalMvar - b.totalMvar || a.count - b.count);
    const expected = options.find(({ unitMvar, totalMvar }) => {
      return highestAlongLinePu(totalMvar) <= 1.05 && openEndStepPercent(totalMvar, unitMvar) <= stepLimitPercent;
    })!;
    expect(expected.count).toBe(2);
    expect(sizing.chosen?.allotment[0]).toMatchObject({ unitCount: expected.count, unitMvar: expected.unitMvar });
    const refused = sizing.considered.find((option) => option.failure?.criterion === 'switching-step');
    expect(refused?.failure?.value).toBeGreaterThan(stepLimitPercent);
  });

  test('finds mirrored options equally feasible on a mirror-symmetric corridor energised from either end (a physical symmetry)', () => {
    const symmetrical: CorridorInput = {
      frequencyHz: 50,
      nominalVoltageKv: 400,
      sendingSystem: { shortCircuitMva: 6000, xOverR: 12, emfKv: 405 },
      receivingSystem: { shortCircuitMva: 6000, xOverR: 12, emfKv: 405 },
      buses: [{ name: 'North' }, { name: 'Middle' }, { name: 'South' }],
      sections: [
        { from: 'North', to: 'Middle', lengthKm: 220, ...perKm },
        { from: 'Middle', to: 'South', lengthKm: 220, ...perKm },
      ],
    };
    const sizing = sizeReactorsAcrossCases({
      corridor: symmetrical,
      buses: ['North', 'South'],
      ratingsMvar: [100, 150, 200, 250],
      ratedVoltageKv: RATED_KV,
      cases: [
        { case: { label: 'from North', loading: { kind: 'energisation', closedEnd: 'sending' } } },
        { case: { label: 'from South', loading: { kind: 'energisation', closedEnd: 'receiving' } } },
      ],
      bandPu: { min: 0.9, max: 1.06 },
      stepLimitPercent: 5,
      maxUnitsPerBus: 1,
    });
    const key = (north: number, south: number) => `${north}/${south}`;
    const feasible = new Map(
      sizing.considered.map((option) => [key(option.allotment[0]!.totalMvar, option.allotment[1]!.totalMvar), option.feasible]),
    );
    for (const [pair, ok] of feasible) {
      const [north, south] = pair.split('/');
      const mirrored = feasible.get(key(Number(south), Number(north)));
      if (mirrored !== undefined) expect(mirrored).toBe(ok);
    }
    expect(sizing.chosen).not.toBeNull();
    // Among the options of the least total, the even split is preferred.
    const [north, south] = sizing.chosen!.allotment;
    expect(north!.totalMvar).toBe(south!.totalMvar);
  });

  test('leaves the switching step of an energisation case unchecked unless asked, and checks it in a case with both ends closed', () => {
    const options = {
      corridor: radial,
      buses: ['Osric Fell'],
      ratingsMvar: [80],
      ratedVoltageKv: RATED_KV,
      bandPu: { min: 0.9, max: 1.05 },
      stepLimitPercent: 0.5,
      maxUnitsPerBus: 1,
    };
    expect(sizeReactorsAcrossCases({ ...options, cases: [{ case: energise }] }).chosen?.cases[0]?.largestStepPercent).toBeNull();
    // The energisation case needs the 80 Mvar unit; switching it at light load, with both systems connected, moves the bus by more than 0.5 %.
    const closed = sizeReactorsAcrossCases({
      ...options,
      cases: [{ case: energise }, { case: { label: 'light load', loading: { kind: 'receiving-load', pMw: 100, qMvar: 0 } } }],
    });
    expect(closed.considered.at(-1)?.failure).toMatchObject({ case: 'light load', criterion: 'switching-step', limit: 0.5 });
  });

  test('reports that no option meets every case when the ratings are too small, with every option it tried', () => {
    const sizing = sizeReactorsAcrossCases({
      corridor: radial,
      buses: ['Osric Fell'],
      ratingsMvar: [10],
      ratedVoltageKv: RATED_KV,
      cases: [{ case: energise }],
      bandPu: { min: 0.95, max: 1.05 },
      stepLimitPercent: 12,
      maxUnitsPerBus: 1,
    });
    expect(sizing.chosen).toBeNull();
    expect(sizing.corridor).toBeNull();
    expect(sizing.reason).toMatch(/no combination .* 10 Mvar at Osric Fell meets every case/);
    expect(sizing.considered).toHaveLength(2);
  });

  test('returns the corridor with the chosen units added, so that the case table can be solved with them', () => {
    const sizing = sizeReactorsAcrossCases({
      corridor: radial,
      buses: ['Osric Fell'],
      ratingsMvar: [80],
      ratedVoltageKv: RATED_KV,
      cases: [{ case: energise }],
      bandPu: { min: 0.95, max: 1.05 },
      stepLimitPercent: 12,
      maxUnitsPerBus: 1,
    });
    expect(sizing.corridor?.buses[1]?.reactors).toEqual([{ name: 'Osric Fell sized reactor 1', qMvar: 80, ratedVoltageKv: RATED_KV }]);
  });

  test('refuses a candidate bus the corridor does not have, naming the buses it has', () => {
    expect(() =>
      sizeReactorsAcrossCases({
        corridor: radial,
        buses: ['Osric Fel'],
        ratingsMvar: [80],
        ratedVoltageKv: RATED_KV,
        cases: [{ case: energise }],
        bandPu: { min: 0.95, max: 1.05 },
        stepLimitPercent: 12,
      }),
    ).toThrow(expect.objectContaining({ code: 'out-of-range', quantity: 'buses[0]', allowedRange: "one of 'Harlow Gate', 'Osric Fell'" }));
  });

  test('refuses a band whose top is below its bottom', () => {
    expect(() =>
      sizeReactorsAcrossCases({
        corridor: radial,
        buses: ['Osric Fell'],
        ratingsMvar: [80],
        ratedVoltageKv: RATED_KV,
        cases: [{ case: energise }],
        bandPu: { min: 1.05, max: 0.95 },
        stepLimitPercent: 12,
      }),
    ).toThrow(expect.objectContaining({ code: 'out-of-range', quantity: 'bandPu.max' }));
  });
});
