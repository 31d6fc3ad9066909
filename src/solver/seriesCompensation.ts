// Series capacitor bank design: degree of compensation for a target transfer within an angle limit, bank ratings, MOV level, bypass need.
import { assertFiniteResult, forMessage, SolverDomainError, optionalNumber, requireChoice, requireNumber, requireObject } from './errors.ts';
import { seriesCapacitor } from './elements.ts';
import { VOLTAGE_RANGE_KV, resizedSection } from './lineModels.ts';
import { receivingPowerAtAngleMw, steadyStateLimitAngleRad } from './curves.ts';
import { abcdOf, cascade, readTwoPort, type CascadeTwoPort, type LineSectionTwoPort, type TwoPort } from './twoPort.ts';
import { degToRad } from './units.ts';

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
  bypass: { needed: boolean; reason: string };
  warnings: string[];
  compensatedNetwork: CascadeTwoPort;
}

function compensatedNetworkFor(line: LineSectionTwoPort, location: CapacitorLocation, degree: number): CascadeTwoPort {
  const capacitor = seriesCapacitor({ degreeOfCompensation: degree, compensatedLine: line, label: `series capacitor ${(degree * 100).toFixed(1)} %` });
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
}): SeriesCompensationDesign {
  const hint =
    'Pass { line (from lineModel), sendingVoltageKv, receivingVoltageKv, targetTransferMw, angleLimitDeg, ratedCurrentA, emergencyCurrentA, throughFaultCurrentA, location?, protectiveLevelPu?, maxDegreeOfCompensation? }.';
  const record = requireObject('options', options, hint);
  const line = readTwoPort('line', record.line);
  if (line.kind !== 'line-section') {
    throw new SolverDomainError({
      code: 'OUT_OF_RANGE',
      quantity: 'line.kind',
      value: line.kind,
      allowedRange: "'line-section'",
      hint: 'Give the uncompensated line as one section from lineModel so it can be split around the capacitor.',
    });
  }
  const location = record.location === undefined ? 'mid-line' : requireChoice('location', record.location, ['mid-line', 'sending-end', 'receiving-end'] as const, hint);
  const sendingVoltageKv = requireNumber('sendingVoltageKv', record.sendingVoltageKv, VOLTAGE_RANGE_KV, hint);
  const receivingVoltageKv = requireNumber('receivingVoltageKv', record.receivingVoltageKv, VOLTAGE_RANGE_KV, hint);
  const targetTransferMw = requireNumber('targetTransferMw', record.targetTransferMw, { min: 0, max: 1e5, minInclusive: false, unit: 'MW' }, hint);
  const angleLimitDeg = requireNumber('angleLimitDeg', record.angleLimitDeg, { min: 0, max: 90, minInclusive: false, unit: 'deg' }, 'Largest angle across the line allowed in steady state, often 30 to 45 deg (common practice).');
  const ratedCurrentA = requireNumber('ratedCurrentA', record.ratedCurrentA, { min: 0, max: 1e5, minInclusive: false, unit: 'A' }, hint);
  const emergencyCurrentA = requireNumber('emergencyCurrentA', record.emergencyCurrentA, { min: ratedCurrentA, max: 1e5, unit: 'A' }, 'Emergency (short-time overload) current, at least the rated current.');
  const throughFaultCurrentA = requireNumber('throughFaultCurrentA', record.throughFaultCurrentA, { min: 0, max: 1e6, minInclusive: false, unit: 'A' }, 'Largest fault current through the bank for an external fault.');
  const protectiveLevelPu = optionalNumber('protectiveLevelPu', record.protectiveLevelPu, 2.3, { min: 1, max: 4 }, 'MOV protective level as a multiple of the rated capacitor voltage; 2.0 to 2.5 pu is common practice.');
  const maxDegree = optionalNumber('maxDegreeOfCompensation', record.maxDegreeOfCompensation, 0.8, { min: 0, max: 1, minInclusive: false, maxInclusive: false }, 'Largest degree considered; banks above about 0.7 to 0.8 are rare (common practice).');
  const angleLimitRad = degToRad(angleLimitDeg);
  const lineReactanceOhm = line.perKm.seriesReactanceOhmPerKm * line.lengthKm;

  const uncompensatedMw = transferAtAngleMw(line, sendingVoltageKv, receivingVoltageKv, angleLimitRad);
  const transferWith = (degree: number) => transferAtAngleMw(compensatedNetworkFor(line, location, degree), sendingVoltageKv, receivingVoltageKv, angleLimitRad);
  let degree = 0;
  if (uncompensatedMw < targetTransferMw) {
    const reachableMw = transferWith(maxDegree);
    if (reachableMw < targetTransferMw) {
      throw new SolverDomainError({
        code: 'TRANSFER_LIMIT_EXCEEDED',
        quantity: 'targetTransferMw',
        value: targetTransferMw,
        allowedRange: `(0, ${forMessage(reachableMw)}] MW at an angle of at most ${angleLimitDeg} deg with at most ${maxDegree * 100} % compensation`,
        hint: 'The target lies beyond the transfer limit even with the largest degree of compensation allowed; relax the angle limit, raise the voltage or add a circuit.',
      });
    }
    let lower = 0;
    let upper = maxDegree;
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
  const warnings: string[] = [];
  if (degree > 0 && emergencyPeakKv >= protectiveLevelPeakKv) {
    warnings.push(
      `Emergency current ${emergencyCurrentA} A gives a capacitor peak of ${emergencyPeakKv.toFixed(1)} kV, at or above the protective level ${protectiveLevelPeakKv.toFixed(1)} kV: the varistor would conduct in emergency loading; raise protectiveLevelPu.`,
    );
  }
  const faultDrivesMov = degree > 0 && throughFaultPeakKv > protectiveLevelPeakKv;
  const bypass = {
    needed: faultDrivesMov,
    reason:
      degree === 0
        ? 'No series capacitor is needed for this target.'
        : faultDrivesMov
          ? `A through fault of ${throughFaultCurrentA} A drives the capacitor to ${throughFaultPeakKv.toFixed(1)} kV peak, above the protective level ${protectiveLevelPeakKv.toFixed(1)} kV: the varistor conducts, and a bypass (switch or triggered gap) is needed to limit its energy.`
          : `A through fault of ${throughFaultCurrentA} A gives ${throughFaultPeakKv.toFixed(1)} kV peak, below the protective level ${protectiveLevelPeakKv.toFixed(1)} kV: the varistor does not conduct for external faults.`,
  };
  const compensatedNetwork = degree > 0 ? compensatedNetworkFor(line, location, degree) : cascade({ elements: [line] });
  return assertFiniteResult('seriesCompensationDesign', {
    location,
    compensationNeeded: degree > 0,
    degreeOfCompensation: degree,
    reactanceOhm,
    lineSeriesReactanceOhm: lineReactanceOhm,
    transferAtAngleLimitMw: degree > 0 ? transferWith(degree) : uncompensatedMw,
    uncompensatedTransferAtAngleLimitMw: uncompensatedMw,
    angleLimitDeg,
    threePhaseMvarAtRatedCurrent: (3 * ratedCurrentA * ratedCurrentA * reactanceOhm) / 1e6,
    capacitorVoltageAtRatedCurrentKv: ratedCapacitorKv,
    capacitorVoltageAtEmergencyCurrentKv: emergencyCapacitorKv,
    protectiveLevelPeakKv,
    protectiveLevelPu,
    emergencyPeakKv,
    throughFaultPeakKv,
    bypass,
    warnings,
    compensatedNetwork,
  });
}
