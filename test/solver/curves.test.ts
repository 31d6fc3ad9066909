import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import {
  SolverDomainError,
  angleForTransfer,
  cascade,
  lineModel,
  powerAngleCurve,
  powerCircles,
  pvCurve,
  qvCurve,
  seriesCapacitor,
  solveFixedSendingVoltage,
  solveTwoEndVoltages,
} from '../../src/solver/index.ts';
import { stabilityMarginPercent } from '../../src/solver/curves.ts';

const shortLossless = (reactanceOhm: number) =>
  lineModel({
    frequencyHz: 50,
    seriesResistanceOhmPerKm: 0,
    seriesReactanceOhmPerKm: reactanceOhm / 100,
    shuntSusceptanceUsPerKm: 0,
    lengthKm: 100,
    model: 'short',
  });

describe('pvCurve', () => {
  // Radial lossless reactance at unity power factor: Pmax = E^2 / (2X) at V = E / sqrt(2)
  // (Van Cutsem & Vournas, "Voltage Stability of Electric Power Systems", 1998, ch. 2; from memory).
  test('puts the nose of a lossless radial line at E^2/(2X) and E/sqrt(2) for unity power factor', () => {
    const curve = pvCurve({ network: shortLossless(50), sendingVoltageKv: 400, powerFactor: 1, powerFactorSense: 'lagging' });
    expect(curve.nose.pMw).toBeCloseTo(400 ** 2 / (2 * 50), 9);
    expect(curve.nose.receivingVoltageKv).toBeCloseTo(400 / Math.SQRT2, 6);
  });

  test('starts the upper branch at the open-circuit voltage and the lower branch ends at zero', () => {
    const curve = pvCurve({ network: shortLossless(50), sendingVoltageKv: 400, powerFactor: 0.95, powerFactorSense: 'lagging', pointCount: 11 });
    expect(curve.upperBranch[0]?.receivingVoltageKv).toBeCloseTo(400, 9);
    expect(curve.lowerBranch[curve.lowerBranch.length - 1]?.receivingVoltageKv).toBeCloseTo(0, 9);
  });

  test('agrees with the Newton solution on the upper branch', () => {
    const line = lineModel({
      frequencyHz: 60,
      seriesResistanceOhmPerKm: 0.0165,
      seriesReactanceOhmPerKm: 0.3306,
      shuntSusceptanceUsPerKm: 4.674,
      lengthKm: 300,
    });
    const curve = pvCurve({ network: line, sendingVoltageKv: 765, powerFactor: 0.97, powerFactorSense: 'lagging', pointCount: 11 });
    const sample = curve.upperBranch[6]!;
    const newton = solveFixedSendingVoltage({ network: line, sendingVoltageKv: 765, load: { pMw: sample.pMw, qMvar: sample.qMvar } });
    expect(newton.receivingEnd.voltageKv).toBeCloseTo(sample.receivingVoltageKv, 6);
  });
});

describe('powerAngleCurve', () => {
  // Lossless reactance: P = Vs Vr sin(delta) / X, maximum Vs Vr / X at 90 deg.
  test('peaks at Vs Vr / X at 90 degrees for a lossless reactance', () => {
    const curve = powerAngleCurve({ network: shortLossless(80), sendingVoltageKv: 400, receivingVoltageKv: 400 });
    expect(curve.steadyStateLimit.receivingPMw).toBeCloseTo(400 ** 2 / 80, 9);
    expect(curve.steadyStateLimit.angleDeg).toBeCloseTo(90, 9);
  });

  // Physical identity (lossless line, two-machine transfer P = V1 V2 sin(delta) / X): series compensation of degree k raises the maximum transfer by 1 / (1 - k).
  test('raises the maximum transfer by 1/(1 - k) with series compensation k', () => {
    fc.assert(
      fc.property(fc.double({ min: 10, max: 200, noNaN: true }), fc.double({ min: 0.05, max: 0.8, noNaN: true }), (reactanceOhm, degree) => {
        const line = shortLossless(reactanceOhm);
        const compensated = cascade({ elements: [line, seriesCapacitor({ degreeOfCompensation: degree, compensatedLine: line })] });
        const plain = powerAngleCurve({ network: line, sendingVoltageKv: 400, receivingVoltageKv: 400, pointCount: 2 }).steadyStateLimit.receivingPMw;
        const raised = powerAngleCurve({ network: compensated, sendingVoltageKv: 400, receivingVoltageKv: 400, pointCount: 2 }).steadyStateLimit
          .receivingPMw;
        expect(raised / plain).toBeCloseTo(1 / (1 - degree), 9);
      }),
    );
  });
});

