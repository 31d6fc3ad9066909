import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { SolverDomainError, capitalisedCostComparison } from '../../src/solver/index.ts';
import { presentValueOfConstantAnnual } from '../../src/solver/costs.ts';

const base = { discountRatePercent: 8, lifeYears: 30, energyCostPerMwh: 50 };

describe('capitalisedCostComparison', () => {
  // Present value of an annuity of 1, 8 % for 30 years: 11.2578 (standard present-value annuity tables, four decimals).
  test('uses the tabulated present-value factor of 11.2578 at 8 % over 30 years', () => {
    const result = capitalisedCostComparison({ ...base, options: [{ label: 'a', equipmentCost: 0, lineLosses: { peakLossMw: 0, lossFactor: 0 } }] });
    expect(result.presentValueFactor).toBeCloseTo(11.2578, 4);
  });

  test('gives the present value of a constant annual loss by the annuity formula A (1 - (1 + r)^-n) / r (identity)', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0.001, max: 0.2, noNaN: true }),
        fc.integer({ min: 1, max: 60 }),
        fc.double({ min: 1, max: 1e7, noNaN: true }),
        (rate, years, amount) => {
          const annuity = (amount * (1 - (1 + rate) ** -years)) / rate;
          expect(presentValueOfConstantAnnual(amount, rate, years) / annuity).toBeCloseTo(1, 10);
        },
      ),
      { numRuns: 200 },
    );
  });

  test('discounts nothing at a zero rate: n times the annual amount', () => {
    expect(presentValueOfConstantAnnual(3, 0, 25)).toBe(75);
  });

  // Buller and Woodrow (1928), loss factor = 0.3 LF + 0.7 LF^2 (from memory; the coefficient 0.3 is common practice).
  test('estimates the loss factor from the load factor with the Buller-Woodrow relation', () => {
    const result = capitalisedCostComparison({
      ...base,
      options: [{ label: 'a', equipmentCost: 0, lineLosses: { peakLossMw: 10, loadFactor: 0.6 } }],
    });
    expect(result.options[0]!.lineLossFactor).toBeCloseTo(0.3 * 0.6 + 0.7 * 0.36, 12);
    expect(result.options[0]!.lineLossEnergyMwhPerYear).toBeCloseTo(10 * 0.432 * 8760, 6);
  });

  test('integrates 3 I^2 R over a load-duration and reports its loss factor', () => {
    const result = capitalisedCostComparison({
      ...base,
      options: [
        {
          label: 'a',
          equipmentCost: 0,
          lineLosses: {
            resistanceOhmPerPhase: 8,
            loadDuration: [
              { hours: 2000, currentA: 1500 },
              { hours: 6760, currentA: 750 },
            ],
          },
        },
      ],
    });
    const peakMw = (3 * 1500 ** 2 * 8) / 1e6;
    const energyMwh = 2000 * peakMw + (6760 * peakMw) / 4;
    expect(result.options[0]!.lineLossEnergyMwhPerYear).toBeCloseTo(energyMwh, 6);
    expect(result.options[0]!.lineLossFactor).toBeCloseTo(energyMwh / (peakMw * 8760), 12);
  });

  test('adds equipment cost and the present value of losses and maintenance, and ranks the options', () => {
    const result = capitalisedCostComparison({
      ...base,
      demandCostPerKwYear: 40,
      costUnit: 'kcr',
      options: [
        {
          label: 'series capacitor',
          equipmentCost: 30e6,
          lineLosses: { peakLossMw: 18, lossFactor: 0.4 },
          equipmentLosses: [{ label: 'bank', lossMw: 0.3, hoursPerYear: 6000 }],
          annualMaintenanceCost: 2e5,
        },
        { label: 'second circuit', equipmentCost: 120e6, lineLosses: { peakLossMw: 9, lossFactor: 0.4 } },
      ],
    });
    const [capacitor, circuit] = result.options;
    const annualLoss = (18 * 0.4 * 8760 + 0.3 * 6000) * 50 + 18e3 * 40;
    // The present value of an annuity of 1 at 8 % over 30 years, (1 - 1.08^-30) / 0.08, from the inputs, not from the result.
    const presentValueFactor = (1 - 1.08 ** -30) / 0.08;
    expect(capacitor!.capitalisedCost).toBeCloseTo(30e6 + (annualLoss + 2e5) * presentValueFactor, 3);
    expect(result.cheapest).toBe('series capacitor');
    expect(capacitor!.rank).toBe(1);
    expect(circuit!.differenceToCheapest).toBeCloseTo(circuit!.capitalisedCost - capacitor!.capitalisedCost, 6);
    expect(result.costUnit).toBe('kcr');
  });

  test('refuses a load-duration longer than a year', () => {
    const call = () =>
      capitalisedCostComparison({
        ...base,
        options: [
          {
            label: 'a',
            equipmentCost: 0,
            lineLosses: {
              resistanceOhmPerPhase: 1,
              loadDuration: [
                { hours: 8000, currentA: 1 },
                { hours: 1000, currentA: 1 },
              ],
            },
          },
        ],
      });
    expect(call).toThrow(SolverDomainError);
    expect(call).toThrow(/8760/);
  });
});
