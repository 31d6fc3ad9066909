// Losses and capitalised cost of compensation options: annual loss energy, present value over the life, and a ranked comparison.
import { SolverDomainError, assertFiniteResult, optionalNumber, requireArray, requireNumber, requireObject } from './errors.ts';
import { wToMw } from './units.ts';

const HOURS_PER_YEAR = 8760;

/** Line losses in one of three forms: a load-duration of currents, a peak loss with its loss factor, or a peak loss with the load factor. */
export type LineLossInput =
  | { resistanceOhmPerPhase: number; loadDuration: Array<{ hours: number; currentA: number }> }
  | { peakLossMw: number; lossFactor: number }
  | { peakLossMw: number; loadFactor: number; lossFactorCoefficient?: number };

export interface CompensationOption {
  label: string;
  equipmentCost: number;
  lineLosses: LineLossInput;
  /** Reactor, capacitor and compensator losses, each at its own in-service hours (8760 by default). */
  equipmentLosses?: Array<{ label: string; lossMw: number; hoursPerYear?: number }>;
  annualMaintenanceCost?: number;
}

export interface CapitalisedCostOptions {
  discountRatePercent: number;
  lifeYears: number;
  energyCostPerMwh: number;
  /** Cost of the generating capacity that supplies the peak losses, per kW of peak loss and year; 0 by default. */
  demandCostPerKwYear?: number;
  /** A label for the cost unit (e.g. a currency); figures are in that unit. */
  costUnit?: string;
  options: CompensationOption[];
}

export interface OptionCost {
  label: string;
  equipmentCost: number;
  lineLossEnergyMwhPerYear: number;
  lineLossFactor: number;
  linePeakLossMw: number;
  equipmentLossEnergyMwhPerYear: number;
  annualLossCost: number;
  annualMaintenanceCost: number;
  presentValueOfLosses: number;
  presentValueOfMaintenance: number;
  capitalisedCost: number;
  /** Above the cheapest option's capitalised cost. */
  differenceToCheapest: number;
  rank: number;
}

export interface CapitalisedCostComparison {
  costUnit: string;
  discountRatePercent: number;
  lifeYears: number;
  /** Present value of 1 per year for lifeYears, paid at each year's end. */
  presentValueFactor: number;
  options: OptionCost[];
  cheapest: string;
}

const HINT =
  'Pass { discountRatePercent, lifeYears, energyCostPerMwh, demandCostPerKwYear?, costUnit?, options: [{ label, equipmentCost, lineLosses: { resistanceOhmPerPhase, loadDuration: [{ hours, currentA }] } | { peakLossMw, lossFactor } | { peakLossMw, loadFactor, lossFactorCoefficient? }, equipmentLosses?: [{ label, lossMw, hoursPerYear? }], annualMaintenanceCost? }] }.';

/** Discounted sum of a constant end-of-year amount: sum over t = 1..n of 1 / (1 + r)^t (the annuity formula is checked against it). */
export function presentValueOfConstantAnnual(annualAmount: number, discountRate: number, lifeYears: number): number {
  let total = 0;
  for (let year = 1; year <= lifeYears; year += 1) total += annualAmount / (1 + discountRate) ** year;
  return total;
}

function readLineLosses(where: string, value: unknown): { energyMwh: number; peakMw: number; lossFactor: number } {
  const record = requireObject(where, value, HINT);
  if (record.loadDuration !== undefined) {
    const resistanceOhm = requireNumber(
      `${where}.resistanceOhmPerPhase`,
      record.resistanceOhmPerPhase,
      { min: 0, max: 1e4, unit: 'ohm' },
      'Series resistance of one phase of the line (at operating temperature).',
    );
    const blocks = requireArray(`${where}.loadDuration`, record.loadDuration, 1, HINT).map((block, index) => {
      const entry = requireObject(`${where}.loadDuration[${index}]`, block, HINT);
      return {
        hours: requireNumber(`${where}.loadDuration[${index}].hours`, entry.hours, { min: 0, max: HOURS_PER_YEAR, unit: 'h' }, HINT),
        currentA: requireNumber(`${where}.loadDuration[${index}].currentA`, entry.currentA, { min: 0, max: 1e5, unit: 'A' }, HINT),
      };
    });
    const totalHours = blocks.reduce((sum, block) => sum + block.hours, 0);
    if (totalHours > HOURS_PER_YEAR + 1e-9) {
      throw new SolverDomainError({
        code: 'out-of-range',
        quantity: `${where}.loadDuration (total hours)`,
        value: totalHours,
        allowedRange: `[0, ${HOURS_PER_YEAR}] h`,
        hint: 'The load-duration blocks of one year add up to at most 8760 h.',
      });
    }
    const lossMw = (currentA: number) => wToMw(3 * currentA ** 2 * resistanceOhm);
    const energyMwh = blocks.reduce((sum, block) => sum + block.hours * lossMw(block.currentA), 0);
    const peakMw = Math.max(...blocks.map((block) => lossMw(block.currentA)));
    return { energyMwh, peakMw, lossFactor: peakMw > 0 ? energyMwh / (peakMw * HOURS_PER_YEAR) : 0 };
  }
  const peakMw = requireNumber(`${where}.peakLossMw`, record.peakLossMw, { min: 0, max: 1e4, unit: 'MW' }, HINT);
  let lossFactor: number;
  if (record.lossFactor !== undefined) {
    lossFactor = requireNumber(`${where}.lossFactor`, record.lossFactor, { min: 0, max: 1 }, 'Average over peak losses in the year.');
  } else {
    const loadFactor = requireNumber(`${where}.loadFactor`, record.loadFactor, { min: 0, max: 1 }, 'Give lossFactor, or loadFactor to estimate it.');
    // Buller and Woodrow's estimate, loss factor = k LF + (1 - k) LF^2, with k = 0.3 by common practice (from memory).
    const k = optionalNumber(
      `${where}.lossFactorCoefficient`,
      record.lossFactorCoefficient,
      0.3,
      { min: 0, max: 1 },
      'k in k LF + (1 - k) LF^2; 0.3 in common practice, 0.15 to 0.3 by system.',
    );
    lossFactor = k * loadFactor + (1 - k) * loadFactor ** 2;
  }
  return { energyMwh: peakMw * lossFactor * HOURS_PER_YEAR, peakMw, lossFactor };
}

