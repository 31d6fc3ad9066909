import { describe, expect, test } from 'vitest';
import {
  cascade,
  lineModel,
  shuntReactor,
  solveCorridorCase,
  solveNoLoad,
  sourceEquivalent,
  switchingSteps,
  type CorridorInput,
} from '../../src/solver/index.ts';
import { perKm, solved } from './corridorSupport.ts';

/** Mirror-symmetric: equal systems, equal reactors at both ends, a mid bus between two equal sections. */
const symmetrical: CorridorInput = {
  frequencyHz: 50,
  nominalVoltageKv: 400,
  sendingSystem: { shortCircuitMva: 6000, xOverR: 12, emfKv: 405 },
  receivingSystem: { shortCircuitMva: 6000, xOverR: 12, emfKv: 405 },
  buses: [
    { name: 'North', reactors: [{ name: 'RN', qMvar: 90, ratedVoltageKv: 400 }] },
    { name: 'Middle', capacitors: [{ name: 'CM', qMvar: 40, ratedVoltageKv: 400, inService: false }] },
    { name: 'South', reactors: [{ name: 'RS', qMvar: 90, ratedVoltageKv: 400 }] },
  ],
  sections: [
    { from: 'North', to: 'Middle', lengthKm: 220, ...perKm },
    { from: 'Middle', to: 'South', lengthKm: 220, ...perKm },
  ],
};

describe('energisation of a corridor from either end', () => {
  test('gives mirrored bus voltages, the same open-end voltage and the same rise when a symmetrical corridor is energised from either end', () => {
    const fromNorth = solved(
      solveCorridorCase({ corridor: symmetrical, case: { label: 'from North', loading: { kind: 'energisation', closedEnd: 'sending' } } }),
    );
    const fromSouth = solved(
      solveCorridorCase({ corridor: symmetrical, case: { label: 'from South', loading: { kind: 'energisation', closedEnd: 'receiving' } } }),
    );
    const north = fromNorth.buses.map((bus) => bus.voltageKv);
    const south = fromSouth.buses.map((bus) => bus.voltageKv).reverse();
    north.forEach((value, index) => expect(value).toBeCloseTo(south[index]!, 7));
    expect(fromNorth.energisation!.openEndBus).toBe('South');
    expect(fromSouth.energisation!.openEndBus).toBe('North');
    expect(fromNorth.energisation!.openEndVoltageKv).toBeCloseTo(fromSouth.energisation!.openEndVoltageKv, 7);
    expect(fromNorth.energisation!.energisingBusRisePercent).toBeCloseTo(fromSouth.energisation!.energisingBusRisePercent, 7);
    expect(fromNorth.energisation!.highestAlongLine.voltageKv).toBeCloseTo(fromSouth.energisation!.highestAlongLine.voltageKv, 5);
    expect(fromNorth.energisation!.highestAlongLine.corridorKm).toBeCloseTo(440 - fromSouth.energisation!.highestAlongLine.corridorKm, 5);
  });

  // Identity: behind a source impedance Zs the open-end voltage is E / (A + Zs C) of the line with its reactors, as solveNoLoad gives
  // for the cascade source + reactor + line + reactor.
  test('gives the open-end voltage of the hand-built cascade behind the same system strength', () => {
    const line = lineModel({ frequencyHz: 50, ...perKm, lengthKm: 440 });
    const network = cascade({
      elements: [
        sourceEquivalent({ end: 'sending', shortCircuitMva: 6000, xOverR: 12, nominalVoltageKv: 400 }),
        shuntReactor({ qMvar: 90, ratedVoltageKv: 400 }),
        line,
        shuntReactor({ qMvar: 90, ratedVoltageKv: 400 }),
      ],
    });
    const reference = solveNoLoad({ network, sendingVoltageKv: 405 });
    const corridor: CorridorInput = {
      ...symmetrical,
      buses: [symmetrical.buses[0]!, symmetrical.buses[2]!],
      sections: [{ from: 'North', to: 'South', lengthKm: 440, ...perKm }],
    };
    const result = solved(solveCorridorCase({ corridor, case: { label: 'energise', loading: { kind: 'energisation', closedEnd: 'sending' } } }));
    expect(result.energisation!.openEndVoltageKv).toBeCloseTo(reference.receivingEnd.voltageKv, 5);
    // The line's charging raises the energising bus above the EMF behind the source (the sending-bus rise).
    expect(result.energisation!.energisingBusVoltageBeforeKv).toBe(405);
    expect(result.energisation!.energisingBusRisePercent).toBeGreaterThan(0);
    // With a reactor at the open end the profile peaks inside the line, above the open-end voltage.
    expect(result.energisation!.highestAlongLine.voltageKv).toBeGreaterThan(result.energisation!.openEndVoltageKv);
    expect(result.energisation!.highestAlongLine.corridorKm).toBeLessThan(440);
  });

  test('puts the highest voltage at the open end of an uncompensated line (Ferranti)', () => {
    const result = solved(
      solveCorridorCase({
        corridor: symmetrical,
        case: { label: 'bare', loading: { kind: 'energisation', closedEnd: 'sending' }, unitsOut: ['RN', 'RS'] },
      }),
    );
    expect(result.energisation!.highestAlongLine.voltageKv).toBeCloseTo(result.energisation!.openEndVoltageKv, 9);
    expect(result.energisation!.highestAlongLine.corridorKm).toBe(440);
  });

  test('weakening the energising system raises the sending-bus rise', () => {
    const strong = solved(
      solveCorridorCase({
        corridor: symmetrical,
        case: { label: 'strong', loading: { kind: 'energisation', closedEnd: 'sending' }, unitsOut: ['RN', 'RS'] },
      }),
    );
    const weak = solved(
      solveCorridorCase({
        corridor: symmetrical,
        case: {
          label: 'weak',
          loading: { kind: 'energisation', closedEnd: 'sending' },
          unitsOut: ['RN', 'RS'],
          sendingSystem: { shortCircuitMva: 2000 },
        },
      }),
    );
    expect(weak.energisation!.energisingBusRisePercent).toBeGreaterThan(2 * strong.energisation!.energisingBusRisePercent);
  });
});

