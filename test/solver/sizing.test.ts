import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import {
  SolverDomainError,
  lineModel,
  pvCurve,
  shuntCapacitorForLoadVoltage,
  shuntReactorForNoLoad,
  solveFixedSendingVoltage,
  solveNoLoad,
  sourceEquivalent,
  svcRange,
  voltageProfile,
} from '../../src/solver/index.ts';
import { svcCharacteristicCorners } from '../../src/solver/sizing.ts';

// Saadat, "Power System Analysis" (2nd ed.), Example 5.7 data: 500 kV, 60 Hz, 300 km lossless, L = 0.97 mH/km, C = 0.0115 uF/km.
const saadatLine = lineModel({
  frequencyHz: 60,
  seriesResistanceOhmPerKm: 0,
  seriesInductanceMhPerKm: 0.97,
  shuntCapacitanceNfPerKm: 11.5,
  lengthKm: 300,
});
const zc = Math.sqrt(0.97e-3 / 11.5e-9);
const betaLength = 2 * Math.PI * 60 * Math.sqrt(0.97e-3 * 11.5e-9) * 300;

describe('shuntReactorForNoLoad', () => {
  // Closed form for a lossless line, receiving-end reactor holding Vr = Vs: X = Zc sin(beta l) / (1 - cos(beta l));
  // for the Saadat example data this is about 1519 ohm, 164.5 Mvar at 500 kV.
  test('sizes the receiving-end reactor of the Saadat example line by the closed-form expression', () => {
    const sizing = shuntReactorForNoLoad({ line: saadatLine, sendingVoltageKv: 500, targetReceivingVoltageKv: 500, ratedVoltageKv: 500 });
    const reactanceOhm = (zc * Math.sin(betaLength)) / (1 - Math.cos(betaLength));
    expect(sizing.reactorReactanceEachOhm).toBeCloseTo(reactanceOhm, 6);
    expect(sizing.reactorMvarEach).toBeCloseTo(500 ** 2 / reactanceOhm, 6);
    expect(sizing.receivingVoltageKv).toBeCloseTo(500, 9);
  });

  // Physical identity of the lossless line, over random lossless lines.
  test('matches X = Zc sin(beta l)/(1 - cos(beta l)) for any lossless line held at Vr = Vs', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 50, max: 900, noNaN: true }),
        fc.double({ min: 0.25, max: 0.45, noNaN: true }),
        fc.double({ min: 3, max: 5, noNaN: true }),
        (lengthKm, x, b) => {
          const line = lineModel({ frequencyHz: 50, seriesResistanceOhmPerKm: 0, seriesReactanceOhmPerKm: x, shuntSusceptanceUsPerKm: b, lengthKm });
          const theta = Math.sqrt(x * b * 1e-6) * lengthKm;
          const expectedOhm = (Math.sqrt(x / (b * 1e-6)) * Math.sin(theta)) / (1 - Math.cos(theta));
          const sizing = shuntReactorForNoLoad({ line, sendingVoltageKv: 400, targetReceivingVoltageKv: 400, ratedVoltageKv: 400 });
          expect(Math.abs((sizing.reactorReactanceEachOhm as number) / expectedOhm - 1)).toBeLessThan(1e-9);
        },
      ),
    );
  });

  // The reactor's susceptance from the closed form above (1 / X), not from the result; the line's is omega C l.
  test('reports the degree of shunt compensation as reactor over line susceptance', () => {
    const sizing = shuntReactorForNoLoad({ line: saadatLine, sendingVoltageKv: 500, targetReceivingVoltageKv: 500, ratedVoltageKv: 500 });
    const reactorSusceptanceS = (1 - Math.cos(betaLength)) / (zc * Math.sin(betaLength));
    const lineSusceptanceS = 2 * Math.PI * 60 * 11.5e-9 * 300;
    expect(sizing.reactorSusceptanceEachS).toBeCloseTo(reactorSusceptanceS, 12);
    expect(sizing.degreeOfShuntCompensation).toBeCloseTo(reactorSusceptanceS / lineSusceptanceS, 9);
  });

  test('lets the sending-end reactor of a pair act through the source impedance', () => {
    const sendingSystem = sourceEquivalent({ end: 'sending', shortCircuitMva: 5000, xOverR: 20, nominalVoltageKv: 500 });
    const single = shuntReactorForNoLoad({
      line: saadatLine,
      sendingVoltageKv: 500,
      targetReceivingVoltageKv: 500,
      ratedVoltageKv: 500,
      sendingSystem,
    });
    const pair = shuntReactorForNoLoad({
      line: saadatLine,
      sendingVoltageKv: 500,
      targetReceivingVoltageKv: 500,
      ratedVoltageKv: 500,
      sendingSystem,
      placement: 'both-ends',
    });
    expect(pair.reactorCount).toBe(2);
    expect(pair.reactorMvarEach).toBeLessThan(single.reactorMvarEach);
    expect(solveNoLoad({ network: pair.compensatedNetwork, sendingVoltageKv: 500 }).receivingEnd.voltageKv).toBeCloseTo(500, 6);
  });

  // Ferranti on the source: the charging current drawn through the system reactance raises the bus above the EMF.
  test('reports the sending-bus voltage and the highest voltage along the line with the reactors in', () => {
    const sendingSystem = sourceEquivalent({ end: 'sending', shortCircuitMva: 5000, xOverR: 20, nominalVoltageKv: 500 });
    const sizing = shuntReactorForNoLoad({
      line: saadatLine,
      sendingVoltageKv: 500,
      targetReceivingVoltageKv: 500,
      ratedVoltageKv: 500,
      sendingSystem,
    });
    expect(sizing.sendingSystemEmfKv).toBe(500);
    expect(sizing.sendingBusVoltageKv).toBeGreaterThan(500);
    const profile = voltageProfile({
      network: sizing.compensatedNetwork,
      operatingPoint: solveNoLoad({ network: sizing.compensatedNetwork, sendingVoltageKv: 500 }),
      pointCount: 401,
    });
    expect(sizing.maximumVoltage.voltageKv).toBeCloseTo(profile.maximum.voltageKv, 1);
    expect(sizing.maximumVoltage.positionKm).toBeGreaterThan(0);
    expect(sizing.maximumVoltage.positionKm).toBeLessThan(300);
  });

  test('holds a given sending-bus voltage instead of the EMF behind the source', () => {
    const sendingSystem = sourceEquivalent({ end: 'sending', shortCircuitMva: 5000, xOverR: 20, nominalVoltageKv: 500 });
    const sizing = shuntReactorForNoLoad({
      line: saadatLine,
      sendingBusVoltageKv: 500,
      targetReceivingVoltageKv: 500,
      ratedVoltageKv: 500,
      sendingSystem,
    });
    expect(sizing.sendingBusVoltageKv).toBeCloseTo(500, 9);
    expect(sizing.sendingSystemEmfKv).toBeLessThan(500);
    // A bus held at 500 kV makes the line see an ideal source: the closed form of the lossless line applies again.
    expect(sizing.reactorReactanceEachOhm).toBeCloseTo((zc * Math.sin(betaLength)) / (1 - Math.cos(betaLength)), 6);
  });

  // Reactors are rated at the highest system voltage (e.g. 525 kV on a 500 kV system, common practice): the same susceptance is a
  // larger nameplate rating, Q_rated = B V_rated^2, while the Mvar absorbed in service is B V_bus^2.
  test('rates the reactor at its rated voltage and reports the Mvar absorbed at the bus voltage', () => {
    const at500 = shuntReactorForNoLoad({ line: saadatLine, sendingVoltageKv: 500, targetReceivingVoltageKv: 500, ratedVoltageKv: 500 });
    const at525 = shuntReactorForNoLoad({ line: saadatLine, sendingVoltageKv: 500, targetReceivingVoltageKv: 500, ratedVoltageKv: 525 });
    expect(at525.reactorSusceptanceEachS).toBeCloseTo(at500.reactorSusceptanceEachS, 15);
    expect(at525.reactorMvarEach).toBeCloseTo(at500.reactorMvarEach * (525 / 500) ** 2, 9);
    expect(at525.reactors[0]?.mvarAtBusVoltage).toBeCloseTo(at500.reactorMvarEach, 9);
  });

  // With an ideal sending source the sending reactor of a pair does nothing to Vr, so the pair compensates twice the single reactor.
  test('warns when the reactors exceed 100 % of the line charging', () => {
    const pair = shuntReactorForNoLoad({
      line: saadatLine,
      sendingVoltageKv: 500,
      targetReceivingVoltageKv: 500,
      ratedVoltageKv: 500,
      placement: 'both-ends',
    });
    expect(pair.degreeOfShuntCompensation).toBeGreaterThan(1);
    expect(pair.warnings.join(' ')).toMatch(/exceed 100 % of the line charging/);
  });

  test('needs no reactor when the open-end voltage is already below the target', () => {
    expect(shuntReactorForNoLoad({ line: saadatLine, sendingVoltageKv: 500, targetReceivingVoltageKv: 560, ratedVoltageKv: 500 }).reactorNeeded).toBe(
      false,
    );
  });
});

