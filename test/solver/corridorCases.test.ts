import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import {
  cascade,
  lineModel,
  seriesCapacitor,
  shuntCapacitor,
  shuntReactor,
  solveCorridorCase,
  solveCorridorCases,
  solveFixedSendingVoltage,
  sourceEquivalent,
  type CorridorInput,
  type TwoPort,
} from '../../src/solver/index.ts';
import { Complex } from '../../src/solver/complex.ts';
import { abcdOf } from '../../src/solver/twoPort.ts';
import { perKm, solved } from './corridorSupport.ts';

interface RandomSection {
  lengthKm: number;
  r: number;
  x: number;
  b: number;
  circuits: 1 | 2;
  segment: null | { position: 'sending-end' | 'mid-section' | 'receiving-end'; reactanceOhm: number };
}
interface RandomCorridor {
  sections: RandomSection[];
  reactorsMvar: Array<number | null>;
  capacitorMvar: number | null;
  sendingMva: number;
  xOverR: number;
  emfKv: number;
  /** The sending system holds its bus voltage instead of standing behind its impedance. */
  held: boolean;
  loadMw: number;
  loadMvar: number;
}

const sectionArbitrary: fc.Arbitrary<RandomSection> = fc.record({
  lengthKm: fc.double({ min: 40, max: 250, noNaN: true }),
  r: fc.double({ min: 0.01, max: 0.05, noNaN: true }),
  x: fc.double({ min: 0.25, max: 0.4, noNaN: true }),
  b: fc.double({ min: 3, max: 4.5, noNaN: true }),
  circuits: fc.constantFrom(1 as const, 2 as const),
  segment: fc.option(
    fc.record({
      position: fc.constantFrom('sending-end' as const, 'mid-section' as const, 'receiving-end' as const),
      reactanceOhm: fc.double({ min: 5, max: 30, noNaN: true }),
    }),
    { nil: null },
  ),
});

const corridorArbitrary: fc.Arbitrary<RandomCorridor> = fc.integer({ min: 1, max: 3 }).chain((count) =>
  fc.record({
    sections: fc.array(sectionArbitrary, { minLength: count, maxLength: count }),
    reactorsMvar: fc.array(fc.option(fc.double({ min: 20, max: 120, noNaN: true }), { nil: null }), { minLength: count + 1, maxLength: count + 1 }),
    capacitorMvar: fc.option(fc.double({ min: 20, max: 150, noNaN: true }), { nil: null }),
    sendingMva: fc.double({ min: 5000, max: 30000, noNaN: true }),
    xOverR: fc.double({ min: 8, max: 30, noNaN: true }),
    emfKv: fc.double({ min: 395, max: 420, noNaN: true }),
    held: fc.boolean(),
    loadMw: fc.double({ min: 0, max: 500, noNaN: true }),
    loadMvar: fc.double({ min: -50, max: 150, noNaN: true }),
  }),
);

function corridorOf(random: RandomCorridor): CorridorInput {
  const busNames = random.reactorsMvar.map((_, index) => `B${index}`);
  return {
    frequencyHz: 50,
    nominalVoltageKv: 400,
    sendingSystem: random.held
      ? { shortCircuitMva: random.sendingMva, xOverR: random.xOverR, heldVoltageKv: random.emfKv }
      : { shortCircuitMva: random.sendingMva, xOverR: random.xOverR, emfKv: random.emfKv },
    receivingSystem: { shortCircuitMva: 10000, xOverR: 15, emfKv: 400 },
    buses: busNames.map((name, index) => ({
      name,
      reactors: random.reactorsMvar[index] === null ? [] : [{ name: `R${index}`, qMvar: random.reactorsMvar[index] as number, ratedVoltageKv: 400 }],
      capacitors:
        index === busNames.length - 1 && random.capacitorMvar !== null ? [{ name: 'C', qMvar: random.capacitorMvar, ratedVoltageKv: 400 }] : [],
    })),
    sections: random.sections.map((section, index) => ({
      from: busNames[index] as string,
      to: busNames[index + 1] as string,
      lengthKm: section.lengthKm,
      seriesResistanceOhmPerKm: section.r,
      seriesReactanceOhmPerKm: section.x,
      shuntSusceptanceUsPerKm: section.b,
      circuits: section.circuits,
      seriesCapacitors: section.segment === null ? [] : [{ name: `S${index}`, ratedCurrentA: 2000, ...section.segment }],
    })),
  };
}

