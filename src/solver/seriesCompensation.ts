// Series capacitor bank design: degree of compensation for a target transfer within an angle limit, bank ratings and duty, MOV level.
import { type Complex, fromPlain } from './complex.ts';
import {
  assertFiniteResult,
  forMessage,
  SolverDomainError,
  optionalNumber,
  requireArray,
  requireChoice,
  requireNumber,
  requireObject,
} from './errors.ts';
import { seriesCapacitor } from './elements.ts';
import { VOLTAGE_RANGE_KV, resizedSection } from './lineModels.ts';
import { angleForTransfer, goldenSectionMinimum, receivingPowerAtAngleMw, steadyStateLimitAngleRad } from './curves.ts';
import { solveTwoEndVoltages } from './solutions.ts';
import { abcdOf, cascade, readTwoPort, throughTwoPort, type CascadeTwoPort, type LineSectionTwoPort, type TwoPort } from './twoPort.ts';
import { degToRad, lineKvFromPhaseVolts, varToMvar } from './units.ts';

export type CapacitorLocation = 'mid-line' | 'sending-end' | 'receiving-end';

export interface SeriesCompensationDesign {
  location: CapacitorLocation;
  compensationNeeded: boolean;
  degreeOfCompensation: number;
  /** Per-phase capacitive reactance of the bank. */
  reactanceOhm: number;
  lineSeriesReactanceOhm: number;
  transferAtAngleLimitMw: number;
  uncompensatedTransferAtAngleLimitMw: number;
  angleLimitDeg: number;
  /** Three-phase reactive rating at rated current, 3 I^2 Xc. */
  threePhaseMvarAtRatedCurrent: number;
  capacitorVoltageAtRatedCurrentKv: number;
  capacitorVoltageAtEmergencyCurrentKv: number;
  /** Peak voltage at which the metal-oxide varistor limits the capacitor voltage: multiple * sqrt(2) * rated capacitor voltage. */
  protectiveLevelPeakKv: number;
  protectiveLevelPu: number;
  emergencyPeakKv: number;
  throughFaultPeakKv: number;
  /**
   * Whether the varistor conducts on the given through fault. Conduction on an external fault is the varistor's normal duty; whether
   * the bypass switch or gap must also close depends on the energy the varistor absorbs, which this design does not compute.
   */
  throughFault: { currentA: number; capacitorPeakKv: number; varistorConducts: boolean; note: string };
  /** The target delivered at the smallest degree: angle, bank current and voltages at the bank terminals and mid-line. */
  designPoint: BankOperatingPoint;
  cases: Array<BankOperatingPoint & { label: string }>;
  warnings: string[];
  compensatedNetwork: CascadeTwoPort;
}

export interface BankOperatingPoint {
  transferMw: number;
  angleDeg: number;
  bankCurrentA: number;
  /** Line-to-line voltage across the bank (|I| Xc, as a line-to-line figure sqrt(3) I Xc). */
  capacitorVoltageKv: number;
  bankTerminalVoltagesKv: { sendingSide: number; receivingSide: number };
  midLineVoltageKv: number;
}

function compensatedNetworkFor(line: LineSectionTwoPort, location: CapacitorLocation, degree: number): CascadeTwoPort {
  const capacitor = seriesCapacitor({
    degreeOfCompensation: degree,
    compensatedLine: line,
    label: `series capacitor ${(degree * 100).toFixed(1)} %`,
  });
  if (location === 'sending-end') return cascade({ elements: [capacitor, line] });
  if (location === 'receiving-end') return cascade({ elements: [line, capacitor] });
  const half = line.lengthKm / 2;
  return cascade({
    elements: [resizedSection(line, half, `${line.label} (first half)`), capacitor, resizedSection(line, half, `${line.label} (second half)`)],
  });
}

function transferAtAngleMw(network: TwoPort, sendingVoltageKv: number, receivingVoltageKv: number, angleLimitRad: number): number {
  const abcd = abcdOf(network);
  return receivingPowerAtAngleMw(abcd, sendingVoltageKv, receivingVoltageKv, Math.min(angleLimitRad, steadyStateLimitAngleRad(abcd)));
}

/** Largest transfer over a scan, refined by golden-section search around the best sample. */
function largestTransfer(scan: Array<{ degree: number; transferMw: number }>, transferWith: (degree: number) => number, stepDegree: number) {
  const best = scan.reduce((top, sample) => (sample.transferMw > top.transferMw ? sample : top));
  const first = scan[0]?.degree ?? 0;
  const last = scan[scan.length - 1]?.degree ?? best.degree;
  const degree = goldenSectionMinimum(
    (candidate) => -transferWith(candidate),
    Math.max(first, best.degree - stepDegree),
    Math.min(last, best.degree + stepDegree),
  );
  const refined = { degree, transferMw: transferWith(degree) };
  return refined.transferMw > best.transferMw ? refined : best;
}

