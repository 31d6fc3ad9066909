import { Complex } from 'complex.js';
import { describe, expect, test } from 'vitest';
import { corridorFault, varistorEnergy, type CorridorInput } from '../../src/solver/index.ts';
import { perKm } from './corridorSupport.ts';

const NOMINAL_KV = 400;
const SYSTEM_MVA = 10000;
const X_OVER_R = 10;
const LENGTH_KM = 300;
const C_MAX = 1.1;

function corridorWith(options: { segment?: { reactanceOhm: number }; susceptanceUsPerKm?: number } = {}): CorridorInput {
  return {
    frequencyHz: 50,
    nominalVoltageKv: NOMINAL_KV,
    sendingSystem: { shortCircuitMva: SYSTEM_MVA, xOverR: X_OVER_R, emfKv: 400 },
    receivingSystem: { shortCircuitMva: 8000, xOverR: 12, emfKv: 400 },
    buses: [{ name: 'Tarrow' }, { name: 'Quill End' }],
    sections: [
      {
        from: 'Tarrow',
        to: 'Quill End',
        lengthKm: LENGTH_KM,
        ...perKm,
        ...(options.susceptanceUsPerKm === undefined ? {} : { shuntSusceptanceUsPerKm: options.susceptanceUsPerKm }),
        ...(options.segment
          ? { seriesCapacitors: [{ name: 'SC1', position: 'sending-end' as const, reactanceOhm: options.segment.reactanceOhm, ratedCurrentA: 2000 }] }
          : {}),
      },
    ],
  };
}
/** The receiving system is open: the corridor is a radial feeder from Tarrow. */
const radialCase = { label: 'radial from Tarrow', loading: { kind: 'energisation' as const, closedEnd: 'sending' as const } };

/** IEC 60909-0 network feeder: Z_Q = c U_n^2 / S''_kQ at the angle atan(X/R). */
function feederImpedanceOhm(): Complex {
  const magnitude = (C_MAX * NOMINAL_KV ** 2) / SYSTEM_MVA;
  const angle = Math.atan(X_OVER_R);
  return new Complex(magnitude * Math.cos(angle), magnitude * Math.sin(angle));
}

/** The exact long-line ABCD (Glover, Sarma & Overbye, Power System Analysis and Design, 5th ed., §5.2). */
function lineAbcd(susceptanceUsPerKm = perKm.shuntSusceptanceUsPerKm, lengthKm = LENGTH_KM): { a: Complex; b: Complex; c: Complex } {
  const z = new Complex(perKm.seriesResistanceOhmPerKm, perKm.seriesReactanceOhmPerKm);
  const y = new Complex(0, susceptanceUsPerKm * 1e-6);
  const gammaL = z.mul(y).sqrt().mul(lengthKm);
  const surgeImpedance = z.div(y).sqrt();
  return { a: gammaL.cosh(), b: surgeImpedance.mul(gammaL.sinh()), c: gammaL.sinh().div(surgeImpedance) };
}

const sourcePhaseV = (C_MAX * NOMINAL_KV * 1e3) / Math.sqrt(3);