describe('self-excitation of an energising generator', () => {
  // Common practice (from memory): a machine energising a line alone can self-excite when the line's net charging at nominal voltage
  // reaches SCR x its rated MVA (the capacitive reactance it sees falls to its synchronous reactance 1 / SCR).
  const energise = (unitsOut: string[]) =>
    solved(
      solveCorridorCase({
        corridor: symmetrical,
        case: {
          label: 'black start',
          loading: { kind: 'energisation', closedEnd: 'sending', generator: { ratedMva: 250, shortCircuitRatio: 0.6 } },
          unitsOut,
        },
      }),
    ).energisation!.selfExcitation!;

  test("flags the risk when the bare line's charging exceeds SCR x rated MVA", () => {
    const bare = energise(['RN', 'RS']);
    const lineChargingMvar = 400 ** 2 * 3.6e-6 * 440; // V^2 omega C l at nominal voltage: 253 Mvar
    // The distributed line returns somewhat more than its lumped charging (the Ferranti rise along it).
    expect(bare.netChargingMvarAtNominal).toBeGreaterThan(lineChargingMvar);
    expect(bare.netChargingMvarAtNominal).toBeLessThan(1.15 * lineChargingMvar);
    expect(bare.machineLimitMvar).toBe(150);
    expect(bare.risk).toBe(true);
  });

  test('clears it when the shunt reactors are in', () => {
    const compensated = energise([]);
    expect(compensated.netChargingMvarAtNominal).toBeLessThan(150);
    expect(compensated.risk).toBe(false);
    expect(compensated.marginPercent).toBeGreaterThan(0);
  });
});

