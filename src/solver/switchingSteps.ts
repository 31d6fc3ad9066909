// Switching steps of a corridor case: the voltage change at every bus when each shunt unit is switched, solved both ways, beside the Q / S_sc estimate.
import { readCorridor, type Corridor, type CorridorInput, type ShuntUnit } from './corridor.ts';
import { readCase, solveCaseState, type CaseState, type CorridorCaseInput, type SolvedCorridorCase } from './cases.ts';
import { shortCircuitMvaAtBuses } from './shortCircuit.ts';
import { SolverDomainError, assertFiniteResult, optionalNumber, requireArray, requireNumber, requireObject } from './errors.ts';
import { varToMvar } from './units.ts';

export interface BusVoltageChange {
  bus: string;
  beforeKv: number;
  afterKv: number;
  changePercent: number;
}

export interface SwitchingStep {
  unit: string;
  bus: string;
  kind: ShuntUnit['kind'];
  /** The operation studied: a unit in service in the case is switched out, one out of service is switched in. */
  operation: 'switch-in' | 'switch-out';
  solved: boolean;
  /** Why the case could not be solved after the operation (null when solved). */
  reason: string | null;
  /** The unit's reactive power at the bus voltage before the operation (positive capacitive). */
  unitMvar: number;
  /** Three-phase short-circuit power at the unit's bus with the network of the case (lines, their charging and the connected shunts) and both systems. */
  shortCircuitMva: number;
  /** Hand estimate at the unit's bus: dV/V ~ Q / S_sc, signed. */
  estimatedChangePercent: number;
  /** Solved change at the unit's bus. */
  changePercent: number;
  changes: BusVoltageChange[];
  largestChangePercent: number;
  largestAtBus: string;
  withinLimit: boolean;
}

export interface SwitchingSteps {
  case: string;
  solved: boolean;
  /** Why the case itself has no operating point (null when solved). */
  reason: string | null;
  stepLimitPercent: number;
  steps: SwitchingStep[];
  worst: { unit: string; bus: string; changePercent: number } | null;
}

const HINT = 'Pass { corridor, case, stepLimitPercent, units? } with units the names of shunt reactors or capacitor steps (all of them by default).';

/** The voltage change at every bus for each shunt unit switched, by solving the case before and after, against a step limit. */
export function switchingSteps(options: {
  corridor: CorridorInput;
  case: CorridorCaseInput;
  stepLimitPercent: number;
  units?: string[];
  toleranceMva?: number;
  maxIterations?: number;
}): SwitchingSteps {
  const record = requireObject('options', options, HINT);
  const corridor = readCorridor(record.corridor);
  const state = readCase(corridor, record.case, 'case');
  const stepLimitPercent = requireNumber(
    'stepLimitPercent',
    record.stepLimitPercent,
    { min: 0, max: 50, minInclusive: false, unit: '%' },
    'The largest voltage step allowed on switching one unit; a few per cent is common practice, the utility criterion governs.',
  );
  const allUnits = corridor.buses.flatMap((bus) => [...bus.reactors, ...bus.capacitors]);
  const units =
    record.units === undefined
      ? allUnits
      : requireArray('units', record.units, 1, HINT).map((name, index) => {
          const unit = allUnits.find((candidate) => candidate.name === name);
          if (!unit) {
            throw new SolverDomainError({
              code: 'out-of-range',
              quantity: `units[${index}]`,
              value: String(name),
              allowedRange:
                allUnits.length === 0 ? 'no shunt units in this corridor' : `one of ${allUnits.map((candidate) => `'${candidate.name}'`).join(', ')}`,
              hint: 'Name a shunt reactor or capacitor step of the corridor.',
            });
          }
          return unit;
        });
  const settings = {
    toleranceMva: optionalNumber(
      'toleranceMva',
      record.toleranceMva,
      1e-6,
      { min: 0, max: 1, minInclusive: false, unit: 'MVA' },
      'Power mismatch accepted at convergence.',
    ),
    maxIterations: optionalNumber('maxIterations', record.maxIterations, 30, { min: 1, max: 200 }, 'Newton iteration limit.'),
    profilePointCount: 2,
  };
  const before = solveCaseState(corridor, state, settings);
  if (!before.solved) {
    return assertFiniteResult('switchingSteps', {
      case: state.label,
      solved: false,
      reason: before.reason,
      stepLimitPercent,
      steps: [],
      worst: null,
    });
  }
  const strength = shortCircuitMvaAtBuses(corridor, state);
  const steps = units.map((unit) => stepFor(corridor, state, settings, before, unit, strength?.[unit.busIndex] ?? 0, stepLimitPercent));
  const worst = steps
    .filter((step) => step.solved)
    .reduce<SwitchingSteps['worst']>(
      (largest, step) =>
        largest === null || Math.abs(step.largestChangePercent) > Math.abs(largest.changePercent)
          ? { unit: step.unit, bus: step.largestAtBus, changePercent: step.largestChangePercent }
          : largest,
      null,
    );
  return assertFiniteResult('switchingSteps', { case: state.label, solved: true, reason: null, stepLimitPercent, steps, worst });
}

function stepFor(
  corridor: Corridor,
  state: CaseState,
  settings: { toleranceMva: number; maxIterations: number; profilePointCount: number },
  before: SolvedCorridorCase,
  unit: ShuntUnit,
  shortCircuitMva: number,
  stepLimitPercent: number,
): SwitchingStep {
  const wasInService = state.inService(unit.name);
  const toggled: CaseState = { ...state, inService: (name) => (name === unit.name ? !wasInService : state.inService(name)) };
  const after = solveCaseState(corridor, toggled, settings);
  const bus = corridor.buses[unit.busIndex]!;
  const beforeKv = before.buses[unit.busIndex]!.voltageKv;
  const unitMvar = varToMvar(unit.susceptanceS * (beforeKv * 1e3) ** 2);
  // Switching a unit in adds its output to the bus; switching it out removes it.
  const estimatedChangePercent = shortCircuitMva > 0 ? ((wasInService ? -unitMvar : unitMvar) / shortCircuitMva) * 100 : 0;
  const common = {
    unit: unit.name,
    bus: bus.name,
    kind: unit.kind,
    operation: wasInService ? ('switch-out' as const) : ('switch-in' as const),
    unitMvar,
    shortCircuitMva,
    estimatedChangePercent,
  };
  if (!after.solved) {
    return {
      ...common,
      solved: false,
      reason: after.reason,
      changePercent: 0,
      changes: [],
      largestChangePercent: 0,
      largestAtBus: bus.name,
      withinLimit: false,
    };
  }
  const changes = before.buses.map((entry, index) => {
    const afterKv = after.buses[index]!.voltageKv;
    return { bus: entry.name, beforeKv: entry.voltageKv, afterKv, changePercent: ((afterKv - entry.voltageKv) / entry.voltageKv) * 100 };
  });
  const largest = changes.reduce((best, change) => (Math.abs(change.changePercent) > Math.abs(best.changePercent) ? change : best));
  return {
    ...common,
    solved: true,
    reason: null,
    changePercent: changes[unit.busIndex]!.changePercent,
    changes,
    largestChangePercent: largest.changePercent,
    largestAtBus: largest.bus,
    withinLimit: Math.abs(largest.changePercent) <= stepLimitPercent,
  };
}