/** The same corridor built by hand as one cascade; two identical circuits in parallel are one line with z/2 and y*2 (exact). */
function cascadeOf(random: RandomCorridor): { elements: TwoPort[]; busElementIndex: number[]; segmentElementIndex: Map<string, number> } {
  const elements: TwoPort[] = random.held
    ? []
    : [sourceEquivalent({ end: 'sending', shortCircuitMva: random.sendingMva, xOverR: random.xOverR, nominalVoltageKv: 400 })];
  const busElementIndex: number[] = [];
  const segmentElementIndex = new Map<string, number>();
  random.reactorsMvar.forEach((reactor, index) => {
    busElementIndex.push(elements.length);
    if (reactor !== null) elements.push(shuntReactor({ qMvar: reactor, ratedVoltageKv: 400 }));
    if (index === random.reactorsMvar.length - 1 && random.capacitorMvar !== null)
      elements.push(shuntCapacitor({ qMvar: random.capacitorMvar, ratedVoltageKv: 400 }));
    const section = random.sections[index];
    if (!section) return;
    const n = section.circuits;
    const line = (lengthKm: number) =>
      lineModel({
        frequencyHz: 50,
        seriesResistanceOhmPerKm: section.r / n,
        seriesReactanceOhmPerKm: section.x / n,
        shuntSusceptanceUsPerKm: section.b * n,
        lengthKm,
      });
    const capacitor = section.segment ? seriesCapacitor({ reactanceOhm: section.segment.reactanceOhm / n }) : null;
    const pushCapacitor = () => {
      segmentElementIndex.set(`S${index}`, elements.length);
      elements.push(capacitor as TwoPort);
    };
    if (capacitor && section.segment?.position === 'sending-end') {
      pushCapacitor();
      elements.push(line(section.lengthKm));
    } else if (capacitor && section.segment?.position === 'mid-section') {
      elements.push(line(section.lengthKm / 2));
      pushCapacitor();
      elements.push(line(section.lengthKm / 2));
    } else if (capacitor) {
      elements.push(line(section.lengthKm));
      pushCapacitor();
    } else elements.push(line(section.lengthKm));
  });
  return { elements, busElementIndex, segmentElementIndex };
}

