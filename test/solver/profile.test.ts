import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import {
  SolverDomainError,
  cascade,
  lineModel,
  seriesCapacitor,
  shuntReactor,
  solveNoLoad,
  solveReceivingLoad,
  sourceEquivalent,
  voltageProfile,
} from '../../src/solver/index.ts';

const perKm = { frequencyHz: 50, seriesResistanceOhmPerKm: 0, seriesReactanceOhmPerKm: 0.32, shuntSusceptanceUsPerKm: 3.6 };

describe('voltageProfile', () => {
  // Lossless open line: V(x) = Vs cos(beta (l - x)) / cos(beta l).
  test('follows Vs cos(beta (l - x)) / cos(beta l) along an open lossless line', () => {
    const line = lineModel({ ...perKm, lengthKm: 500 });
    const profile = voltageProfile({ network: line, operatingPoint: solveNoLoad({ network: line, sendingVoltageKv: 400 }), pointCount: 51 });
    const beta = Math.sqrt(0.32 * 3.6e-6);
    profile.positionKm.forEach((positionKm, index) => {
      expect(profile.voltageKv[index]).toBeCloseTo((400 * Math.cos(beta * (500 - positionKm))) / Math.cos(beta * 500), 6);
    });
    expect(profile.maximum.positionKm).toBe(500);
  });

  // Identity: a lossless line at surge impedance loading has a flat voltage profile.
  test('is flat at surge impedance loading', () => {
    fc.assert(
      fc.property(fc.double({ min: 50, max: 1000, noNaN: true }), (lengthKm) => {
        const line = lineModel({ ...perKm, lengthKm });
        const silMw = 400 ** 2 / Math.sqrt(0.32 / 3.6e-6);
        const operatingPoint = solveReceivingLoad({ network: line, receivingVoltageKv: 400, load: { pMw: silMw, qMvar: 0 } });
        const profile = voltageProfile({ network: line, operatingPoint, pointCount: 21 });
        for (const voltageKv of profile.voltageKv) expect(voltageKv).toBeCloseTo(400, 6);
      }),
    );
  });

  test('shows the jump across a series capacitor as two points at the same position', () => {
    const whole = lineModel({ ...perKm, lengthKm: 400 });
    const half = lineModel({ ...perKm, lengthKm: 200, label: 'half' });
    const capacitor = seriesCapacitor({ degreeOfCompensation: 0.5, compensatedLine: whole, label: 'mid-line capacitor' });
    const reactor = shuntReactor({ qMvar: 100, ratedVoltageKv: 400, label: 'reactor' });
    const network = cascade({ elements: [reactor, half, capacitor, half, reactor] });
    const operatingPoint = solveReceivingLoad({ network, receivingVoltageKv: 400, load: { pMw: 800, qMvar: 100 } });
    const profile = voltageProfile({ network, operatingPoint, pointCount: 41 });
    const capacitorIndex = profile.elementLabels.indexOf('mid-line capacitor');
    const after = profile.elementIndex.indexOf(capacitorIndex);
    expect(profile.positionKm[after]).toBe(200);
    expect(profile.positionKm[after - 1]).toBe(200);
    // The voltage changes across the bank by |I Xc| at most (phasor difference I * (-j Xc)).
    const jumpKv = Math.abs((profile.voltageKv[after] as number) - (profile.voltageKv[after - 1] as number));
    expect(jumpKv).toBeGreaterThan(0);
    expect(jumpKv).toBeLessThanOrEqual((Math.sqrt(3) * (profile.currentA[after] as number) * capacitor.reactanceOhm) / 1e3 + 1e-9);
    // The last point is the receiving end of the operating point.
    expect(profile.voltageKv[profile.voltageKv.length - 1]).toBeCloseTo(400, 6);
  });

  test('gives per-unit voltages when a nominal voltage is given', () => {
    const line = lineModel({ ...perKm, lengthKm: 100 });
    const profile = voltageProfile({
      network: line,
      operatingPoint: solveNoLoad({ network: line, sendingVoltageKv: 400 }),
      pointCount: 5,
      nominalVoltageKv: 400,
    });
    expect(profile.voltagePu?.[0]).toBeCloseTo(1, 12);
  });

  // Consistency: the profile propagates the sending end through the network; it must arrive at the operating point's receiving end.
  test('refuses an operating point computed on a different network', () => {
    const line = lineModel({ ...perKm, lengthKm: 300 });
    const other = lineModel({ ...perKm, lengthKm: 200 });
    const attempt = () => voltageProfile({ network: line, operatingPoint: solveNoLoad({ network: other, sendingVoltageKv: 400 }) });
    expect(attempt).toThrow(SolverDomainError);
    expect(attempt).toThrow(/operating point .* does not belong to this network/);
  });

  // An open end solved by iteration carries a few nanoamperes of rounding of the sending end's charging current.
  test('accepts an open end whose current is the rounding of a large charging current', () => {
    const line = lineModel({ ...perKm, lengthKm: 400 });
    const open = solveNoLoad({ network: line, sendingVoltageKv: 400 });
    const rounded = { ...open, receivingEnd: { ...open.receivingEnd, lineCurrentA: { re: 5e-9, im: 0 } } };
    expect(() => voltageProfile({ network: line, operatingPoint: rounded, pointCount: 11 })).not.toThrow();
  });

  test('does not count a source EMF as the highest or lowest voltage of the route', () => {
    const line = lineModel({ ...perKm, lengthKm: 100 });
    const source = sourceEquivalent({ end: 'sending', shortCircuitMva: 2000, xOverR: 15, nominalVoltageKv: 400 });
    const network = cascade({ elements: [source, line] });
    // Heavy load: the EMF (point 0) is the highest voltage of the whole profile, but it is not on the route.
    const operatingPoint = solveReceivingLoad({ network, receivingVoltageKv: 380, load: { pMw: 800, qMvar: 300 } });
    const profile = voltageProfile({ network, operatingPoint, pointCount: 11 });
    expect(profile.voltageKv[0]).toBeGreaterThan(Math.max(...profile.voltageKv.slice(1)));
    expect(profile.maximum.voltageKv).toBeCloseTo(profile.voltageKv[1] as number, 9);
  });
});