describe('switching steps', () => {
  // Hand estimate dV/V ~ Q / S_sc (common practice). On a strong bus the exact step differs from it by second-order terms: the step
  // itself (Q/S_sc, here about 0.25 %), the Thevenin angle (1 - sin(atan(X/R)), 0.2 % at X/R = 15) and the unit's output changing with
  // the voltage; together well inside 2 % of the step.
  test('agrees with Q / S_sc within 2 % of the step for a capacitor step on a strong bus', () => {
    const corridor: CorridorInput = {
      frequencyHz: 50,
      nominalVoltageKv: 400,
      sendingSystem: { shortCircuitMva: 20000, xOverR: 15, emfKv: 400 },
      receivingSystem: { shortCircuitMva: 20000, xOverR: 15, emfKv: 400 },
      buses: [{ name: 'Strong', capacitors: [{ name: 'C50', qMvar: 50, ratedVoltageKv: 400, inService: false }] }, { name: 'Far' }],
      sections: [{ from: 'Strong', to: 'Far', lengthKm: 60, ...perKm }],
    };
    const result = switchingSteps({
      corridor,
      case: { label: 'light', loading: { kind: 'receiving-load', pMw: 100, qMvar: 20 } },
      stepLimitPercent: 2,
    });
    const step = result.steps[0]!;
    expect(step.operation).toBe('switch-in');
    expect(step.changePercent).toBeGreaterThan(0);
    expect(step.estimatedChangePercent).toBeGreaterThan(0.2);
    expect(Math.abs(step.changePercent - step.estimatedChangePercent) / step.estimatedChangePercent).toBeLessThan(0.02);
    expect(step.withinLimit).toBe(true);
  });

  test('gives the short-circuit power of an end bus as the system strength with the shunts at the bus, for a short open line', () => {
    const corridor: CorridorInput = {
      frequencyHz: 50,
      nominalVoltageKv: 400,
      sendingSystem: { shortCircuitMva: 5000, xOverR: 15, heldVoltageKv: 400 },
      receivingSystem: { shortCircuitMva: 5000, xOverR: 15, emfKv: 400 },
      buses: [{ name: 'A', reactors: [{ name: 'R', qMvar: 30, ratedVoltageKv: 400 }] }, { name: 'B' }],
      sections: [{ from: 'A', to: 'B', lengthKm: 1, ...perKm }],
    };
    const result = switchingSteps({
      corridor,
      case: { label: 'energise', loading: { kind: 'energisation', closedEnd: 'sending' } },
      stepLimitPercent: 3,
    });
    // Short-circuit admittance at A: the system's 5000 MVA at atan(15), plus the reactor's 30 Mvar (inductive, adds nearly in phase),
    // less the 1 km line's charging (0.576 Mvar at 400 kV); the line's series impedance is negligible beside the open end.
    const angle = Math.atan(15);
    const re = 5000 * Math.cos(angle);
    const im = -5000 * Math.sin(angle) - 30 + 400 ** 2 * 3.6e-6;
    expect(result.steps[0]!.shortCircuitMva).toBeCloseTo(Math.hypot(re, im), 0);
  });

  test('compares each bus step with the limit and names the worst', () => {
    const result = switchingSteps({
      corridor: symmetrical,
      case: { label: 'energise', loading: { kind: 'energisation', closedEnd: 'sending' } },
      stepLimitPercent: 1,
    });
    expect(result.steps.map((step) => step.unit)).toEqual(['RN', 'CM', 'RS']);
    const rs = result.steps.find((step) => step.unit === 'RS')!;
    // Switching out the far reactor on an open line raises the open end most (weakest point).
    expect(rs.largestAtBus).toBe('South');
    expect(rs.largestChangePercent).toBeGreaterThan(1);
    expect(rs.withinLimit).toBe(false);
    expect(Math.abs(result.worst!.changePercent)).toBe(Math.max(...result.steps.map((step) => Math.abs(step.largestChangePercent))));
  });
});
