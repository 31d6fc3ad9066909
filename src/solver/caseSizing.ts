// Shunt reactor sizing across operating cases: the smallest set of standard units, split between buses, that keeps every case in band.
import { readCorridor, type Corridor, type CorridorInput } from './corridor.ts';
import { caseVoltageExtremes, readCase, readVoltageBand, solveCaseState, type CorridorCaseInput } from './cases.ts';
import { switchingSteps } from './switchingSteps.ts';
import { SolverDomainError, assertFiniteResult, optionalNumber, requireArray, requireChoice, requireNumber, requireObject } from './errors.ts';
import { VOLTAGE_RANGE_KV } from './lineModels.ts';

/** How the units being sized stand in one case: all in, all out, or the largest one out (the reactor contingency). */
export type SizedUnitsState = 'in' | 'out' | 'largest-out';

export interface SizingCaseInput {
  case: CorridorCaseInput;
  /** Default 'in'. */
  sizedUnits?: SizedUnitsState;
  /** The band for this case, when it differs from the study's (a temporary band for energisation, for instance). */
  bandPu?: { min: number; max: number };
  /**
   * Whether the step on switching each sized unit out is checked in this case (only when the units are in). Default: yes, except for
   * energisation, where the line's far end is open and reactors are not switched in normal operation (common practice).
   */
  checkSteps?: boolean;
}

export interface SizedUnit {
  name: string;
  bus: string;
  qMvar: number;
  ratedVoltageKv: number;
}

export interface BusAllotment {
  bus: string;
  unitCount: number;
  unitMvar: number;
  totalMvar: number;
}

/** Why an option fails: the first criterion it breaks, in the order the cases were given. */
export interface SizingFailure {
  case: string;
  criterion: 'voltage-high' | 'voltage-low' | 'switching-step' | 'no-operating-point';
  /** A bus name, or a section name for a voltage along a line. */
  where: string;
  /** Per-unit voltage, or the step in per cent; null when the case has no operating point. */
  value: number | null;
  limit: number | null;
  reason: string;
}

export interface SizingOption {
  allotment: BusAllotment[];
  totalMvar: number;
  unitCount: number;
  feasible: boolean;
  failure: SizingFailure | null;
}

export interface CaseVoltageSpan {
  case: string;
  sizedUnits: SizedUnitsState;
  lowestPu: number;
  lowestAt: string;
  highestPu: number;
  highestAt: string;
  bandPu: { min: number; max: number };
  /** The largest voltage step on switching one sized unit out (null when the units are out in this case). */
  largestStepPercent: number | null;
}

export interface ReactorSizingAcrossCases {
  ratingsMvar: number[];
  ratedVoltageKv: number;
  buses: string[];
  bandPu: { min: number; max: number };
  stepLimitPercent: number;
  /** The option chosen: least total Mvar, then fewest units, then the most even split; null when no option meets every case. */
  chosen: (SizingOption & { units: SizedUnit[]; cases: CaseVoltageSpan[] }) | null;
  /** The corridor with the chosen units added (in service), ready for solveCorridorCases; null when nothing was chosen. */
  corridor: CorridorInput | null;
  /** Every option evaluated, in the order tried (ascending total Mvar); the search stops at the first total that meets every case. */
  considered: SizingOption[];
  reason: string | null;
}

const HINT =
  'Pass { corridor, buses, ratingsMvar, ratedVoltageKv, cases: [{ case, sizedUnits?, bandPu? }], bandPu: { min, max }, stepLimitPercent, maxUnitsPerBus? }.';

/**
 * The smallest total of standard shunt reactor units (identical units per bus, up to maxUnitsPerBus at each candidate bus) that keeps
 * every bus and every point along every line within the voltage band in every case, and every switching step of one unit within its
 * limit. Options are tried in ascending total Mvar; each case is solved with the full corridor model (solveCorridorCases).
 */