describe('shuntCapacitorForLoadVoltage', () => {
  // Consistency by substitution: with the bank in place the sending voltage is the given one and the receiving voltage is
  // the target; without a bank the receiving voltage is at or above the target.
  test('holds the target receiving voltage with the computed bank', () => {
    fc.assert(
      fc.property(fc.double({ min: 400, max: 3200, noNaN: true }), fc.double({ min: 0.8, max: 0.99, noNaN: true }), (pMw, powerFactor) => {
        const line = lineModel({
          frequencyHz: 60,
          seriesResistanceOhmPerKm: 0.0165,
          seriesReactanceOhmPerKm: 0.3306,
          shuntSusceptanceUsPerKm: 4.674,
          lengthKm: 300,
        });
        let sizing: ReturnType<typeof shuntCapacitorForLoadVoltage>;
        try {
          sizing = shuntCapacitorForLoadVoltage({
            network: line,
            sendingVoltageKv: 765,
            targetReceivingVoltageKv: 765,
            load: { pMw, powerFactor, powerFactorSense: 'lagging' },
            ratedVoltageKv: 765,
          });
        } catch (error) {
          // Heavy, low power factor loads: the only banks reaching 765 kV put it on the lower branch (see the next describe).
          expect((error as SolverDomainError).code).toBe('target-unreachable');
          expect((error as Error).message).toMatch(/lower branch/);
          return;
        }
        expect(sizing.operatingPoint.sendingEnd.voltageKv).toBeCloseTo(765, 6);
        const solved = solveFixedSendingVoltage({
          network: sizing.compensatedNetwork,
          sendingVoltageKv: 765,
          load: { pMw, powerFactor, powerFactorSense: 'lagging' },
        });
        expect(solved.receivingEnd.voltageKv).toBeCloseTo(sizing.receivingVoltageKv, 2);
        if (sizing.capacitorNeeded) expect(sizing.operatingPoint.receivingEnd.voltageKv).toBeCloseTo(765, 9);
        else expect(sizing.operatingPoint.receivingEnd.voltageKv).toBeGreaterThanOrEqual(765);
      }),
    );
  });

  test('matches the closed form for a short lossless line with a unity-power-factor load', () => {
    const reactanceOhm = 60;
    const line = lineModel({
      frequencyHz: 50,
      seriesResistanceOhmPerKm: 0,
      seriesReactanceOhmPerKm: 0.6,
      shuntSusceptanceUsPerKm: 0,
      lengthKm: 100,
      model: 'short',
    });
    const volts = 400e3;
    const pW = 1000e6;
    // Vs = V + X (Qnet / V) + j X P / V with Qnet = -Qc; |Vs| = V gives Qc = (V - sqrt(V^2 - (X P / V)^2)) V / X (smaller root).
    const expectedMvar = ((volts - Math.sqrt(volts ** 2 - ((reactanceOhm * pW) / volts) ** 2)) * volts) / reactanceOhm / 1e6;
    const sizing = shuntCapacitorForLoadVoltage({
      network: line,
      sendingVoltageKv: 400,
      targetReceivingVoltageKv: 400,
      load: { pMw: 1000, qMvar: 0 },
      ratedVoltageKv: 400,
    });
    expect(sizing.capacitorMvar).toBeCloseTo(expectedMvar, 6);
  });
});