describe('angleForTransfer', () => {
  test('inverts the power-angle relation on the stable side', () => {
    const result = angleForTransfer({ network: shortLossless(80), sendingVoltageKv: 400, receivingVoltageKv: 400, receivingPMw: 1000 });
    expect(result.angleDeg).toBeCloseTo((Math.asin((1000 * 80) / 400 ** 2) * 180) / Math.PI, 9);
  });

  test('throws transfer-limit-exceeded above the steady-state limit', () => {
    const attempt = () => angleForTransfer({ network: shortLossless(80), sendingVoltageKv: 400, receivingVoltageKv: 400, receivingPMw: 2500 });
    expect(attempt).toThrow(SolverDomainError);
    expect(attempt).toThrow(expect.objectContaining({ code: 'transfer-limit-exceeded' }));
    expect(attempt).toThrow(/receivingPMw = 2500 is outside the allowed range \[-2000, 2000\] MW/);
  });

  // Lossless reactance: the stable side spans P = -Vs Vr / X (delta = -90 deg) to +Vs Vr / X; below -2000 MW no angle delivers the power.
  test('throws transfer-limit-exceeded below the minimum (reverse) transfer', () => {
    const attempt = () => angleForTransfer({ network: shortLossless(80), sendingVoltageKv: 400, receivingVoltageKv: 400, receivingPMw: -2500 });
    expect(attempt).toThrow(SolverDomainError);
    expect(attempt).toThrow(expect.objectContaining({ code: 'transfer-limit-exceeded' }));
    expect(attempt).toThrow(/receivingPMw = -2500 is outside the allowed range \[-2000, 2000\] MW/);
  });
});

describe('a net-capacitive series path', () => {
  // A bank larger than the path reactance reverses it (degree >= 1): refused whether given as a degree or in ohms.
  test('is refused when the bank is given in ohms larger than the line reactance', () => {
    const line = shortLossless(50);
    const network = cascade({ elements: [line, seriesCapacitor({ reactanceOhm: 60 })] });
    const attempt = () => powerAngleCurve({ network, sendingVoltageKv: 400, receivingVoltageKv: 400 });
    expect(attempt).toThrow(SolverDomainError);
    expect(attempt).toThrow(/series capacitor reactance .* = 60 is outside the allowed range \(0, 50\) ohm/);
    expect(() => angleForTransfer({ network, sendingVoltageKv: 400, receivingVoltageKv: 400, receivingPMw: 100 })).toThrow(
      /series capacitor reactance/,
    );
    expect(() => solveFixedSendingVoltage({ network, sendingVoltageKv: 400, load: { pMw: 100, qMvar: 0 } })).toThrow(/series capacitor reactance/);
  });

  test('is accepted when the bank in ohms is smaller than the line reactance', () => {
    const line = shortLossless(50);
    const network = cascade({ elements: [line, seriesCapacitor({ reactanceOhm: 40 })] });
    expect(powerAngleCurve({ network, sendingVoltageKv: 400, receivingVoltageKv: 400, pointCount: 2 }).steadyStateLimit.receivingPMw).toBeCloseTo(
      400 ** 2 / 10,
      6,
    );
  });
});