describe('solveCorridorCase against the same network built by hand from two-ports', () => {
  // Identity: the bus-admittance Newton solution and the cascade solved by solveFixedSendingVoltage are two formulations of one network.
  test('gives the bus voltages, angles, series-segment currents, sending power and power balance of the hand-built cascade', () => {
    fc.assert(
      fc.property(corridorArbitrary, (random) => {
        const hand = cascadeOf(random);
        const network = cascade({ elements: hand.elements });
        const load = { pMw: random.loadMw, qMvar: random.loadMvar };
        let reference: ReturnType<typeof solveFixedSendingVoltage>;
        try {
          reference = solveFixedSendingVoltage({ network, sendingVoltageKv: random.emfKv, load });
        } catch {
          return; // beyond the nose by the closed form: covered by the infeasibility test
        }
        const result = solved(
          solveCorridorCase({ corridor: corridorOf(random), case: { label: 'load', loading: { kind: 'receiving-load', ...load } } }),
        );
        const receiving = result.buses[result.buses.length - 1]!;
        expect(receiving.voltageKv).toBeCloseTo(reference.receivingEnd.voltageKv, 5);
        expect(receiving.angleDeg).toBeCloseTo(reference.receivingEnd.voltageAngleDeg, 5);
        if (!random.held) expect(result.systems.sending.emfKv).toBeCloseTo(random.emfKv, 9);
        // Each bus (and each segment's input) from the receiving end through the tail of the cascade: V = A V_r + B I_r, I = C V_r + D I_r.
        const vr = new Complex(reference.receivingEnd.phaseVoltageV.re, reference.receivingEnd.phaseVoltageV.im);
        const ir = new Complex(reference.receivingEnd.lineCurrentA.re, reference.receivingEnd.lineCurrentA.im);
        const atElement = (elementIndex: number) => {
          const rest = hand.elements.slice(elementIndex);
          const tail =
            rest.length === 0
              ? { A: new Complex(1, 0), B: new Complex(0, 0), C: new Complex(0, 0), D: new Complex(1, 0) }
              : abcdOf(cascade({ elements: rest }));
          return { voltage: tail.A.mul(vr).add(tail.B.mul(ir)), current: tail.C.mul(vr).add(tail.D.mul(ir)) };
        };
        hand.busElementIndex.forEach((elementIndex, busIndex) => {
          expect(result.buses[busIndex]!.voltageKv).toBeCloseTo((atElement(elementIndex).voltage.abs() * Math.sqrt(3)) / 1e3, 5);
        });
        result.sections.forEach((section, sectionIndex) => {
          for (const segment of section.seriesCapacitors) {
            const expected = atElement(hand.segmentElementIndex.get(segment.name)!).current.abs() / random.sections[sectionIndex]!.circuits;
            expect(segment.currentA).toBeCloseTo(expected, 3);
          }
        });
        // Power into the sending bus: through the Thevenin impedance from the EMF, or straight in at a held bus.
        const emf = new Complex(reference.sendingEnd.phaseVoltageV.re, reference.sendingEnd.phaseVoltageV.im);
        const current = new Complex(reference.sendingEnd.lineCurrentA.re, reference.sendingEnd.lineCurrentA.im);
        const z = random.held ? new Complex(0, 0) : abcdOf(hand.elements[0]!).B;
        const atBus = emf
          .sub(z.mul(current))
          .mul(current.conjugate())
          .mul(3 / 1e6);
        expect(result.systems.sending.pMw).toBeCloseTo(atBus.re, 4);
        expect(result.systems.sending.qMvar).toBeCloseTo(atBus.im, 4);
        // Losses and balance close: generation = load + losses.
        const losses = result.sections.reduce((sum, section) => sum + section.lossesMw, 0);
        expect(result.systems.sending.pMw).toBeCloseTo(random.loadMw + losses, 4);
      }),
      { numRuns: 40 },
    );
  });

  test("reports a section's highest voltage as at least the higher of its end-bus voltages, from the profile along it", () => {
    const corridor: CorridorInput = {
      frequencyHz: 50,
      nominalVoltageKv: 400,
      sendingSystem: { shortCircuitMva: 15000, xOverR: 15, heldVoltageKv: 400 },
      receivingSystem: { shortCircuitMva: 10000, xOverR: 15, emfKv: 400 },
      buses: [{ name: 'A' }, { name: 'B' }],
      sections: [{ from: 'A', to: 'B', lengthKm: 400, ...perKm }],
    };
    const result = solved(solveCorridorCase({ corridor, case: { label: 'light', loading: { kind: 'receiving-load', pMw: 100, qMvar: 0 } } }));
    const section = result.sections[0]!;
    expect(section.maximum.voltageKv).toBeGreaterThanOrEqual(Math.max(result.buses[0]!.voltageKv, result.buses[1]!.voltageKv) - 1e-9);
    expect(section.minimum.voltageKv).toBeLessThanOrEqual(Math.min(result.buses[0]!.voltageKv, result.buses[1]!.voltageKv) + 1e-9);
    expect(result.buses[0]!.voltageKv).toBeCloseTo(400, 9);
  });
});

const twoBus = (extra: Partial<CorridorInput> = {}): CorridorInput => ({
  frequencyHz: 50,
  nominalVoltageKv: 400,
  sendingSystem: { shortCircuitMva: 15000, xOverR: 15, emfKv: 410 },
  receivingSystem: { shortCircuitMva: 8000, xOverR: 12, emfKv: 400 },
  buses: [{ name: 'West' }, { name: 'Mid' }, { name: 'East' }],
  sections: [
    { from: 'West', to: 'Mid', lengthKm: 200, ...perKm, circuits: 2 },
    {
      from: 'Mid',
      to: 'East',
      lengthKm: 200,
      ...perKm,
      seriesCapacitors: [{ name: 'SC1', position: 'sending-end', reactanceOhm: 25, ratedCurrentA: 2000 }],
    },
  ],
  ...extra,
});