/** Angle, bank current and voltages at the bank and mid-line when the compensated corridor delivers transferMw. */
function bankOperatingPoint(
  network: CascadeTwoPort,
  line: LineSectionTwoPort,
  location: CapacitorLocation,
  hasBank: boolean,
  sendingVoltageKv: number,
  receivingVoltageKv: number,
  transferMw: number,
): BankOperatingPoint {
  const { angleDeg } = angleForTransfer({ network, sendingVoltageKv, receivingVoltageKv, receivingPMw: transferMw });
  const point = solveTwoEndVoltages({ network, sendingVoltageKv, receivingVoltageKv, angleDeg });
  let voltage = fromPlain(point.sendingEnd.phaseVoltageV);
  let current = fromPlain(point.sendingEnd.lineCurrentA);
  const atElement: Array<{ kind: string; before: { voltage: Complex; current: Complex }; after: { voltage: Complex } }> = [];
  for (const element of network.elements) {
    const next = throughTwoPort(abcdOf(element), voltage, current);
    atElement.push({ kind: element.kind, before: { voltage, current }, after: { voltage: next.voltage } });
    voltage = next.voltage;
    current = next.current;
  }
  const bank = atElement.find((item) => item.kind === 'series-capacitor');
  const halfLine = resizedSection(line, line.lengthKm / 2, 'half');
  // Mid-line: half a line from the line's own sending terminal (the bank's sending side when the bank sits at the sending end).
  const lineEntry = atElement.find((item) => item.kind === 'line-section') as (typeof atElement)[number];
  const midAbcd = abcdOf(halfLine);
  const midVoltage =
    location === 'mid-line' && bank ? bank.before.voltage : midAbcd.D.mul(lineEntry.before.voltage).sub(midAbcd.B.mul(lineEntry.before.current));
  const bankCurrentA = hasBank && bank ? bank.before.current.abs() : 0;
  const kv = (phase: Complex) => lineKvFromPhaseVolts(phase.abs());
  return {
    transferMw,
    angleDeg,
    bankCurrentA,
    capacitorVoltageKv: hasBank && bank ? kv(bank.after.voltage.sub(bank.before.voltage)) : 0,
    bankTerminalVoltagesKv:
      hasBank && bank ? { sendingSide: kv(bank.before.voltage), receivingSide: kv(bank.after.voltage) } : { sendingSide: 0, receivingSide: 0 },
    midLineVoltageKv: kv(midVoltage),
  };
}

/**
 * Smallest degree of series compensation that reaches a target receiving-end transfer without exceeding an angle limit,
 * then the bank's ohms, Mvar, capacitor voltages, MOV protective level (2.0 to 2.5 pu of rated capacitor voltage is common practice)
 * and whether a bypass device is needed for through faults.
 */
