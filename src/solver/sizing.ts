// Shunt compensation sizing: reactors for the no-load voltage, capacitors for a heavy-load voltage, and SVC range over load cases.
import { Complex } from './complex.ts';
import { SolverDomainError, assertFiniteResult, requireArray, requireChoice, requireNumber, requireObject } from './errors.ts';
import { lineShuntSusceptanceS, shuntCapacitor, shuntReactor } from './elements.ts';
import { VOLTAGE_RANGE_KV } from './lineModels.ts';
import { lineModelsOf, readLoad, readNetwork, solveFixedSendingVoltage, solveReceivingLoad, type LoadInput, type OperatingPoint } from './solutions.ts';
import {
  abcdOf,
  cascade,
  readTwoPort,
  type CascadeTwoPort,
  type SourceEquivalentTwoPort,
  type TwoPort,
} from './twoPort.ts';
import { kvToV } from './units.ts';

/** Bisection for the root of a function that is positive at `low` and negative at `high`. */
function bisect(fn: (value: number) => number, low: number, high: number): number {
  let lower = low;
  let upper = high;
  for (let iteration = 0; iteration < 200 && upper - lower > 1e-15 * Math.max(1, Math.abs(upper)); iteration += 1) {
    const middle = (lower + upper) / 2;
    if (fn(middle) > 0) lower = middle;
    else upper = middle;
  }
  return (lower + upper) / 2;
}

export type ReactorPlacement = 'receiving-end' | 'both-ends';

export interface ShuntReactorSizing {
  placement: ReactorPlacement;
  reactorNeeded: boolean;
  reactorCount: number;
  /** Three-phase rating of each reactor at ratedVoltageKv. */
  reactorMvarEach: number;
  totalReactorMvar: number;
  reactorSusceptanceEachS: number;
  /** Per-phase reactance of each reactor, or null when no reactor is needed. */
  reactorReactanceEachOhm: number | null;
  /** Reactor susceptance as a share of the line's total charging susceptance. */
  degreeOfShuntCompensation: number;
  lineChargingMvarAtRatedVoltage: number;
  noLoadReceivingVoltageWithoutReactorKv: number;
  receivingVoltageKv: number;
  lineModels: string[];
  compensatedNetwork: CascadeTwoPort;
}

/**
 * Shunt reactor (rated Mvar) that holds the no-load receiving voltage at a target, at the receiving end or equally at both ends.
 * With an ideal sending source the sending-end reactor cannot change Vr, so each reactor of a pair equals the single one;
 * give sendingSystem to let the sending reactor act through the source impedance.
 */