describe('solveCorridorCase: cases that have no operating point', () => {
  test('reports a load far beyond the nose as unsolved with a reason instead of throwing', () => {
    const result = solveCorridorCase({
      corridor: twoBus(),
      case: { label: 'too much', loading: { kind: 'receiving-load', pMw: 20000, qMvar: 5000 } },
    });
    expect(result.solved).toBe(false);
    if (!result.solved) expect(result.reason).toMatch(/nose/);
  });

  // The quoted largest load is the closed-form nose of the same chain (noseLoadMultiple, as solveFixedSendingVoltage quotes it).
  test("quotes the largest load at the case's power factor for an unsolved load on a plain chain", () => {
    const corridor: CorridorInput = { ...twoBus(), sections: twoBus().sections.map((section) => ({ ...section, seriesCapacitors: [] })) };
    const network = cascade({
      elements: [
        sourceEquivalent({ end: 'sending', shortCircuitMva: 15000, xOverR: 15, nominalVoltageKv: 400 }),
        lineModel({ frequencyHz: 50, seriesResistanceOhmPerKm: 0.014, seriesReactanceOhmPerKm: 0.16, shuntSusceptanceUsPerKm: 7.2, lengthKm: 200 }),
        lineModel({ frequencyHz: 50, ...perKm, lengthKm: 200 }),
      ],
    });
    let quoted = '';
    try {
      solveFixedSendingVoltage({ network, sendingVoltageKv: 410, load: { pMw: 3000, qMvar: 600 } });
    } catch (error) {
      quoted = (error as { allowedRange: string }).allowedRange;
    }
    const largestMw = Number(/P = ([0-9.]+) MW/.exec(quoted)?.[1]);
    const result = solveCorridorCase({ corridor, case: { label: 'far too much', loading: { kind: 'receiving-load', pMw: 3000, qMvar: 600 } } });
    if (result.solved) throw new Error('expected an unsolved case');
    const reported = Number(/largest load at this power factor is P = ([0-9.]+) MW/.exec(result.reason)?.[1]);
    expect(largestMw).toBeGreaterThan(500);
    expect(Math.abs(reported - largestMw) / largestMw).toBeLessThan(1e-4);
  });

  test('reports a voltage control that would exceed its var limit as unsolved', () => {
    const result = solveCorridorCase({
      corridor: twoBus(),
      case: {
        label: 'held mid',
        loading: { kind: 'transfer', pMw: 800 },
        voltageControl: [{ bus: 'Mid', voltageKv: 430, qMinMvar: -50, qMaxMvar: 50 }],
      },
    });
    expect(result.solved).toBe(false);
    if (!result.solved) expect(result.reason).toMatch(/limit/);
  });

  test('reports a corridor split by its only circuit out as unsolved', () => {
    const result = solveCorridorCase({
      corridor: twoBus(),
      case: { label: 'N-1', loading: { kind: 'receiving-load', pMw: 300, qMvar: 0 }, circuitsOut: ['Mid - East'] },
    });
    expect(result.solved).toBe(false);
    if (!result.solved) expect(result.reason).toMatch(/split/);
  });

  test('keeps unsolved cases in the table between solved ones', () => {
    const table = solveCorridorCases({
      corridor: twoBus(),
      cases: [
        { label: 'peak', loading: { kind: 'receiving-load', pMw: 600, powerFactor: 0.95, powerFactorSense: 'lagging' } },
        { label: 'impossible', loading: { kind: 'receiving-load', pMw: 20000, qMvar: 0 } },
        { label: 'export', loading: { kind: 'transfer', pMw: 700 } },
      ],
    });
    expect(table.cases.map((entry) => entry.solved)).toEqual([true, false, true]);
    expect(table.busNames).toEqual(['West', 'Mid', 'East']);
  });
});