describe('powerCircles', () => {
  const anyLine = fc.record({
    seriesResistanceOhmPerKm: fc.double({ min: 0, max: 0.08, noNaN: true }),
    seriesReactanceOhmPerKm: fc.double({ min: 0.25, max: 0.45, noNaN: true }),
    shuntSusceptanceUsPerKm: fc.double({ min: 2.8, max: 5, noNaN: true }),
    lengthKm: fc.double({ min: 20, max: 700, noNaN: true }),
  });

  // Identity: every operating point with the two end voltages fixed lies on both circles, whatever the angle.
  test('puts every two-end operating point on the receiving-end and sending-end circles', () => {
    fc.assert(
      fc.property(anyLine, fc.double({ min: -60, max: 60, noNaN: true }), (lineOptions, angleDeg) => {
        const line = lineModel({ frequencyHz: 50, ...lineOptions });
        const circles = powerCircles({ network: line, sendingVoltageKv: 410, receivingVoltageKv: 395 });
        const point = solveTwoEndVoltages({ network: line, sendingVoltageKv: 410, receivingVoltageKv: 395, angleDeg });
        const r = circles.receivingEnd;
        const s = circles.sendingEnd;
        expect(Math.hypot(point.receivingEnd.pMw - r.centreMw, point.receivingEnd.qMvar - r.centreMvar) / r.radiusMva).toBeCloseTo(1, 9);
        expect(Math.hypot(point.sendingEnd.pMw - s.centreMw, point.sendingEnd.qMvar - s.centreMvar) / s.radiusMva).toBeCloseTo(1, 9);
      }),
    );
  });

  // Lossless line: receiving-end circle centred at (0, -Vr^2 cot(beta l) / Zc), radius Vs Vr / (Zc sin(beta l)).
  test('centres the receiving-end circle of a lossless line at -Vr^2 cot(beta l) / Zc', () => {
    const line = lineModel({
      frequencyHz: 50,
      seriesResistanceOhmPerKm: 0,
      seriesReactanceOhmPerKm: 0.32,
      shuntSusceptanceUsPerKm: 3.6,
      lengthKm: 400,
    });
    const zc = Math.sqrt(0.32 / 3.6e-6);
    const theta = Math.sqrt(0.32 * 3.6e-6) * 400;
    const circles = powerCircles({ network: line, sendingVoltageKv: 400, receivingVoltageKv: 400 });
    expect(circles.receivingEnd.centreMw).toBeCloseTo(0, 9);
    expect(circles.receivingEnd.centreMvar).toBeCloseTo(-(400 ** 2) / Math.tan(theta) / zc, 9);
    expect(circles.receivingEnd.radiusMva).toBeCloseTo(400 ** 2 / (zc * Math.sin(theta)), 9);
    expect(circles.receivingEnd.maximumPMw).toBeCloseTo(
      powerAngleCurve({ network: line, sendingVoltageKv: 400, receivingVoltageKv: 400, pointCount: 2 }).steadyStateLimit.receivingPMw,
      6,
    );
  });
});

describe('qvCurve', () => {
  // Radial lossless reactance X from E, no active load: the reactive support needed to hold V is (V^2 - E V) / X, lowest at V = E/2
  // with -E^2 / (4X): the bus can take E^2 / (4X) of extra reactive load before collapse (Van Cutsem & Vournas 1998, ch. 2; from memory).
  test('gives the reactive margin E^2/(4X) at E/2 for an unloaded radial reactance', () => {
    const curve = qvCurve({ network: shortLossless(50), sendingVoltageKv: 400, load: { pMw: 0, qMvar: 0 } });
    expect(curve.reactiveMarginMvar).toBeCloseTo(400 ** 2 / (4 * 50), 4);
    expect(curve.minimum.voltageKv).toBeCloseTo(200, 2);
    curve.voltageKv.forEach((voltageKv, index) => expect(curve.supportMvar[index]).toBeCloseTo((voltageKv ** 2 - 400 * voltageKv) / 50, 6));
  });

  // Consistency: where the curve crosses zero support, the network alone carries the load at that voltage (Newton, upper branch).
  test('crosses zero support at the voltage the network gives without support', () => {
    const line = lineModel({
      frequencyHz: 60,
      seriesResistanceOhmPerKm: 0.0165,
      seriesReactanceOhmPerKm: 0.3306,
      shuntSusceptanceUsPerKm: 4.674,
      lengthKm: 300,
    });
    const load = { pMw: 1500, qMvar: 300 };
    const newton = solveFixedSendingVoltage({ network: line, sendingVoltageKv: 765, load });
    const atNewton = qvCurve({
      network: line,
      sendingVoltageKv: 765,
      load,
      pointCount: 2,
      minimumVoltageKv: newton.receivingEnd.voltageKv,
      maximumVoltageKv: 800,
    });
    expect(atNewton.supportMvar[0]).toBeCloseTo(0, 3);
    // Below the nose of the P-V curve the bus has a positive reactive margin.
    expect(qvCurve({ network: line, sendingVoltageKv: 765, load }).reactiveMarginMvar).toBeGreaterThan(0);
  });
});

describe('stabilityMarginPercent', () => {
  // P = Pmax·sin δ for a lossless link (Kundur, Power System Stability and Control, 1994, §2.x —
  // section from memory); at δ0 = 30° the load is Pmax/2, so the margin is exactly 50 %.
  test('is (Pmax − P0)/Pmax in percent', () => {
    expect(stabilityMarginPercent(1200, 1200 * Math.sin(Math.PI / 6))).toBeCloseTo(50, 12);
  });

  test('refuses an operating point above Pmax with out-of-range', () => {
    expect(() => stabilityMarginPercent(1200, 1300)).toThrow(expect.objectContaining({ code: 'out-of-range', quantity: 'operatingPowerMw' }));
  });

  test('refuses a Pmax that is not above 0 MW with out-of-range', () => {
    expect(() => stabilityMarginPercent(0, -10)).toThrow(expect.objectContaining({ code: 'out-of-range', quantity: 'maxPowerMw' }));
  });
});