describe('shuntCapacitorForLoadVoltage near the nose', () => {
  // Lossless 60 ohm reactance from a 400 kV source; with 1200 MW + 300 Mvar the only bank that puts 250 kV at the bus puts it on the
  // lower (unstable) branch: solved normally from the source, the same bank leaves the bus near 361 kV.
  const reactance = lineModel({
    frequencyHz: 50,
    seriesResistanceOhmPerKm: 0,
    seriesReactanceOhmPerKm: 0.6,
    shuntSusceptanceUsPerKm: 0,
    lengthKm: 100,
    model: 'short',
  });

  test('refuses a target that only the lower branch of the P-V curve reaches', () => {
    const attempt = () =>
      shuntCapacitorForLoadVoltage({
        network: reactance,
        sendingVoltageKv: 400,
        targetReceivingVoltageKv: 250,
        load: { pMw: 1200, qMvar: 300 },
        ratedVoltageKv: 400,
      });
    expect(attempt).toThrow(SolverDomainError);
    expect(attempt).toThrow(/lower branch/);
  });

  // Consistency by substitution: the bank returned, solved from the sending voltage (Newton, upper branch), gives the target.
  test('returns only banks whose upper-branch operating point is the target', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 600, max: 1600, noNaN: true }),
        fc.double({ min: 0, max: 600, noNaN: true }),
        fc.double({ min: 300, max: 400, noNaN: true }),
        (pMw, qMvar, targetKv) => {
          let sizing: ReturnType<typeof shuntCapacitorForLoadVoltage>;
          try {
            sizing = shuntCapacitorForLoadVoltage({
              network: reactance,
              sendingVoltageKv: 400,
              targetReceivingVoltageKv: targetKv,
              load: { pMw, qMvar },
              ratedVoltageKv: 400,
            });
          } catch (error) {
            expect((error as SolverDomainError).code).toBe('target-unreachable');
            return;
          }
          const solved = solveFixedSendingVoltage({ network: sizing.compensatedNetwork, sendingVoltageKv: 400, load: { pMw, qMvar } });
          expect(solved.receivingEnd.voltageKv).toBeGreaterThanOrEqual(targetKv * (1 - 1e-6));
          // Newton stops at a 1e-6 MVA mismatch, a few volts at this loading.
          if (sizing.capacitorNeeded) expect(solved.receivingEnd.voltageKv).toBeCloseTo(targetKv, 2);
        },
      ),
    );
  });

  // The nose of the P-V curve with the bank in place (constant susceptance), at the load's power factor.
  test('reports the margin to the nose with the bank in and warns below the stated margin', () => {
    const load = { pMw: 1200, qMvar: 100 };
    const sizing = shuntCapacitorForLoadVoltage({
      network: reactance,
      sendingVoltageKv: 400,
      targetReceivingVoltageKv: 330,
      load,
      ratedVoltageKv: 400,
      minimumNoseMarginPercent: 20,
    });
    const pv = pvCurve({
      network: sizing.compensatedNetwork,
      sendingVoltageKv: 400,
      powerFactor: 1200 / Math.hypot(1200, 100),
      powerFactorSense: 'lagging',
      pointCount: 2,
    });
    expect(sizing.noseMarginPercent).toBeCloseTo(((pv.nose.pMw - 1200) / pv.nose.pMw) * 100, 6);
    expect(sizing.noseMarginPercent).toBeLessThan(20);
    expect(sizing.warnings.join(' ')).toMatch(/below the 20 % margin/);
  });
});