export function sizeReactorsAcrossCases(options: {
  corridor: CorridorInput;
  buses: string[];
  ratingsMvar: number[];
  ratedVoltageKv: number;
  cases: SizingCaseInput[];
  bandPu: { min: number; max: number };
  stepLimitPercent: number;
  maxUnitsPerBus?: number;
}): ReactorSizingAcrossCases {
  const record = requireObject('options', options, HINT);
  const baseCorridor = readCorridor(record.corridor);
  const buses = requireArray('buses', record.buses, 1, HINT).map((name, index) => requireBus(baseCorridor, name, `buses[${index}]`));
  const ratingsMvar = [
    ...new Set(
      requireArray('ratingsMvar', record.ratingsMvar, 1, HINT).map((value, index) =>
        requireNumber(
          `ratingsMvar[${index}]`,
          value,
          { min: 0, max: 2000, minInclusive: false, unit: 'Mvar' },
          'Standard unit ratings, three-phase at the rated voltage.',
        ),
      ),
    ),
  ].sort((a, b) => a - b);
  const ratedVoltageKv = requireNumber(
    'ratedVoltageKv',
    record.ratedVoltageKv,
    VOLTAGE_RANGE_KV,
    "The units' rated voltage (often the highest system voltage, not the nominal).",
  );
  const bandPu = readVoltageBand('bandPu', record.bandPu);
  const stepLimitPercent = requireNumber(
    'stepLimitPercent',
    record.stepLimitPercent,
    { min: 0, max: 50, minInclusive: false, unit: '%' },
    'The largest voltage step on switching one unit; a few per cent is common practice, the utility criterion governs.',
  );
  const maxUnitsPerBus = optionalNumber('maxUnitsPerBus', record.maxUnitsPerBus, 2, { min: 1, max: 4 }, 'Identical units allowed at one bus.');
  if (!Number.isInteger(maxUnitsPerBus)) {
    throw new SolverDomainError({
      code: 'out-of-range',
      quantity: 'maxUnitsPerBus',
      value: maxUnitsPerBus,
      allowedRange: 'a whole number in [1, 4]',
      hint: 'Units allowed at one bus.',
    });
  }
  const cases = requireArray('cases', record.cases, 1, HINT).map((value, index) => {
    const path = `cases[${index}]`;
    const entry = requireObject(path, value, HINT);
    // Validated against the corridor as given: a case may not name the units being sized, which do not exist yet.
    readCase(baseCorridor, entry.case, `${path}.case`);
    return {
      case: entry.case as CorridorCaseInput,
      sizedUnits:
        entry.sizedUnits === undefined ? 'in' : requireChoice(`${path}.sizedUnits`, entry.sizedUnits, ['in', 'out', 'largest-out'] as const, HINT),
      bandPu: entry.bandPu === undefined ? bandPu : readVoltageBand(`${path}.bandPu`, entry.bandPu),
      checkSteps: readCheckSteps(`${path}.checkSteps`, entry.checkSteps, entry.case as CorridorCaseInput),
    };
  });
  const input = record.corridor as CorridorInput;
  // The profile is sampled finely enough that the highest point along a line is found to a few parts in a million.
  const settings = { toleranceMva: 1e-6, maxIterations: 30, profilePointCount: 101 };

  const considered: SizingOption[] = [];
  let chosen: ReactorSizingAcrossCases['chosen'] = null;
  for (const group of optionsByTotal(buses, ratingsMvar, maxUnitsPerBus)) {
    const feasible: Array<SizingOption & { units: SizedUnit[]; cases: CaseVoltageSpan[] }> = [];
    for (const allotment of group) {
      const units = unitsOf(allotment, ratedVoltageKv);
      const corridor = withUnits(input, units);
      const outcome = evaluate(corridor, units, cases, stepLimitPercent, settings);
      const option: SizingOption = {
        allotment,
        totalMvar: total(allotment),
        unitCount: allotment.reduce((sum, bus) => sum + bus.unitCount, 0),
        feasible: outcome.failure === null,
        failure: outcome.failure,
      };
      considered.push(option);
      if (option.feasible) feasible.push({ ...option, units, cases: outcome.spans });
    }
    if (feasible.length > 0) {
      chosen = feasible.sort((a, b) => a.unitCount - b.unitCount || unevenness(a.allotment) - unevenness(b.allotment))[0]!;
      break;
    }
  }
  return assertFiniteResult('sizeReactorsAcrossCases', {
    ratingsMvar,
    ratedVoltageKv,
    buses,
    bandPu,
    stepLimitPercent,
    chosen,
    corridor: chosen ? withUnits(input, chosen.units) : null,
    considered,
    reason: chosen
      ? null
      : `no combination of up to ${maxUnitsPerBus} identical units of ${ratingsMvar.join(', ')} Mvar at ${buses.join(', ')} meets every case`,
  });
}