export function seriesCompensationDesign(options: {
  line: LineSectionTwoPort;
  location?: CapacitorLocation;
  sendingVoltageKv: number;
  receivingVoltageKv: number;
  targetTransferMw: number;
  angleLimitDeg: number;
  ratedCurrentA: number;
  emergencyCurrentA: number;
  throughFaultCurrentA: number;
  protectiveLevelPu?: number;
  maxDegreeOfCompensation?: number;
  cases?: Array<{ label: string; transferMw: number; sendingVoltageKv?: number; receivingVoltageKv?: number }>;
}): SeriesCompensationDesign {
  const hint =
    'Pass { line (from lineModel), sendingVoltageKv, receivingVoltageKv, targetTransferMw, angleLimitDeg, ratedCurrentA, emergencyCurrentA, throughFaultCurrentA, location?, protectiveLevelPu?, maxDegreeOfCompensation?, cases? }.';
  const record = requireObject('options', options, hint);
  const line = readTwoPort('line', record.line);
  if (line.kind !== 'line-section') {
    throw new SolverDomainError({
      code: 'out-of-range',
      quantity: 'line.kind',
      value: line.kind,
      allowedRange: "'line-section'",
      hint: 'Give the uncompensated line as one section from lineModel so it can be split around the capacitor.',
    });
  }
  const location =
    record.location === undefined
      ? 'mid-line'
      : requireChoice('location', record.location, ['mid-line', 'sending-end', 'receiving-end'] as const, hint);
  const sendingVoltageKv = requireNumber('sendingVoltageKv', record.sendingVoltageKv, VOLTAGE_RANGE_KV, hint);
  const receivingVoltageKv = requireNumber('receivingVoltageKv', record.receivingVoltageKv, VOLTAGE_RANGE_KV, hint);
  const targetTransferMw = requireNumber('targetTransferMw', record.targetTransferMw, { min: 0, max: 1e5, minInclusive: false, unit: 'MW' }, hint);
  const angleLimitDeg = requireNumber(
    'angleLimitDeg',
    record.angleLimitDeg,
    { min: 0, max: 90, minInclusive: false, unit: 'deg' },
    'Largest angle across the line allowed in steady state, often 30 to 45 deg (common practice).',
  );
  const ratedCurrentA = requireNumber('ratedCurrentA', record.ratedCurrentA, { min: 0, max: 1e5, minInclusive: false, unit: 'A' }, hint);
  const emergencyCurrentA = requireNumber(
    'emergencyCurrentA',
    record.emergencyCurrentA,
    { min: ratedCurrentA, max: 1e5, unit: 'A' },
    'Emergency (short-time overload) current, at least the rated current.',
  );
  const throughFaultCurrentA = requireNumber(
    'throughFaultCurrentA',
    record.throughFaultCurrentA,
    { min: 0, max: 1e6, minInclusive: false, unit: 'A' },
    'Largest fault current through the bank for an external fault.',
  );
  const protectiveLevelPu = optionalNumber(
    'protectiveLevelPu',
    record.protectiveLevelPu,
    2.3,
    { min: 1, max: 4 },
    'MOV protective level as a multiple of the rated capacitor voltage; 2.0 to 2.5 pu is common practice.',
  );
  const maxDegree = optionalNumber(
    'maxDegreeOfCompensation',
    record.maxDegreeOfCompensation,
    0.8,
    { min: 0, max: 1, minInclusive: false, maxInclusive: false },
    'Largest degree considered; banks above about 0.7 to 0.8 are rare (common practice).',
  );
  const angleLimitRad = degToRad(angleLimitDeg);
  const lineReactanceOhm = line.perKm.seriesReactanceOhmPerKm * line.lengthKm;

  const caseInputs = record.cases === undefined ? [] : requireArray('cases', record.cases, 0, hint);
  const uncompensatedMw = transferAtAngleMw(line, sendingVoltageKv, receivingVoltageKv, angleLimitRad);
  const transferWith = (degree: number) =>
    transferAtAngleMw(compensatedNetworkFor(line, location, degree), sendingVoltageKv, receivingVoltageKv, angleLimitRad);
  let degree = 0;
  if (uncompensatedMw < targetTransferMw) {
    // On a lossy line the transfer at a fixed angle peaks and then falls as the net reactance goes to zero (arg B falls toward the
    // resistance angle), so the whole range is scanned for the first degree reaching the target, then that step is bisected.
    const steps = 200;
    const scan = Array.from({ length: steps + 1 }, (_, index) => {
      const candidate = (maxDegree * index) / steps;
      return { degree: candidate, transferMw: index === 0 ? uncompensatedMw : transferWith(candidate) };
    });
    const firstReaching = scan.findIndex((sample) => sample.transferMw >= targetTransferMw);
    if (firstReaching < 0) {
      const best = largestTransfer(scan, transferWith, maxDegree / steps);
      throw new SolverDomainError({
        code: 'transfer-limit-exceeded',
        quantity: 'targetTransferMw',
        value: targetTransferMw,
        allowedRange: `(0, ${forMessage(best.transferMw)}] MW at an angle of at most ${angleLimitDeg} deg with at most ${maxDegree * 100} % compensation (the largest transfer, at ${(best.degree * 100).toFixed(1)} %)`,
        hint: 'The target lies beyond the transfer limit for every degree of compensation allowed; relax the angle limit, raise the voltage or add a circuit.',
      });
    }
    let lower = (scan[firstReaching - 1] as { degree: number }).degree;
    let upper = (scan[firstReaching] as { degree: number }).degree;
    for (let iteration = 0; iteration < 100 && upper - lower > 1e-12; iteration += 1) {
      const middle = (lower + upper) / 2;
      if (transferWith(middle) < targetTransferMw) lower = middle;
      else upper = middle;
    }
    degree = upper;
  }
  const reactanceOhm = degree * lineReactanceOhm;
  const ratedCapacitorKv = (ratedCurrentA * reactanceOhm) / 1e3;
  const emergencyCapacitorKv = (emergencyCurrentA * reactanceOhm) / 1e3;
  const protectiveLevelPeakKv = protectiveLevelPu * Math.SQRT2 * ratedCapacitorKv;
  const emergencyPeakKv = Math.SQRT2 * emergencyCapacitorKv;
  const throughFaultPeakKv = (Math.SQRT2 * throughFaultCurrentA * reactanceOhm) / 1e3;
  const compensatedNetwork = degree > 0 ? compensatedNetworkFor(line, location, degree) : cascade({ elements: [line] });
  const bankAt = (transferMw: number, atSendingKv: number, atReceivingKv: number) =>
    bankOperatingPoint(compensatedNetwork, line, location, degree > 0, atSendingKv, atReceivingKv, transferMw);
  const designPoint = bankAt(targetTransferMw, sendingVoltageKv, receivingVoltageKv);
  const cases = caseInputs.map((caseInput, index) => {
    const caseRecord = requireObject(`cases[${index}]`, caseInput, hint);
    const label = typeof caseRecord.label === 'string' && caseRecord.label !== '' ? caseRecord.label : `case ${index + 1}`;
    const caseHint = 'Each case is { label, transferMw, sendingVoltageKv?, receivingVoltageKv? } (voltages default to the design voltages).';
    const transferMw = requireNumber(`cases[${index}].transferMw`, caseRecord.transferMw, { min: -1e5, max: 1e5, unit: 'MW' }, caseHint);
    const caseSendingKv = optionalNumber(
      `cases[${index}].sendingVoltageKv`,
      caseRecord.sendingVoltageKv,
      sendingVoltageKv,
      VOLTAGE_RANGE_KV,
      caseHint,
    );
    const caseReceivingKv = optionalNumber(
      `cases[${index}].receivingVoltageKv`,
      caseRecord.receivingVoltageKv,
      receivingVoltageKv,
      VOLTAGE_RANGE_KV,
      caseHint,
    );
    return { label, ...bankAt(transferMw, caseSendingKv, caseReceivingKv) };
  });
  const warnings: string[] = [];
  if (degree > 0 && emergencyPeakKv >= protectiveLevelPeakKv) {
    warnings.push(
      `Emergency current ${forMessage(emergencyCurrentA)} A gives a capacitor peak of ${emergencyPeakKv.toFixed(1)} kV, at or above the protective level ${protectiveLevelPeakKv.toFixed(1)} kV: the varistor would conduct in emergency loading; raise protectiveLevelPu.`,
    );
  }
  if (degree > 0) {
    for (const [where, point] of [
      ['at the design point', designPoint],
      ...cases.map((item) => [`in case '${item.label}'`, item] as const),
    ] as const) {
      if (point.bankCurrentA > emergencyCurrentA) {
        warnings.push(
          `The bank carries ${point.bankCurrentA.toFixed(0)} A ${where}, above its emergency current of ${forMessage(emergencyCurrentA)} A: the varistor would conduct in service (capacitor peak ${((Math.SQRT2 * point.bankCurrentA * reactanceOhm) / 1e3).toFixed(1)} kV); raise the bank's ratings.`,
        );
      } else if (point.bankCurrentA > ratedCurrentA) {
        warnings.push(
          `The bank carries ${point.bankCurrentA.toFixed(0)} A ${where}, above its rated current of ${forMessage(ratedCurrentA)} A: rate the bank for this current or limit the transfer.`,
        );
      }
    }
  }
  const varistorConducts = degree > 0 && throughFaultPeakKv > protectiveLevelPeakKv;
  const throughFault = {
    currentA: throughFaultCurrentA,
    capacitorPeakKv: throughFaultPeakKv,
    varistorConducts,
    note:
      degree === 0
        ? 'No series capacitor is needed for this target.'
        : varistorConducts
          ? `A through fault of ${forMessage(throughFaultCurrentA)} A would drive the capacitor to ${throughFaultPeakKv.toFixed(1)} kV peak; the varistor conducts and clamps it at the protective level ${protectiveLevelPeakKv.toFixed(1)} kV. This is its normal duty on external faults. Whether the bypass switch or gap must also close depends on the energy the varistor absorbs during the fault, which this design does not compute.`
          : `A through fault of ${forMessage(throughFaultCurrentA)} A gives ${throughFaultPeakKv.toFixed(1)} kV peak, below the protective level ${protectiveLevelPeakKv.toFixed(1)} kV: the varistor does not conduct for external faults.`,
  };
  return assertFiniteResult('seriesCompensationDesign', {
    location,
    compensationNeeded: degree > 0,
    degreeOfCompensation: degree,
    reactanceOhm,
    lineSeriesReactanceOhm: lineReactanceOhm,
    transferAtAngleLimitMw: degree > 0 ? transferWith(degree) : uncompensatedMw,
    uncompensatedTransferAtAngleLimitMw: uncompensatedMw,
    angleLimitDeg,
    threePhaseMvarAtRatedCurrent: varToMvar(3 * ratedCurrentA * ratedCurrentA * reactanceOhm),
    capacitorVoltageAtRatedCurrentKv: ratedCapacitorKv,
    capacitorVoltageAtEmergencyCurrentKv: emergencyCapacitorKv,
    protectiveLevelPeakKv,
    protectiveLevelPu,
    emergencyPeakKv,
    throughFaultPeakKv,
    throughFault,
    designPoint,
    cases,
    warnings,
    compensatedNetwork,
  });
}