describe('solveCorridorCase: transfer, controls and contingencies', () => {
  test('delivers the stated transfer into the receiving system and reports the vars each voltage source supplies', () => {
    const result = solved(
      solveCorridorCase({
        corridor: twoBus(),
        case: { label: 'export', loading: { kind: 'transfer', pMw: 700 }, voltageControl: [{ bus: 'Mid', voltageKv: 405 }] },
      }),
    );
    const receivingBusFlow = result.sections[1]!.toEnd;
    // The receiving system absorbs 700 MW at its EMF: the flow at its bus is 700 MW plus the loss in its Thevenin resistance.
    expect(-result.systems.receiving.pMw).toBeGreaterThan(699.9);
    expect(receivingBusFlow.pMw).toBeCloseTo(-result.systems.receiving.pMw, 6);
    expect(result.buses[1]!.voltageKv).toBeCloseTo(405, 6);
    const sources = result.voltageControlled.map((entry) => entry.source);
    expect(sources).toEqual(['sending system', 'receiving system', 'Mid']);
    // Reactive balance at Mid: what the control supplies equals what leaves into the two sections.
    const mid = result.voltageControlled[2]!;
    expect(mid.qMvar).toBeCloseTo(result.sections[1]!.fromEnd.qMvar - result.sections[0]!.toEnd.qMvar, 5);
  });

  test('takes one circuit of a double-circuit section out and roughly doubles the current in the other', () => {
    const base = solved(solveCorridorCase({ corridor: twoBus(), case: { label: 'n', loading: { kind: 'transfer', pMw: 600 } } }));
    const outage = solved(
      solveCorridorCase({ corridor: twoBus(), case: { label: 'n-1', loading: { kind: 'transfer', pMw: 600 }, circuitsOut: ['West - Mid'] } }),
    );
    expect(outage.sections[0]!.circuitsInService).toBe(1);
    expect(outage.sections[0]!.fromEnd.currentA / base.sections[0]!.fromEnd.currentA).toBeGreaterThan(1.8);
    expect(outage.sections[0]!.lossesMw).toBeGreaterThan(base.sections[0]!.lossesMw);
  });

  test("gives a series segment's current and voltage as I and I Xc against its rating, and none when bypassed", () => {
    const inserted = solved(solveCorridorCase({ corridor: twoBus(), case: { label: 'in', loading: { kind: 'transfer', pMw: 900 } } }));
    const segment = inserted.sections[1]!.seriesCapacitors[0]!;
    expect(segment.currentA).toBeCloseTo(inserted.sections[1]!.fromEnd.currentA, 6);
    expect(segment.voltageKv).toBeCloseTo((segment.currentA * 25) / 1e3, 9);
    expect(segment.withinRating).toBe(segment.currentA <= 2000);
    const bypassed = solved(
      solveCorridorCase({ corridor: twoBus(), case: { label: 'out', loading: { kind: 'transfer', pMw: 900 }, bypassed: ['SC1'] } }),
    );
    expect(bypassed.sections[1]!.seriesCapacitors[0]).toMatchObject({ bypassed: true, currentA: 0 });
    // Without the capacitor the same transfer needs a larger angle between the ends.
    expect(bypassed.systems.receiving.emfAngleDeg!).toBeLessThan(inserted.systems.receiving.emfAngleDeg!);
  });

  test('holds an SVC bus on its slope and clamps it as a fixed susceptance at its limit, flagged', () => {
    const withSvc = twoBus({
      buses: [
        { name: 'West' },
        { name: 'Mid', svc: { name: 'SVC', capacitiveMvar: 200, inductiveMvar: 100, slopePercent: 3, referenceVoltageKv: 400 } },
        { name: 'East' },
      ],
    });
    const onSlope = solved(solveCorridorCase({ corridor: withSvc, case: { label: 'mid', loading: { kind: 'transfer', pMw: 1000 } } }));
    const svc = onSlope.svcs[0]!;
    expect(svc.atLimit).toBeNull();
    // On the slope: V = Vref - slope x I_capacitive, with I in pu of the slope base (200 MVA at 400 kV).
    const currentPu = svc.outputMvar / 200 / (svc.voltageKv / 400);
    expect(svc.voltageKv / 400).toBeCloseTo(1 - 0.03 * currentPu, 9);
    const heavy = solved(solveCorridorCase({ corridor: withSvc, case: { label: 'heavy', loading: { kind: 'transfer', pMw: 1400 } } }));
    const limited = heavy.svcs[0]!;
    expect(limited.atLimit).toBe('capacitive');
    expect(limited.outputMvar).toBeCloseTo(200 * (limited.voltageKv / 400) ** 2, 6);
    expect(limited.voltageKv / 400).toBeLessThan(1 - 0.03 * (limited.outputMvar / 200 / (limited.voltageKv / 400)));
  });
});

describe('the voltage profile in a case solution', () => {
  test('runs along the corridor from the section start, holds the section extremes and ends at the bus voltages', () => {
    const corridor: CorridorInput = {
      frequencyHz: 50,
      nominalVoltageKv: 400,
      sendingSystem: { shortCircuitMva: 10000, xOverR: 12, emfKv: 400 },
      receivingSystem: { shortCircuitMva: 8000, xOverR: 12, emfKv: 400 },
      buses: [{ name: 'A' }, { name: 'B' }, { name: 'C' }],
      sections: [
        { from: 'A', to: 'B', lengthKm: 150, ...perKm },
        { from: 'B', to: 'C', lengthKm: 200, ...perKm },
      ],
    };
    const result = solved(
      solveCorridorCase({ corridor, case: { label: 'open end', loading: { kind: 'energisation', closedEnd: 'sending' } }, profilePointCount: 21 }),
    );
    const second = result.sections[1]!;
    expect(second.profile.corridorKm[0]).toBeCloseTo(150, 9);
    expect(second.profile.corridorKm.at(-1)).toBeCloseTo(350, 9);
    expect(second.profile.voltagePu[0]).toBeCloseTo(result.buses[1]!.voltagePu, 9);
    expect(second.profile.voltagePu.at(-1)).toBeCloseTo(result.buses[2]!.voltagePu, 9);
    expect(Math.max(...second.profile.voltagePu)).toBeCloseTo(second.maximum.voltagePu, 12);
  });
});