export function shuntReactorForNoLoad(options: {
  line: TwoPort;
  sendingVoltageKv: number;
  targetReceivingVoltageKv: number;
  ratedVoltageKv: number;
  placement?: ReactorPlacement;
  sendingSystem?: SourceEquivalentTwoPort;
}): ShuntReactorSizing {
  const hint = "Pass { line, sendingVoltageKv, targetReceivingVoltageKv, ratedVoltageKv, placement?: 'receiving-end' | 'both-ends', sendingSystem? }.";
  const record = requireObject('options', options, hint);
  const line = readTwoPort('line', record.line);
  const sendingVoltageKv = requireNumber('sendingVoltageKv', record.sendingVoltageKv, VOLTAGE_RANGE_KV, hint);
  const targetReceivingVoltageKv = requireNumber('targetReceivingVoltageKv', record.targetReceivingVoltageKv, VOLTAGE_RANGE_KV, hint);
  const ratedVoltageKv = requireNumber('ratedVoltageKv', record.ratedVoltageKv, VOLTAGE_RANGE_KV, hint);
  const placement = record.placement === undefined ? 'receiving-end' : requireChoice('placement', record.placement, ['receiving-end', 'both-ends'] as const, hint);
  const sendingSystem = record.sendingSystem === undefined ? null : readTwoPort('sendingSystem', record.sendingSystem);
  const lineSusceptanceS = lineShuntSusceptanceS(line);
  const ratedVoltageV = kvToV(ratedVoltageKv);
  const reactorCount = placement === 'both-ends' ? 2 : 1;

  const networkWith = (susceptanceS: number): TwoPort[] => {
    const reactor = (label: string) => shuntReactor({ qMvar: (susceptanceS * ratedVoltageV * ratedVoltageV) / 1e6, ratedVoltageKv, label });
    const parts: TwoPort[] = [];
    if (sendingSystem) parts.push(sendingSystem);
    if (susceptanceS > 0 && placement === 'both-ends') parts.push(reactor('sending-end shunt reactor'));
    parts.push(line);
    if (susceptanceS > 0) parts.push(reactor('receiving-end shunt reactor'));
    return parts;
  };
  const receivingVoltageKv = (susceptanceS: number): number => {
    const parts = networkWith(susceptanceS);
    const matrix = parts.length === 1 ? abcdOf(line) : abcdOf(cascade({ elements: parts }));
    return sendingVoltageKv / matrix.A.abs();
  };

  const withoutReactorKv = receivingVoltageKv(0);
  let susceptanceS = 0;
  if (withoutReactorKv > targetReceivingVoltageKv) {
    let upper = Math.max(lineSusceptanceS, 1e-6);
    for (let doubling = 0; receivingVoltageKv(upper) > targetReceivingVoltageKv; doubling += 1) {
      if (doubling > 60) {
        throw new SolverDomainError({
          code: 'TARGET_UNREACHABLE',
          quantity: 'targetReceivingVoltageKv',
          value: targetReceivingVoltageKv,
          allowedRange: `above what shunt reactors can reach on this network`,
          hint: 'No reactor size brings the no-load voltage down to the target; check the network and the target.',
        });
      }
      upper *= 2;
    }
    susceptanceS = bisect((value) => receivingVoltageKv(value) - targetReceivingVoltageKv, 0, upper);
  }
  const reactorMvarEach = (susceptanceS * ratedVoltageV * ratedVoltageV) / 1e6;
  const parts = networkWith(susceptanceS);
  const compensatedNetwork = cascade({ elements: parts, label: `${line.label} with ${placement} shunt reactor${reactorCount > 1 ? 's' : ''}` });
  return assertFiniteResult('shuntReactorForNoLoad', {
    placement,
    reactorNeeded: susceptanceS > 0,
    reactorCount: susceptanceS > 0 ? reactorCount : 0,
    reactorMvarEach,
    totalReactorMvar: susceptanceS > 0 ? reactorMvarEach * reactorCount : 0,
    reactorSusceptanceEachS: susceptanceS,
    reactorReactanceEachOhm: susceptanceS > 0 ? 1 / susceptanceS : null,
    degreeOfShuntCompensation: lineSusceptanceS > 0 ? (susceptanceS * (susceptanceS > 0 ? reactorCount : 0)) / lineSusceptanceS : 0,
    lineChargingMvarAtRatedVoltage: (lineSusceptanceS * ratedVoltageV * ratedVoltageV) / 1e6,
    noLoadReceivingVoltageWithoutReactorKv: withoutReactorKv,
    receivingVoltageKv: receivingVoltageKv(susceptanceS),
    lineModels: lineModelsOf(line),
    compensatedNetwork,
  });
}

export interface ShuntCapacitorSizing {
  capacitorNeeded: boolean;
  /** Three-phase rating at ratedVoltageKv. */
  capacitorMvar: number;
  capacitorSusceptanceS: number;
  /** Reactive power the bank actually supplies at the held receiving voltage. */
  capacitorOutputMvar: number;
  /** The target when a bank is needed; otherwise the (higher) voltage reached without one. */
  receivingVoltageKv: number;
  lineModels: string[];
  operatingPoint: OperatingPoint;
  compensatedNetwork: TwoPort;
}

/**
 * Receiving-end shunt capacitor that holds the receiving voltage at a target for a heavy load with a fixed sending voltage.
 * With Vr fixed (reference), Vs = A Vr + B (P - j(Q - b Vr^2)) / Vr is affine in the susceptance b, so |Vs| = given is a quadratic in b;
 * the smaller non-negative root is the smallest bank.
 */