describe('svcRange', () => {
  const line = lineModel({
    frequencyHz: 50,
    seriesResistanceOhmPerKm: 0.03,
    seriesReactanceOhmPerKm: 0.32,
    shuntSusceptanceUsPerKm: 3.6,
    lengthKm: 250,
  });
  const loadCases = [
    { label: 'light', load: { pMw: 50, qMvar: 0 } },
    { label: 'heavy', load: { pMw: 900, powerFactor: 0.95, powerFactorSense: 'lagging' as const } },
  ];

  test('holds the bus exactly at the reference voltage with zero slope', () => {
    const result = svcRange({
      network: line,
      sendingVoltageKv: 400,
      referenceVoltageKv: 400,
      nominalVoltageKv: 400,
      slopePercent: 0,
      slopeBaseMva: 300,
      loadCases,
    });
    for (const item of result.cases) expect(item.busVoltageKv).toBeCloseTo(400, 9);
    expect(result.cases[0]?.mode).toBe('inductive');
    expect(result.cases[1]?.mode).toBe('capacitive');
    expect(result.capacitiveRatingMvarAtNominalVoltage).toBeGreaterThan(0);
    expect(result.inductiveRatingMvarAtNominalVoltage).toBeGreaterThan(0);
  });

  // V-I characteristic: V = Vref - slope * Vnom^2 * Q / (V * Sbase); checked by substitution.
  test('places each case on the sloped V-I characteristic', () => {
    const result = svcRange({
      network: line,
      sendingVoltageKv: 400,
      referenceVoltageKv: 400,
      nominalVoltageKv: 400,
      slopePercent: 3,
      slopeBaseMva: 300,
      loadCases,
    });
    for (const item of result.cases) {
      const expected = 400 - (0.03 * 400 ** 2 * item.svcOutputMvar) / (item.busVoltageKv * 300);
      expect(item.busVoltageKv).toBeCloseTo(expected, 6);
    }
    // A slope lets the voltage sag under capacitive output, so less output is needed than with a flat characteristic.
    const flat = svcRange({
      network: line,
      sendingVoltageKv: 400,
      referenceVoltageKv: 400,
      nominalVoltageKv: 400,
      slopePercent: 0,
      slopeBaseMva: 300,
      loadCases,
    });
    expect(result.maxCapacitiveOutputMvar).toBeLessThan(flat.maxCapacitiveOutputMvar);
  });
});