function requireBus(corridor: Corridor, name: unknown, path: string): string {
  if (typeof name === 'string' && corridor.buses.some((bus) => bus.name === name)) return name;
  throw new SolverDomainError({
    code: 'out-of-range',
    quantity: path,
    value: String(name),
    allowedRange: `one of ${corridor.buses.map((bus) => `'${bus.name}'`).join(', ')}`,
    hint: 'Name a bus of the corridor where reactors may be placed.',
  });
}

function readCheckSteps(path: string, value: unknown, caseInput: CorridorCaseInput): boolean {
  if (value === undefined) return caseInput.loading.kind !== 'energisation';
  if (typeof value === 'boolean') return value;
  throw new SolverDomainError({ code: 'out-of-range', quantity: path, value: String(value), allowedRange: 'true or false', hint: HINT });
}

/** Every allotment (0..maxUnits identical units of one rating at each bus), grouped by total Mvar in ascending order. */
function optionsByTotal(buses: string[], ratingsMvar: number[], maxUnitsPerBus: number): BusAllotment[][][] {
  const choices: Array<{ unitCount: number; unitMvar: number }> = [{ unitCount: 0, unitMvar: 0 }];
  for (const unitMvar of ratingsMvar) for (let unitCount = 1; unitCount <= maxUnitsPerBus; unitCount += 1) choices.push({ unitCount, unitMvar });
  let allotments: BusAllotment[][] = [[]];
  for (const bus of buses) {
    allotments = allotments.flatMap((partial) =>
      choices.map((choice) => [...partial, { bus, ...choice, totalMvar: choice.unitCount * choice.unitMvar }]),
    );
  }
  const groups = new Map<number, BusAllotment[][]>();
  for (const allotment of allotments) {
    // Totals are rounded to a milli-var so that 2 x 30 and 1 x 60 fall in one group despite binary fractions.
    const key = Math.round(total(allotment) * 1e3);
    groups.set(key, [...(groups.get(key) ?? []), allotment]);
  }
  return [...groups.entries()].sort(([a], [b]) => a - b).map(([, group]) => group);
}

function total(allotment: BusAllotment[]): number {
  return allotment.reduce((sum, bus) => sum + bus.totalMvar, 0);
}

function unevenness(allotment: BusAllotment[]): number {
  const totals = allotment.map((bus) => bus.totalMvar);
  return Math.max(...totals) - Math.min(...totals);
}

function unitsOf(allotment: BusAllotment[], ratedVoltageKv: number): SizedUnit[] {
  return allotment.flatMap((bus) =>
    Array.from({ length: bus.unitCount }, (_, index) => ({
      name: `${bus.bus} sized reactor ${index + 1}`,
      bus: bus.bus,
      qMvar: bus.unitMvar,
      ratedVoltageKv,
    })),
  );
}

function withUnits(corridor: CorridorInput, units: SizedUnit[]): CorridorInput {
  return {
    ...corridor,
    buses: corridor.buses.map((bus) => {
      const added = units
        .filter((unit) => unit.bus === bus.name)
        .map((unit) => ({ name: unit.name, qMvar: unit.qMvar, ratedVoltageKv: unit.ratedVoltageKv }));
      return added.length === 0 ? bus : { ...bus, reactors: [...(bus.reactors ?? []), ...added] };
    }),
  };
}