export function shuntCapacitorForLoadVoltage(options: {
  network: TwoPort;
  sendingVoltageKv: number;
  targetReceivingVoltageKv: number;
  load: LoadInput;
  ratedVoltageKv: number;
}): ShuntCapacitorSizing {
  const hint = 'Pass { network, sendingVoltageKv, targetReceivingVoltageKv, load, ratedVoltageKv }.';
  const record = requireObject('options', options, hint);
  const { network, abcd } = readNetwork(record);
  const sendingVoltageKv = requireNumber('sendingVoltageKv', record.sendingVoltageKv, VOLTAGE_RANGE_KV, hint);
  const targetReceivingVoltageKv = requireNumber('targetReceivingVoltageKv', record.targetReceivingVoltageKv, VOLTAGE_RANGE_KV, hint);
  const load = readLoad('load', record.load);
  const ratedVoltageKv = requireNumber('ratedVoltageKv', record.ratedVoltageKv, VOLTAGE_RANGE_KV, hint);
  const receivingV = kvToV(targetReceivingVoltageKv);
  const sendingV = kvToV(sendingVoltageKv);
  const constantPart = abcd.A.mul(receivingV).add(abcd.B.mul(load.conjugate()).div(receivingV));
  const perSusceptance = abcd.B.mul(new Complex(0, receivingV));
  const a = perSusceptance.abs() ** 2;
  const b = 2 * constantPart.mul(perSusceptance.conjugate()).re;
  const c = constantPart.abs() ** 2 - sendingV * sendingV;
  let susceptanceS = 0;
  if (c > 0) {
    const discriminant = b * b - 4 * a * c;
    const smaller = discriminant >= 0 ? (-b - Math.sqrt(discriminant)) / (2 * a) : Number.NaN;
    if (!(smaller >= 0)) {
      throw new SolverDomainError({
        code: 'TARGET_UNREACHABLE',
        quantity: 'targetReceivingVoltageKv',
        value: targetReceivingVoltageKv,
        allowedRange: `voltages a receiving-end capacitor can hold with Vs = ${sendingVoltageKv} kV for this load`,
        hint: 'No capacitor size holds this voltage for this load; the load is beyond what the network can carry at this voltage. Consider series compensation or a lower target.',
      });
    }
    susceptanceS = smaller;
  }
  const ratedV = kvToV(ratedVoltageKv);
  const capacitorMvar = (susceptanceS * ratedV * ratedV) / 1e6;
  const compensatedNetwork =
    susceptanceS > 0
      ? cascade({ elements: [network, shuntCapacitor({ qMvar: capacitorMvar, ratedVoltageKv, label: 'receiving-end shunt capacitor' })] })
      : network;
  const loadRecord = { pMw: load.re / 1e6, qMvar: load.im / 1e6 };
  // Without a bank the receiving voltage settles above the target, so the operating point is solved from the sending voltage.
  const operatingPoint =
    susceptanceS > 0
      ? solveReceivingLoad({ network: compensatedNetwork, receivingVoltageKv: targetReceivingVoltageKv, load: loadRecord })
      : solveFixedSendingVoltage({ network, sendingVoltageKv, load: loadRecord });
  return assertFiniteResult('shuntCapacitorForLoadVoltage', {
    capacitorNeeded: susceptanceS > 0,
    capacitorMvar,
    capacitorSusceptanceS: susceptanceS,
    capacitorOutputMvar: (susceptanceS * receivingV * receivingV) / 1e6,
    receivingVoltageKv: operatingPoint.receivingEnd.voltageKv,
    lineModels: lineModelsOf(network),
    operatingPoint,
    compensatedNetwork,
  });
}

export interface SvcCaseResult {
  label: string;
  pMw: number;
  qMvar: number;
  busVoltageKv: number;
  /** Positive: capacitive (supplies vars); negative: inductive (absorbs vars). */
  svcOutputMvar: number;
  svcSusceptanceS: number;
  mode: 'capacitive' | 'inductive' | 'floating';
}

export interface SvcRange {
  referenceVoltageKv: number;
  slopePercent: number;
  slopeBaseMva: number;
  cases: SvcCaseResult[];
  /** Largest capacitive output over the cases at the voltages reached (0 when none is capacitive). */
  maxCapacitiveOutputMvar: number;
  maxInductiveOutputMvar: number;
  /** Ratings expressed at nominal voltage: the largest susceptance needed times Vnom^2. */
  capacitiveRatingMvarAtNominalVoltage: number;
  inductiveRatingMvarAtNominalVoltage: number;
  lineModels: string[];
}

/**
 * Static var compensator at the receiving bus: the capacitive and inductive range that keeps the bus on the SVC's V-I characteristic
 * V = Vref - slope * I_capacitive (slope in % on slopeBaseMva at nominal voltage) for every load case, with a fixed sending voltage.
 */