describe('svcCharacteristicCorners', () => {
  // Control range V = Vref + Xs·I (I > 0 inductive) meets the limit lines I = −B_C·V and I = B_L·V
  // (Hingorani & Gyugyi, Understanding FACTS, 2000, ch. 5 — chapter from memory). Hand calculation
  // for Vref = 1, Xs = 0.05, B_C = 1, B_L = 0.5: V_C = 1/1.05, V_L = 1/0.975.
  const input = { slopePercent: 5, referenceVoltagePu: 1, bMaxCapacitivePu: 1, bMaxInductivePu: 0.5 };

  test('puts the capacitive corner where the slope meets I = −B_C·V', () => {
    const { capacitiveCorner } = svcCharacteristicCorners(input);
    expect(capacitiveCorner.voltagePu).toBeCloseTo(1 / 1.05, 12);
    expect(capacitiveCorner.currentPu).toBeCloseTo(-1 / 1.05, 12);
  });

  test('puts the inductive corner where the slope meets I = B_L·V', () => {
    const { inductiveCorner } = svcCharacteristicCorners(input);
    expect(inductiveCorner.voltagePu).toBeCloseTo(1 / 0.975, 12);
    expect(inductiveCorner.currentPu).toBeCloseTo(0.5 / 0.975, 12);
  });

  test('keeps both corners on the control slope', () => {
    for (const corner of Object.values(svcCharacteristicCorners(input))) {
      expect(corner.voltagePu).toBeCloseTo(1 + 0.05 * corner.currentPu, 12);
    }
  });

  test('refuses a slope that never meets the inductive limit with inconsistent-quantities', () => {
    expect(() => svcCharacteristicCorners({ ...input, slopePercent: 50, bMaxInductivePu: 2 })).toThrow(
      expect.objectContaining({ code: 'inconsistent-quantities', quantity: 'slopePercent × bMaxInductivePu / 100' }),
    );
  });

  test('refuses a slope of 100 % or more with out-of-range', () => {
    expect(() => svcCharacteristicCorners({ ...input, slopePercent: 100 })).toThrow(
      expect.objectContaining({ code: 'out-of-range', quantity: 'slopePercent' }),
    );
  });
});
