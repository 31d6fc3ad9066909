// Shunt compensation sizing: reactors for the no-load voltage, capacitors for a heavy-load voltage, the SVC characteristic and its range over load cases.
import { Complex } from './complex.ts';
import {
  SolverDomainError,
  assertFiniteResult,
  forMessage,
  loadForError,
  optionalNumber,
  requireArray,
  requireChoice,
  requireNumber,
  requireObject,
} from './errors.ts';
import { lineShuntSusceptanceS, shuntCapacitor, shuntReactor } from './elements.ts';
import { VOLTAGE_RANGE_KV } from './lineModels.ts';
import {
  deliveredReactiveVa,
  lineModelsOf,
  noseLoadMultiple,
  readLoad,
  readNetwork,
  receivingVoltageRoots,
  solveFixedSendingVoltage,
  solveNoLoad,
  solveReceivingLoad,
  type LoadInput,
  type OperatingPoint,
} from './solutions.ts';
import { voltageProfile } from './profile.ts';
import {
  abcdOf,
  cascade,
  multiplyAbcd,
  readTwoPort,
  shuntAdmittanceAbcd,
  type AbcdMatrix,
  type CascadeTwoPort,
  type SourceEquivalentTwoPort,
  type TwoPort,
} from './twoPort.ts';
import { kvToV, varToMvar, vToKv, wToMw } from './units.ts';

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
  /** Three-phase nameplate rating of each reactor at ratedVoltageKv. */
  reactorMvarEach: number;
  totalReactorMvar: number;
  ratedVoltageKv: number;
  reactorSusceptanceEachS: number;
  /** Per-phase reactance of each reactor, or null when no reactor is needed. */
  reactorReactanceEachOhm: number | null;
  /** Each reactor at its bus: the no-load bus voltage and the Mvar it absorbs there (B V_bus^2). */
  reactors: Array<{ location: 'sending-end' | 'receiving-end'; busVoltageKv: number; mvarAtBusVoltage: number }>;
  /** Reactor susceptance as a share of the line's total charging susceptance. */
  degreeOfShuntCompensation: number;
  lineChargingMvarAtRatedVoltage: number;
  noLoadReceivingVoltageWithoutReactorKv: number;
  receivingVoltageKv: number;
  /** EMF behind sendingSystem (null without one) and the voltage of the sending bus (the line's sending terminal), reactors in. */
  sendingSystemEmfKv: number | null;
  sendingBusVoltageKv: number;
  /** Highest voltage along the line with the reactors in, and where (km from the sending end). */
  maximumVoltage: { voltageKv: number; positionKm: number };
  warnings: string[];
  lineModels: string[];
  compensatedNetwork: CascadeTwoPort;
}

/**
 * Shunt reactor (rated Mvar) that holds the no-load receiving voltage at a target, at the receiving end or equally at both ends.
 * The sending side is either sendingVoltageKv (the EMF behind sendingSystem when one is given, else the sending bus) or
 * sendingBusVoltageKv (the sending bus held, whatever the source). With the bus held, or an ideal source, the sending-end reactor
 * cannot change Vr, so each reactor of a pair equals the single one; with sendingVoltageKv and sendingSystem it acts through the
 * source impedance.
 */