export function svcRange(options: {
  network: TwoPort;
  sendingVoltageKv: number;
  referenceVoltageKv: number;
  nominalVoltageKv: number;
  slopePercent: number;
  slopeBaseMva: number;
  loadCases: Array<{ label: string; load: LoadInput }>;
}): SvcRange {
  const hint = 'Pass { network, sendingVoltageKv, referenceVoltageKv, nominalVoltageKv, slopePercent, slopeBaseMva, loadCases: [{ label, load }] }.';
  const record = requireObject('options', options, hint);
  const { network, abcd } = readNetwork(record);
  const sendingV = kvToV(requireNumber('sendingVoltageKv', record.sendingVoltageKv, VOLTAGE_RANGE_KV, hint));
  const referenceVoltageKv = requireNumber('referenceVoltageKv', record.referenceVoltageKv, VOLTAGE_RANGE_KV, hint);
  const nominalVoltageKv = requireNumber('nominalVoltageKv', record.nominalVoltageKv, VOLTAGE_RANGE_KV, hint);
  const slopePercent = requireNumber('slopePercent', record.slopePercent, { min: 0, max: 20, unit: '%' }, 'SVC slope, commonly 1 to 5 % (common practice).');
  const slopeBaseMva = requireNumber('slopeBaseMva', record.slopeBaseMva, { min: 0, max: 1e5, minInclusive: false, unit: 'MVA' }, 'Rating on which the slope is expressed.');
  const caseInputs = requireArray('loadCases', record.loadCases, 1, hint);
  const referenceV = kvToV(referenceVoltageKv);
  const nominalV = kvToV(nominalVoltageKv);
  const slope = slopePercent / 100;

  const cases = caseInputs.map((caseInput, index) => {
    const caseRecord = requireObject(`loadCases[${index}]`, caseInput, hint);
    const label = typeof caseRecord.label === 'string' ? caseRecord.label : `case ${index + 1}`;
    const load = readLoad(`loadCases[${index}].load`, caseRecord.load);
    /** SVC output (VA, + capacitive) that places the bus at busV; null when no output can (bus voltage unreachable). */
    const outputAt = (busV: number): number | null => {
      const fixedPart = abcd.A.mul(busV).add(abcd.B.mul(load.re).div(busV));
      const perNetQ = abcd.B.mul(new Complex(0, -1)).div(busV);
      const a = perNetQ.abs() ** 2;
      const b = 2 * fixedPart.mul(perNetQ.conjugate()).re;
      const c = fixedPart.abs() ** 2 - sendingV * sendingV;
      const discriminant = b * b - 4 * a * c;
      if (discriminant < 0) return null;
      // The larger net reactive load is the normal (upper-voltage) branch.
      const netReactive = (-b + Math.sqrt(discriminant)) / (2 * a);
      return load.im - netReactive;
    };
    const characteristicGap = (busV: number): number => {
      const output = outputAt(busV);
      return output === null ? Number.POSITIVE_INFINITY : busV - referenceV + (slope * nominalV * nominalV * output) / (busV * slopeBaseMva * 1e6);
    };
    let busV = referenceV;
    if (slope > 0) {
      const atReference = characteristicGap(referenceV);
      busV =
        atReference === 0
          ? referenceV
          : atReference > 0
            ? bisect((value) => -characteristicGap(value), 0.5 * referenceV, referenceV)
            : bisect((value) => -characteristicGap(value), referenceV, 1.5 * referenceV);
    }
    const output = outputAt(busV);
    if (output === null || !Number.isFinite(characteristicGap(busV)) || Math.abs(characteristicGap(busV)) > 1e-6 * referenceV) {
      throw new SolverDomainError({
        code: 'NO_OPERATING_POINT',
        quantity: `loadCases[${index}] ('${label}')`,
        value: `P = ${load.re / 1e6} MW, Q = ${load.im / 1e6} Mvar`,
        allowedRange: `loads for which some SVC output holds the bus near ${referenceVoltageKv} kV`,
        hint: 'The bus voltage cannot be held on the SVC characteristic for this load with this sending voltage; the load lies beyond the network transfer capability.',
      });
    }
    const susceptance = output / (busV * busV);
    const mode: SvcCaseResult['mode'] = Math.abs(output) < 1 ? 'floating' : output > 0 ? 'capacitive' : 'inductive';
    return { label, pMw: load.re / 1e6, qMvar: load.im / 1e6, busVoltageKv: busV / 1e3, svcOutputMvar: output / 1e6, svcSusceptanceS: susceptance, mode };
  });
  const maxCapacitiveSusceptance = Math.max(0, ...cases.map((item) => item.svcSusceptanceS));
  const maxInductiveSusceptance = Math.max(0, ...cases.map((item) => -item.svcSusceptanceS));
  return assertFiniteResult('svcRange', {
    referenceVoltageKv,
    slopePercent,
    slopeBaseMva,
    cases,
    maxCapacitiveOutputMvar: Math.max(0, ...cases.map((item) => item.svcOutputMvar)),
    maxInductiveOutputMvar: Math.max(0, ...cases.map((item) => -item.svcOutputMvar)),
    capacitiveRatingMvarAtNominalVoltage: (maxCapacitiveSusceptance * nominalV * nominalV) / 1e6,
    inductiveRatingMvarAtNominalVoltage: (maxInductiveSusceptance * nominalV * nominalV) / 1e6,
    lineModels: lineModelsOf(network),
  });
}

