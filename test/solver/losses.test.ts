import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { cascade, elementLosses, lineModel, seriesCapacitor, shuntReactor, solveFixedSendingVoltage, solveNoLoad } from '../../src/solver/index.ts';

const perKm = { frequencyHz: 50, seriesResistanceOhmPerKm: 0.03, seriesReactanceOhmPerKm: 0.32, shuntSusceptanceUsPerKm: 3.6 };
const half = lineModel({ ...perKm, lengthKm: 190, label: 'half line' });
const whole = lineModel({ ...perKm, lengthKm: 380 });
const reactor = shuntReactor({ qMvar: 80, ratedVoltageKv: 420, label: 'reactor' });
const capacitor = seriesCapacitor({ degreeOfCompensation: 0.35, compensatedLine: whole, label: 'mid-line bank' });
const route = cascade({ elements: [reactor, half, capacitor, half, reactor] });

describe('elementLosses', () => {
  // Energy balance (loads below the nose of this route, about 910 MW at unity power factor): the element losses add up to the operating point's own losses and reactive balance.
  test('adds up to the losses and reactive balance of the operating point', () => {
    fc.assert(
      fc.property(fc.double({ min: 0, max: 700, noNaN: true }), fc.double({ min: -200, max: 150, noNaN: true }), (pMw, qMvar) => {
        const point = solveFixedSendingVoltage({ network: route, sendingVoltageKv: 400, load: { pMw, qMvar } });
        const losses = elementLosses({ network: route, operatingPoint: point });
        expect(losses.total.lossesMw).toBeCloseTo(point.lossesMw, 6);
        expect(losses.total.reactiveMvar).toBeCloseTo(point.reactiveBalanceMvar, 6);
      }),
    );
  });

  // Definitions: a lossless shunt reactor absorbs V^2 B and no active power; a series capacitor generates 3 I^2 Xc.
  test('gives a reactor V^2 B and a series capacitor -3 I^2 Xc', () => {
    const point = solveFixedSendingVoltage({ network: route, sendingVoltageKv: 400, load: { pMw: 600, qMvar: 100 } });
    const losses = elementLosses({ network: route, operatingPoint: point });
    const first = losses.elements[0]!;
    expect(first.lossesMw).toBeCloseTo(0, 9);
    expect(first.reactiveMvar).toBeCloseTo(((first.inputVoltageKv * 1e3) ** 2 * -reactor.admittanceS.im) / 1e6, 6);
    const bank = losses.elements[2]!;
    expect(bank.reactiveMvar).toBeCloseTo(-(3 * bank.inputCurrentA ** 2 * capacitor.reactanceOhm) / 1e6, 6);
    expect(losses.elements.map((element) => element.label)).toEqual(['reactor', 'half line', 'mid-line bank', 'half line', 'reactor']);
  });

  test('refuses an operating point of another network', () => {
    expect(() => elementLosses({ network: route, operatingPoint: solveNoLoad({ network: whole, sendingVoltageKv: 400 }) })).toThrow(
      /does not belong to this network/,
    );
  });
});