describe('faults on a corridor case', () => {
  test('at the feeding bus, draws the feeder in parallel with the open line, Zc coth(gamma l), at c U_n / sqrt 3 (IEC 60909-0)', () => {
    const { a, c } = lineAbcd();
    const feeder = feederImpedanceOhm();
    const openLine = a.div(c);
    const parallel = feeder.mul(openLine).div(feeder.add(openLine));
    const fault = corridorFault({ corridor: corridorWith(), case: radialCase, at: { bus: 'Tarrow' } });
    expect(fault.faultCurrentKa).toBeCloseTo(sourcePhaseV / parallel.abs() / 1e3, 6);
    // The feeder alone would give the stated strength; the open line is capacitive, so in parallel it lowers the current a little.
    expect(fault.shortCircuitMva).toBeLessThan(SYSTEM_MVA);
    expect(fault.shortCircuitMva).toBeGreaterThan(SYSTEM_MVA * 0.95);
  });

  test('at the far end of a radial line, draws E / Z_th with Z_th = (B + Z D) / (A + Z C) of the line fed through the feeder', () => {
    const { a, b, c } = lineAbcd();
    const feeder = feederImpedanceOhm();
    const thevenin = b.add(feeder.mul(a)).div(a.add(feeder.mul(c)));
    const fault = corridorFault({ corridor: corridorWith(), case: radialCase, at: { bus: 'Quill End' } });
    expect(fault.faultCurrentKa).toBeCloseTo(sourcePhaseV / thevenin.abs() / 1e3, 6);
  });

  test('carries E / |B + Z D| through a linear series capacitor at the sending end, its reactance added to the feeder', () => {
    const reactanceOhm = 40;
    const { a, b } = lineAbcd();
    const feederAndBank = feederImpedanceOhm().add(new Complex(0, -reactanceOhm));
    const fault = corridorFault({ corridor: corridorWith({ segment: { reactanceOhm } }), case: radialCase, at: { bus: 'Quill End' } });
    const segment = fault.segments[0]!;
    expect(segment.inserted).toBe(true);
    expect(segment.currentA).toBeCloseTo(sourcePhaseV / b.add(feederAndBank.mul(a)).abs(), 3);
    expect(segment.currentA).toBe(segment.linearCurrentA);
    expect(segment.varistorConducts).toBe(false);
    expect(segment.capacitorVoltageKvPeak).toBeCloseTo((Math.SQRT2 * segment.currentA * reactanceOhm) / 1e3, 9);
    expect(fault.iterations).toBe(0);
  });

  test('with a protective level, settles on the same bank current as the one-loop Goldsworthy solution when the line charging is negligible', () => {
    const reactanceOhm = 40;
    const protectiveLevelKvPeak = 150;
    const susceptanceUsPerKm = 1e-4;
    const fault = corridorFault({
      corridor: corridorWith({ segment: { reactanceOhm }, susceptanceUsPerKm }),
      case: radialCase,
      at: { bus: 'Quill End' },
      protectiveLevelsKvPeak: { SC1: protectiveLevelKvPeak },
    });
    const loop = feederImpedanceOhm().add(new Complex(perKm.seriesResistanceOhmPerKm, perKm.seriesReactanceOhmPerKm).mul(LENGTH_KM));
    const oneLoop = varistorEnergy({
      capacitorReactanceOhm: reactanceOhm,
      protectiveLevelKvPeak,
      faultCircuit: { sourceVoltageKv: C_MAX * NOMINAL_KV, impedanceOhm: { re: loop.re, im: loop.im } },
      faultDurationMs: 100,
      capabilityMjPerPhase: 50,
      faultLocation: 'internal',
    });
    const segment = fault.segments[0]!;
    expect(segment.varistorConducts).toBe(true);
    expect(segment.currentA / oneLoop.faultCurrentA).toBeCloseTo(1, 4);
    // The varistor conducting makes the bank less capacitive, so the current falls below the linear capacitor's.
    expect(segment.currentA).toBeLessThan(segment.linearCurrentA);
    expect(fault.iterations).toBeGreaterThan(0);
  });

  test('gives a bypassed segment no current', () => {
    const fault = corridorFault({
      corridor: corridorWith({ segment: { reactanceOhm: 40 } }),
      case: { ...radialCase, bypassed: ['SC1'] },
      at: { bus: 'Quill End' },
    });
    expect(fault.segments[0]).toMatchObject({ inserted: false, currentA: 0, linearCurrentA: 0 });
  });

  test('refuses a fault bus the corridor does not have, naming the buses it has', () => {
    expect(() => corridorFault({ corridor: corridorWith(), case: radialCase, at: { bus: 'Quil End' } })).toThrow(
      expect.objectContaining({ code: 'out-of-range', quantity: 'at.bus', allowedRange: "one of 'Tarrow', 'Quill End'" }),
    );
  });

  test('refuses a protective level for a segment the corridor does not have', () => {
    expect(() =>
      corridorFault({
        corridor: corridorWith({ segment: { reactanceOhm: 40 } }),
        case: radialCase,
        at: { bus: 'Quill End' },
        protectiveLevelsKvPeak: { SC2: 150 },
      }),
    ).toThrow(expect.objectContaining({ code: 'out-of-range', quantity: 'protectiveLevelsKvPeak.SC2', allowedRange: "one of 'SC1'" }));
  });

  test('inside a radial line, draws the feeder and the line up to the fault in parallel with the open rest of the line', () => {
    const distanceKm = 120;
    const toFault = lineAbcd(perKm.shuntSusceptanceUsPerKm, distanceKm);
    const beyond = lineAbcd(perKm.shuntSusceptanceUsPerKm, LENGTH_KM - distanceKm);
    const feeder = feederImpedanceOhm();
    const left = toFault.b.add(feeder.mul(toFault.a)).div(toFault.a.add(feeder.mul(toFault.c)));
    const right = beyond.a.div(beyond.c);
    const thevenin = left.mul(right).div(left.add(right));
    const fault = corridorFault({ corridor: corridorWith(), case: radialCase, at: { section: 'Tarrow - Quill End', distanceKm } });
    expect(fault.faultAt).toBe('Tarrow - Quill End at 120 km');
    expect(fault.faultCurrentKa).toBeCloseTo(sourcePhaseV / thevenin.abs() / 1e3, 6);
  });

  test('on the line side of a sending-end bank, drives the whole feeder current through the bank (an internal fault)', () => {
    const reactanceOhm = 40;
    const feederAndBank = feederImpedanceOhm().add(new Complex(0, -reactanceOhm));
    const { a, c } = lineAbcd();
    const openLine = a.div(c);
    const fault = corridorFault({
      corridor: corridorWith({ segment: { reactanceOhm } }),
      case: radialCase,
      at: { section: 'Tarrow - Quill End', distanceKm: 0 },
    });
    expect(fault.segments[0]!.currentA).toBeCloseTo(sourcePhaseV / feederAndBank.abs(), 2);
    const thevenin = feederAndBank.mul(openLine).div(feederAndBank.add(openLine));
    expect(fault.faultCurrentKa).toBeCloseTo(sourcePhaseV / thevenin.abs() / 1e3, 6);
  });

  test('refuses a fault inside a section with both of its circuits in service', () => {
    const corridor = corridorWith();
    const double = { ...corridor, sections: corridor.sections.map((section) => ({ ...section, circuits: 2 as const })) };
    expect(() => corridorFault({ corridor: double, case: radialCase, at: { section: 'Tarrow - Quill End', distanceKm: 100 } })).toThrow(
      expect.objectContaining({ code: 'inconsistent-quantities', quantity: 'at.section' }),
    );
  });
});