export function shuntReactorForNoLoad(options: {
  line: TwoPort;
  sendingVoltageKv?: number;
  sendingBusVoltageKv?: number;
  targetReceivingVoltageKv: number;
  ratedVoltageKv: number;
  placement?: ReactorPlacement;
  sendingSystem?: SourceEquivalentTwoPort;
}): ShuntReactorSizing {
  const hint =
    "Pass { line, sendingVoltageKv (the EMF when sendingSystem is given) or sendingBusVoltageKv, targetReceivingVoltageKv, ratedVoltageKv (the reactor nameplate voltage, e.g. the highest system voltage), placement?: 'receiving-end' | 'both-ends', sendingSystem? }.";
  const record = requireObject('options', options, hint);
  const line = readTwoPort('line', record.line);
  const busHeld = record.sendingBusVoltageKv !== undefined;
  if (busHeld === (record.sendingVoltageKv !== undefined)) {
    throw new SolverDomainError({
      code: busHeld ? 'inconsistent-quantities' : 'missing-quantity',
      quantity: 'sendingVoltageKv / sendingBusVoltageKv',
      value: busHeld ? 'both given' : null,
      allowedRange: 'exactly one of the two',
      hint,
    });
  }
  const givenSendingKv = busHeld
    ? requireNumber('sendingBusVoltageKv', record.sendingBusVoltageKv, VOLTAGE_RANGE_KV, hint)
    : requireNumber('sendingVoltageKv', record.sendingVoltageKv, VOLTAGE_RANGE_KV, hint);
  const targetReceivingVoltageKv = requireNumber('targetReceivingVoltageKv', record.targetReceivingVoltageKv, VOLTAGE_RANGE_KV, hint);
  const ratedVoltageKv = requireNumber('ratedVoltageKv', record.ratedVoltageKv, VOLTAGE_RANGE_KV, hint);
  const placement =
    record.placement === undefined ? 'receiving-end' : requireChoice('placement', record.placement, ['receiving-end', 'both-ends'] as const, hint);
  const sendingSystem = record.sendingSystem === undefined ? null : readTwoPort('sendingSystem', record.sendingSystem);
  const lineSusceptanceS = lineShuntSusceptanceS(line);
  const ratedVoltageV = kvToV(ratedVoltageKv);
  const reactorCount = placement === 'both-ends' ? 2 : 1;

  const reactor = (susceptanceS: number, label: string) =>
    shuntReactor({ qMvar: varToMvar(susceptanceS * ratedVoltageV * ratedVoltageV), ratedVoltageKv, label });
  /** The network from the sending bus on: [sending reactor?, line, receiving reactor?]. */
  const fromBus = (susceptanceS: number): TwoPort[] => {
    const parts: TwoPort[] = [];
    if (susceptanceS > 0 && placement === 'both-ends') parts.push(reactor(susceptanceS, 'sending-end shunt reactor'));
    parts.push(line);
    if (susceptanceS > 0) parts.push(reactor(susceptanceS, 'receiving-end shunt reactor'));
    return parts;
  };
  const aOf = (parts: TwoPort[]) => (parts.length === 1 ? abcdOf(parts[0] as TwoPort) : abcdOf(cascade({ elements: parts }))).A.abs();
  const receivingVoltageKv = (susceptanceS: number): number => {
    const downstream = fromBus(susceptanceS);
    if (busHeld || sendingSystem === null) return givenSendingKv / aOf(downstream);
    return givenSendingKv / aOf([sendingSystem, ...downstream]);
  };

  const withoutReactorKv = receivingVoltageKv(0);
  let susceptanceS = 0;
  if (withoutReactorKv > targetReceivingVoltageKv) {
    let upper = Math.max(lineSusceptanceS, 1e-6);
    for (let doubling = 0; receivingVoltageKv(upper) > targetReceivingVoltageKv; doubling += 1) {
      if (doubling > 60) {
        throw new SolverDomainError({
          code: 'target-unreachable',
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
  const reactorMvarEach = varToMvar(susceptanceS * ratedVoltageV * ratedVoltageV);
  const downstream = fromBus(susceptanceS);
  const finalReceivingKv = receivingVoltageKv(susceptanceS);
  const sendingBusVoltageKv = finalReceivingKv * aOf(downstream);
  const sendingSystemEmfKv = sendingSystem === null ? null : busHeld ? finalReceivingKv * aOf([sendingSystem, ...downstream]) : givenSendingKv;
  const compensatedNetwork = cascade({
    elements: sendingSystem === null ? downstream : [sendingSystem, ...downstream],
    label: `${line.label} with ${placement} shunt reactor${reactorCount > 1 ? 's' : ''}`,
  });
  const noLoad = solveNoLoad({ network: compensatedNetwork, sendingVoltageKv: sendingSystemEmfKv ?? sendingBusVoltageKv });
  const profile = voltageProfile({ network: compensatedNetwork, operatingPoint: noLoad, pointCount: 401 });
  const degreeOfShuntCompensation = lineSusceptanceS > 0 ? (susceptanceS * (susceptanceS > 0 ? reactorCount : 0)) / lineSusceptanceS : 0;
  const atBus = (busVoltageKv: number) => varToMvar(susceptanceS * kvToV(busVoltageKv) ** 2);
  const reactors =
    susceptanceS > 0
      ? [
          ...(placement === 'both-ends'
            ? [{ location: 'sending-end' as const, busVoltageKv: sendingBusVoltageKv, mvarAtBusVoltage: atBus(sendingBusVoltageKv) }]
            : []),
          { location: 'receiving-end' as const, busVoltageKv: finalReceivingKv, mvarAtBusVoltage: atBus(finalReceivingKv) },
        ]
      : [];
  const warnings: string[] = [];
  if (degreeOfShuntCompensation > 1) {
    warnings.push(
      `The reactors (${(degreeOfShuntCompensation * 100).toFixed(1)} % of the line charging susceptance) exceed 100 % of the line charging: ${
        placement === 'both-ends' && (busHeld || sendingSystem === null)
          ? 'with the sending bus held the sending-end reactor does not lower the receiving voltage, so a pair doubles the reactive absorption for nothing; place one reactor at the receiving end or give the source equivalent'
          : 'the line would absorb reactive power at no load; check the target and the placement'
      }.`,
    );
  }
  return assertFiniteResult('shuntReactorForNoLoad', {
    placement,
    reactorNeeded: susceptanceS > 0,
    reactorCount: susceptanceS > 0 ? reactorCount : 0,
    reactorMvarEach,
    totalReactorMvar: susceptanceS > 0 ? reactorMvarEach * reactorCount : 0,
    ratedVoltageKv,
    reactorSusceptanceEachS: susceptanceS,
    reactorReactanceEachOhm: susceptanceS > 0 ? 1 / susceptanceS : null,
    reactors,
    degreeOfShuntCompensation,
    lineChargingMvarAtRatedVoltage: varToMvar(lineSusceptanceS * ratedVoltageV * ratedVoltageV),
    noLoadReceivingVoltageWithoutReactorKv: withoutReactorKv,
    receivingVoltageKv: finalReceivingKv,
    sendingSystemEmfKv,
    sendingBusVoltageKv,
    maximumVoltage: { voltageKv: profile.maximum.voltageKv, positionKm: profile.maximum.positionKm },
    warnings,
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
  /** Nose of the P-V curve at the load's power factor with the bank in (a constant susceptance), and the margin to it. */
  noseMw: number;
  noseMarginPercent: number;
  minimumNoseMarginPercent: number;
  warnings: string[];
  lineModels: string[];
  operatingPoint: OperatingPoint;
  compensatedNetwork: TwoPort;
}

/**
 * Receiving-end shunt capacitor that holds the receiving voltage at a target for a heavy load with a fixed sending voltage.
 * With Vr fixed (reference), Vs = A Vr + B (P - j(Q - b Vr^2)) / Vr is affine in the susceptance b, so |Vs| = given is a quadratic in b.
 * A root is kept only if the target is the upper-branch (normal) solution of the network with that bank in, below parallel resonance
 * of the bank with the network's Thevenin reactance; the smallest such bank wins.
 */
export function shuntCapacitorForLoadVoltage(options: {
  network: TwoPort;
  sendingVoltageKv: number;
  targetReceivingVoltageKv: number;
  load: LoadInput;
  ratedVoltageKv: number;
  minimumNoseMarginPercent?: number;
}): ShuntCapacitorSizing {
  const hint = 'Pass { network, sendingVoltageKv, targetReceivingVoltageKv, load, ratedVoltageKv, minimumNoseMarginPercent? }.';
  const record = requireObject('options', options, hint);
  const { network, abcd } = readNetwork(record);
  const sendingVoltageKv = requireNumber('sendingVoltageKv', record.sendingVoltageKv, VOLTAGE_RANGE_KV, hint);
  const targetReceivingVoltageKv = requireNumber('targetReceivingVoltageKv', record.targetReceivingVoltageKv, VOLTAGE_RANGE_KV, hint);
  const load = readLoad('load', record.load);
  const ratedVoltageKv = requireNumber('ratedVoltageKv', record.ratedVoltageKv, VOLTAGE_RANGE_KV, hint);
  const minimumNoseMarginPercent = optionalNumber(
    'minimumNoseMarginPercent',
    record.minimumNoseMarginPercent,
    10,
    { min: 0, max: 90, unit: '%' },
    'Smallest acceptable margin to the nose of the P-V curve; 10 % is common practice in planning.',
  );
  const receivingV = kvToV(targetReceivingVoltageKv);
  const sendingV = kvToV(sendingVoltageKv);
  const constantPart = abcd.A.mul(receivingV).add(abcd.B.mul(load.conjugate()).div(receivingV));
  const perSusceptance = abcd.B.mul(new Complex(0, receivingV));
  const a = perSusceptance.abs() ** 2;
  const b = 2 * constantPart.mul(perSusceptance.conjugate()).re;
  const c = constantPart.abs() ** 2 - sendingV * sendingV;
  const withBank = (susceptanceS: number): AbcdMatrix =>
    susceptanceS > 0 ? multiplyAbcd(abcd, shuntAdmittanceAbcd(new Complex(0, susceptanceS))) : abcd;
  // Seen from the bus the network is a Thevenin source behind B / A; a bank at or beyond parallel resonance with it is no design.
  const theveninReactanceOhm = abcd.B.div(abcd.A).im;
  const onUpperBranch = (susceptanceS: number): boolean => {
    if (!(susceptanceS * theveninReactanceOhm < 1)) return false;
    const roots = receivingVoltageRoots(withBank(susceptanceS), sendingV, load);
    return roots !== null && Math.abs(roots.upper - receivingV) <= 1e-6 * receivingV;
  };
  let susceptanceS = 0;
  if (c > 0) {
    const discriminant = b * b - 4 * a * c;
    const roots =
      discriminant >= 0 ? [(-b - Math.sqrt(discriminant)) / (2 * a), (-b + Math.sqrt(discriminant)) / (2 * a)].filter((root) => root >= 0) : [];
    const upper = roots.find(onUpperBranch);
    if (upper === undefined) {
      throw new SolverDomainError({
        code: 'target-unreachable',
        quantity: 'targetReceivingVoltageKv',
        value: targetReceivingVoltageKv,
        allowedRange: `voltages a receiving-end capacitor can hold on the upper branch of the P-V curve with Vs = ${sendingVoltageKv} kV for this load`,
        hint:
          roots.length > 0
            ? 'The banks that put the bus at this voltage put it on the lower branch of the P-V curve (below the nose): solved from the source the bus would settle elsewhere or collapse. Raise the target above the nose voltage, or add series compensation.'
            : 'No capacitor size holds this voltage for this load; the load is beyond what the network can carry at this voltage. Consider series compensation or a lower target.',
      });
    }
    susceptanceS = upper;
  }
  const ratedV = kvToV(ratedVoltageKv);
  const capacitorMvar = varToMvar(susceptanceS * ratedV * ratedV);
  const compensatedNetwork =
    susceptanceS > 0
      ? cascade({ elements: [network, shuntCapacitor({ qMvar: capacitorMvar, ratedVoltageKv, label: 'receiving-end shunt capacitor' })] })
      : network;
  const loadRecord = { pMw: wToMw(load.re), qMvar: varToMvar(load.im) };
  // Without a bank the receiving voltage settles above the target, so the operating point is solved from the sending voltage.
  const operatingPoint =
    susceptanceS > 0
      ? solveReceivingLoad({ network: compensatedNetwork, receivingVoltageKv: targetReceivingVoltageKv, load: loadRecord })
      : solveFixedSendingVoltage({ network, sendingVoltageKv, load: loadRecord });
  const noseMw = wToMw(noseLoadMultiple(withBank(susceptanceS), sendingV, load) * load.re);
  const noseMarginPercent = ((noseMw - wToMw(load.re)) / noseMw) * 100;
  const warnings =
    noseMarginPercent < minimumNoseMarginPercent
      ? [
          `With the bank in, the load of ${forMessage(wToMw(load.re))} MW is ${noseMarginPercent.toFixed(1)} % below the nose of the P-V curve (${forMessage(noseMw)} MW at this power factor), below the ${minimumNoseMarginPercent} % margin: a small load increase or a loss of voltage support would collapse the bus voltage.`,
        ]
      : [];
  return assertFiniteResult('shuntCapacitorForLoadVoltage', {
    capacitorNeeded: susceptanceS > 0,
    capacitorMvar,
    capacitorSusceptanceS: susceptanceS,
    capacitorOutputMvar: varToMvar(susceptanceS * receivingV * receivingV),
    receivingVoltageKv: operatingPoint.receivingEnd.voltageKv,
    noseMw,
    noseMarginPercent,
    minimumNoseMarginPercent,
    warnings,
    lineModels: lineModelsOf(network),
    operatingPoint,
    compensatedNetwork,
  });
}

export interface SvcCharacteristicOptions {
  /** Slope of the control range in % on the SVC base (reactance Xs = slope/100 pu). */
  slopePercent: number;
  /** Voltage at zero SVC current. */
  referenceVoltagePu: number;
  /** Largest capacitive susceptance, on the SVC base. */
  bMaxCapacitivePu: number;
  /** Largest inductive susceptance, on the SVC base. */
  bMaxInductivePu: number;
}

export interface SvcCharacteristicCorners {
  /** Where the control slope meets the capacitive limit line I = −B_C·V. */
  capacitiveCorner: { currentPu: number; voltagePu: number };
  /** Where the control slope meets the inductive limit line I = B_L·V. */
  inductiveCorner: { currentPu: number; voltagePu: number };
}

/**
 * Corners of the SVC V-I characteristic. Current is positive when inductive (absorbing). The control
 * range is V = Vref + Xs·I; the limits are the fixed-susceptance lines through the origin.
 */
export function svcCharacteristicCorners(options: SvcCharacteristicOptions): SvcCharacteristicCorners {
  const hint = 'Pass { slopePercent, referenceVoltagePu, bMaxCapacitivePu, bMaxInductivePu }, all on the SVC base.';
  const record = requireObject('options', options, hint);
  const slopePercent = requireNumber(
    'slopePercent',
    record.slopePercent,
    { min: 0, max: 100, maxInclusive: false, unit: '%' },
    'Give the slope in percent on the SVC base, e.g. 3 for 3 % (typically 1 to 10 %, common practice).',
  );
  const positivePu = { min: 0, minInclusive: false, unit: 'pu' };
  const referenceVoltagePu = requireNumber(
    'referenceVoltagePu',
    record.referenceVoltagePu,
    positivePu,
    'Give the magnitude as a positive number, e.g. 1.0.',
  );
  const capacitive = requireNumber(
    'bMaxCapacitivePu',
    record.bMaxCapacitivePu,
    positivePu,
    'Give the magnitude as a positive number, e.g. 1.0 on the SVC base.',
  );
  const inductive = requireNumber(
    'bMaxInductivePu',
    record.bMaxInductivePu,
    positivePu,
    'Give the magnitude as a positive number, e.g. 0.5 on the SVC base.',
  );
  const slopeReactancePu = slopePercent / 100;
  if (slopeReactancePu * inductive >= 1) {
    throw new SolverDomainError({
      code: 'inconsistent-quantities',
      quantity: 'slopePercent × bMaxInductivePu / 100',
      value: slopeReactancePu * inductive,
      allowedRange: '[0, 1), otherwise the slope never meets the inductive limit',
      hint: 'Check that slope and susceptances are on the same (SVC) base.',
    });
  }
  const capacitiveVoltage = referenceVoltagePu / (1 + slopeReactancePu * capacitive);
  const inductiveVoltage = referenceVoltagePu / (1 - slopeReactancePu * inductive);
  return assertFiniteResult('svcCharacteristicCorners', {
    capacitiveCorner: { currentPu: -capacitive * capacitiveVoltage, voltagePu: capacitiveVoltage },
    inductiveCorner: { currentPu: inductive * inductiveVoltage, voltagePu: inductiveVoltage },
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
  const slopePercent = requireNumber(
    'slopePercent',
    record.slopePercent,
    { min: 0, max: 20, unit: '%' },
    'SVC slope, commonly 1 to 5 % (common practice).',
  );
  const slopeBaseMva = requireNumber(
    'slopeBaseMva',
    record.slopeBaseMva,
    { min: 0, max: 1e5, minInclusive: false, unit: 'MVA' },
    'Rating on which the slope is expressed.',
  );
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
      const delivered = deliveredReactiveVa(abcd, sendingV, busV, load.re);
      return delivered === null ? null : load.im - delivered;
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
        code: 'no-operating-point',
        quantity: `loadCases[${index}] ('${label}')`,
        ...loadForError(wToMw(load.re), varToMvar(load.im)),
        allowedRange: `loads for which some SVC output holds the bus near ${forMessage(referenceVoltageKv)} kV`,
        hint: 'The bus voltage cannot be held on the SVC characteristic for this load with this sending voltage; the load lies beyond the network transfer capability.',
      });
    }
    const susceptance = output / (busV * busV);
    const mode: SvcCaseResult['mode'] = Math.abs(output) < 1 ? 'floating' : output > 0 ? 'capacitive' : 'inductive';
    return {
      label,
      pMw: wToMw(load.re),
      qMvar: varToMvar(load.im),
      busVoltageKv: vToKv(busV),
      svcOutputMvar: varToMvar(output),
      svcSusceptanceS: susceptance,
      mode,
    };
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
    capacitiveRatingMvarAtNominalVoltage: varToMvar(maxCapacitiveSusceptance * nominalV * nominalV),
    inductiveRatingMvarAtNominalVoltage: varToMvar(maxInductiveSusceptance * nominalV * nominalV),
    lineModels: lineModelsOf(network),
  });
}