/** The variants of one case to solve: with the units in or out, or once for each distinct largest unit out (the worst of them counts). */
function variantsOf(caseInput: CorridorCaseInput, state: SizedUnitsState, units: SizedUnit[]): CorridorCaseInput[] {
  const names = units.map((unit) => unit.name);
  const withOut = (out: string[]) => ({ ...caseInput, unitsOut: [...(caseInput.unitsOut ?? []), ...out] });
  if (state === 'in' || units.length === 0) return [caseInput];
  if (state === 'out') return [withOut(names)];
  const largestMvar = Math.max(...units.map((unit) => unit.qMvar));
  // Identical units at one bus are interchangeable: one variant per bus that has a unit of the largest rating.
  const representatives = [...new Map(units.filter((unit) => unit.qMvar === largestMvar).map((unit) => [unit.bus, unit.name])).values()];
  return representatives.map((name) => withOut([name]));
}

function evaluate(
  corridorInput: CorridorInput,
  units: SizedUnit[],
  cases: Array<{ case: CorridorCaseInput; sizedUnits: SizedUnitsState; bandPu: { min: number; max: number }; checkSteps: boolean }>,
  stepLimitPercent: number,
  settings: { toleranceMva: number; maxIterations: number; profilePointCount: number },
): { failure: SizingFailure | null; spans: CaseVoltageSpan[] } {
  const corridor = readCorridor(corridorInput);
  const spans: CaseVoltageSpan[] = [];
  for (const entry of cases) {
    const label = entry.case.label;
    let span: CaseVoltageSpan | null = null;
    for (const variant of variantsOf(entry.case, entry.sizedUnits, units)) {
      const solution = solveCaseState(corridor, readCase(corridor, variant, 'case'), settings);
      if (!solution.solved) {
        return { failure: { case: label, criterion: 'no-operating-point', where: '', value: null, limit: null, reason: solution.reason }, spans };
      }
      const extremes = caseVoltageExtremes(solution);
      if (span === null || extremes.highestPu > span.highestPu)
        span = { case: label, sizedUnits: entry.sizedUnits, ...extremes, bandPu: entry.bandPu, largestStepPercent: null };
      if (extremes.highestPu > entry.bandPu.max) {
        return { failure: bandFailure(label, 'voltage-high', extremes.highestAt, extremes.highestPu, entry.bandPu.max), spans };
      }
      if (extremes.lowestPu < entry.bandPu.min) {
        return { failure: bandFailure(label, 'voltage-low', extremes.lowestAt, extremes.lowestPu, entry.bandPu.min), spans };
      }
    }
    if (entry.sizedUnits === 'in' && entry.checkSteps && units.length > 0) {
      const steps = switchingSteps({ corridor: corridorInput, case: entry.case, stepLimitPercent, units: units.map((unit) => unit.name) });
      const failed = steps.steps.find((step) => !step.solved || !step.withinLimit);
      if (failed) {
        return {
          failure: failed.solved
            ? {
                case: label,
                criterion: 'switching-step',
                where: failed.largestAtBus,
                value: Math.abs(failed.largestChangePercent),
                limit: stepLimitPercent,
                reason: `switching ${failed.unit} out moves ${failed.largestAtBus} by ${Math.abs(failed.largestChangePercent).toFixed(2)} %, more than ${stepLimitPercent} %`,
              }
            : {
                case: label,
                criterion: 'no-operating-point',
                where: failed.bus,
                value: null,
                limit: null,
                reason: `after switching ${failed.unit}: ${failed.reason}`,
              },
          spans,
        };
      }
      if (span) span.largestStepPercent = steps.steps.reduce((largest, step) => Math.max(largest, Math.abs(step.largestChangePercent)), 0);
    }
    if (span) spans.push(span);
  }
  return { failure: null, spans };
}

function bandFailure(label: string, criterion: 'voltage-high' | 'voltage-low', where: string, valuePu: number, limitPu: number): SizingFailure {
  return {
    case: label,
    criterion,
    where,
    value: valuePu,
    limit: limitPu,
    reason: `${where} at ${valuePu.toFixed(4)} pu is ${criterion === 'voltage-high' ? 'above' : 'below'} ${limitPu} pu`,
  };
}