/**
 * Capitalised cost of each option = equipment cost + present value of its annual loss cost (energy at energyCostPerMwh plus
 * peak losses at demandCostPerKwYear) and maintenance over lifeYears at the discount rate (constant real prices, end-of-year
 * payments); options ranked from the cheapest.
 */
export function capitalisedCostComparison(options: CapitalisedCostOptions): CapitalisedCostComparison {
  const record = requireObject('options', options, HINT);
  const discountRatePercent = requireNumber(
    'discountRatePercent',
    record.discountRatePercent,
    { min: 0, max: 50, unit: '%' },
    'A real discount rate, as prices are held constant.',
  );
  const lifeYears = requireNumber('lifeYears', record.lifeYears, { min: 1, max: 100, unit: 'years' }, HINT);
  if (!Number.isInteger(lifeYears)) {
    throw new SolverDomainError({
      code: 'out-of-range',
      quantity: 'lifeYears',
      value: lifeYears,
      allowedRange: 'a whole number of years in [1, 100]',
      hint: HINT,
    });
  }
  const energyCostPerMwh = requireNumber('energyCostPerMwh', record.energyCostPerMwh, { min: 0, max: 1e5 }, HINT);
  const demandCostPerKwYear = optionalNumber('demandCostPerKwYear', record.demandCostPerKwYear, 0, { min: 0, max: 1e5 }, HINT);
  const costUnit = typeof record.costUnit === 'string' && record.costUnit !== '' ? record.costUnit : 'cost units';
  const rate = discountRatePercent / 100;
  const presentValueFactor = presentValueOfConstantAnnual(1, rate, lifeYears);

  const costed = requireArray('options.options', record.options, 1, HINT).map((value, index) => {
    const where = `options[${index}]`;
    const option = requireObject(where, value, HINT);
    const label = typeof option.label === 'string' && option.label !== '' ? option.label : `option ${index + 1}`;
    const equipmentCost = requireNumber(`${where}.equipmentCost`, option.equipmentCost, { min: 0, max: 1e13 }, HINT);
    const line = readLineLosses(`${where}.lineLosses`, option.lineLosses);
    const equipmentLossEnergyMwhPerYear =
      option.equipmentLosses === undefined
        ? 0
        : requireArray(`${where}.equipmentLosses`, option.equipmentLosses, 0, HINT).reduce<number>((sum, loss, lossIndex) => {
            const entry = requireObject(`${where}.equipmentLosses[${lossIndex}]`, loss, HINT);
            const lossMw = requireNumber(
              `${where}.equipmentLosses[${lossIndex}].lossMw`,
              entry.lossMw,
              { min: 0, max: 1e3, unit: 'MW' },
              'Losses of the reactor, capacitor or compensator in service (e.g. 0.2 % of rated Mvar for a shunt reactor).',
            );
            const hours = optionalNumber(
              `${where}.equipmentLosses[${lossIndex}].hoursPerYear`,
              entry.hoursPerYear,
              HOURS_PER_YEAR,
              { min: 0, max: HOURS_PER_YEAR, unit: 'h' },
              HINT,
            );
            return sum + lossMw * hours;
          }, 0);
    const annualMaintenanceCost = optionalNumber(`${where}.annualMaintenanceCost`, option.annualMaintenanceCost, 0, { min: 0, max: 1e12 }, HINT);
    // Peak demand is charged on the line's peak losses; equipment losses are counted as energy only.
    const annualLossCost = (line.energyMwh + equipmentLossEnergyMwhPerYear) * energyCostPerMwh + line.peakMw * 1e3 * demandCostPerKwYear;
    const presentValueOfLosses = annualLossCost * presentValueFactor;
    const presentValueOfMaintenance = annualMaintenanceCost * presentValueFactor;
    return {
      label,
      equipmentCost,
      lineLossEnergyMwhPerYear: line.energyMwh,
      lineLossFactor: line.lossFactor,
      linePeakLossMw: line.peakMw,
      equipmentLossEnergyMwhPerYear,
      annualLossCost,
      annualMaintenanceCost,
      presentValueOfLosses,
      presentValueOfMaintenance,
      capitalisedCost: equipmentCost + presentValueOfLosses + presentValueOfMaintenance,
    };
  });
  const cheapestCost = Math.min(...costed.map((option) => option.capitalisedCost));
  const order = [...costed].sort((first, second) => first.capitalisedCost - second.capitalisedCost);
  const ranked = costed.map((option) => ({
    ...option,
    differenceToCheapest: option.capitalisedCost - cheapestCost,
    rank: order.indexOf(option) + 1,
  }));
  return assertFiniteResult('capitalisedCostComparison', {
    costUnit,
    discountRatePercent,
    lifeYears,
    presentValueFactor,
    options: ranked,
    cheapest: order[0]!.label,
  });
}
