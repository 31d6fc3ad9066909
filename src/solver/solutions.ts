// Steady-state operating points of a two-port network: no load, receiving-end load, both end voltages, fixed sending voltage (Newton).
import { Complex, angleDegOf, fromPolar, toPlain, type ComplexValue } from './complex.ts';
import {
  SolverDomainError,
  assertFiniteResult,
  forMessage,
  loadForError,
  optionalNumber,
  requireChoice,
  requireNumber,
  requireObject,
} from './errors.ts';
import { requireInductiveSeriesPath } from './elements.ts';
import { VOLTAGE_RANGE_KV } from './lineModels.ts';
import { abcdOf, elementsOf, labelOf, readTwoPort, type AbcdMatrix, type TwoPort } from './twoPort.ts';
import { degToRad, kvToV, lineKvFromPhaseVolts, mvarToVar, mwToW, phaseVoltsFromLineKv, SQRT3, varToMvar, vaToMva, wToMw } from './units.ts';

/** A receiving-end load: P with Q, or P with a power factor and its sense (lagging = inductive, absorbs vars). */
export type LoadInput = { pMw: number; qMvar: number } | { pMw: number; powerFactor: number; powerFactorSense: 'lagging' | 'leading' };

const LOAD_HINT = "Give { pMw, qMvar } or { pMw, powerFactor, powerFactorSense: 'lagging' | 'leading' }.";

/** Three-phase complex power of a load in VA (Q > 0 absorbs vars). */
export function readLoad(quantity: string, value: unknown): Complex {
  const record = requireObject(quantity, value, LOAD_HINT);
  const pMw = requireNumber(`${quantity}.pMw`, record.pMw, { min: 0, max: 1e5, unit: 'MW' }, LOAD_HINT);
  if (record.qMvar !== undefined) {
    const qMvar = requireNumber(`${quantity}.qMvar`, record.qMvar, { min: -1e5, max: 1e5, unit: 'Mvar' }, LOAD_HINT);
    return new Complex(mwToW(pMw), mvarToVar(qMvar));
  }
  const powerFactor = requireNumber(`${quantity}.powerFactor`, record.powerFactor, { min: 0, max: 1, minInclusive: false }, LOAD_HINT);
  const sense = requireChoice(`${quantity}.powerFactorSense`, record.powerFactorSense, ['lagging', 'leading'] as const, LOAD_HINT);
  const qMagnitude = pMw * Math.tan(Math.acos(powerFactor));
  return new Complex(mwToW(pMw), mvarToVar(sense === 'lagging' ? qMagnitude : -qMagnitude));
}

export interface EndQuantities {
  /** Line-to-line voltage magnitude. */
  voltageKv: number;
  voltageAngleDeg: number;
  currentA: number;
  currentAngleDeg: number;
  /** Three-phase active power flowing from sending towards receiving end at this point. */
  pMw: number;
  qMvar: number;
  /** Phase-to-neutral voltage phasor. */
  phaseVoltageV: ComplexValue;
  lineCurrentA: ComplexValue;
}

export type OperatingCase = 'no-load' | 'receiving-load' | 'two-end-voltages' | 'fixed-sending-voltage';

export interface OperatingPoint {
  kind: 'operating-point';
  case: OperatingCase;
  networkLabel: string;
  /** Line models of the line sections in the network, in order. */
  lineModels: string[];
  sendingEnd: EndQuantities;
  receivingEnd: EndQuantities;
  lossesMw: number;
  /** Qs - Qr: reactive power consumed (+) or generated (-) by the network. */
  reactiveBalanceMvar: number;
  /** (no-load receiving voltage - this receiving voltage) / this receiving voltage, same sending voltage. */
  voltageRegulationPercent: number;
  newton: { iterations: number; mismatchMva: number } | null;
}

function endQuantities(phaseVoltage: Complex, lineCurrent: Complex): EndQuantities {
  const power = phaseVoltage.mul(lineCurrent.conjugate()).mul(3);
  return {
    voltageKv: lineKvFromPhaseVolts(phaseVoltage.abs()),
    voltageAngleDeg: angleDegOf(phaseVoltage),
    currentA: lineCurrent.abs(),
    currentAngleDeg: lineCurrent.abs() === 0 ? 0 : angleDegOf(lineCurrent),
    pMw: wToMw(power.re),
    qMvar: varToMvar(power.im),
    phaseVoltageV: toPlain(phaseVoltage),
    lineCurrentA: toPlain(lineCurrent),
  };
}

export function lineModelsOf(network: TwoPort): string[] {
  return elementsOf(network).flatMap((element) => (element.kind === 'line-section' ? [element.model] : []));
}

export function readNetwork(record: Record<string, unknown>): { network: TwoPort; abcd: AbcdMatrix } {
  const network = readTwoPort('network', record.network);
  return { network, abcd: abcdOf(network) };
}

export function requireSeriesPath(abcd: AbcdMatrix, network: TwoPort): void {
  requireInductiveSeriesPath(network);
  if (abcd.B.abs() < 1e-9) {
    throw new SolverDomainError({
      code: 'degenerate-network',
      quantity: `B of '${labelOf(network)}'`,
      value: abcd.B.abs(),
      allowedRange: '|B| > 1e-9 ohm',
      hint: 'This case needs a series path between the ends (a line or series element); a network of shunt elements alone has none.',
    });
  }
}

function buildOperatingPoint(
  caseName: OperatingCase,
  network: TwoPort,
  abcd: AbcdMatrix,
  sending: { voltage: Complex; current: Complex },
  receiving: { voltage: Complex; current: Complex },
  newton: OperatingPoint['newton'],
): OperatingPoint {
  const sendingEnd = endQuantities(sending.voltage, sending.current);
  const receivingEnd = endQuantities(receiving.voltage, receiving.current);
  const noLoadReceivingVolts = sending.voltage.abs() / abcd.A.abs();
  return {
    kind: 'operating-point',
    case: caseName,
    networkLabel: labelOf(network),
    lineModels: lineModelsOf(network),
    sendingEnd,
    receivingEnd,
    lossesMw: sendingEnd.pMw - receivingEnd.pMw,
    reactiveBalanceMvar: sendingEnd.qMvar - receivingEnd.qMvar,
    voltageRegulationPercent: ((noLoadReceivingVolts - receiving.voltage.abs()) / receiving.voltage.abs()) * 100,
    newton,
  };
}

function requireUsableA(abcd: AbcdMatrix, network: TwoPort): void {
  if (abcd.A.abs() < 1e-6) {
    throw new SolverDomainError({
      code: 'degenerate-network',
      quantity: `|A| of '${labelOf(network)}'`,
      value: abcd.A.abs(),
      allowedRange: '|A| >= 1e-6',
      hint: 'The open-ended network is at resonance (e.g. a quarter-wavelength line); the no-load receiving voltage is unbounded.',
    });
  }
}

/** Receiving end open: Vr = Vs / A, Ir = 0. */
export function solveNoLoad(options: { network: TwoPort; sendingVoltageKv: number }): OperatingPoint {
  const record = requireObject('options', options, 'Pass { network, sendingVoltageKv }.');
  const { network, abcd } = readNetwork(record);
  const sendingVoltageKv = requireNumber('sendingVoltageKv', record.sendingVoltageKv, VOLTAGE_RANGE_KV, 'Line-to-line sending-end voltage.');
  requireUsableA(abcd, network);
  const sendingVoltage = new Complex(phaseVoltsFromLineKv(sendingVoltageKv), 0);
  const receivingVoltage = sendingVoltage.div(abcd.A);
  const sendingCurrent = abcd.C.mul(receivingVoltage);
  return assertFiniteResult(
    'solveNoLoad',
    buildOperatingPoint(
      'no-load',
      network,
      abcd,
      { voltage: sendingVoltage, current: sendingCurrent },
      { voltage: receivingVoltage, current: new Complex(0, 0) },
      null,
    ),
  );
}

/** Receiving-end voltage (reference angle) and load given; sending end follows from Vs = A Vr + B Ir, Is = C Vr + D Ir. */
export function solveReceivingLoad(options: { network: TwoPort; receivingVoltageKv: number; load: LoadInput }): OperatingPoint {
  const record = requireObject('options', options, 'Pass { network, receivingVoltageKv, load }.');
  const { network, abcd } = readNetwork(record);
  const receivingVoltageKv = requireNumber('receivingVoltageKv', record.receivingVoltageKv, VOLTAGE_RANGE_KV, 'Line-to-line receiving-end voltage.');
  const load = readLoad('load', record.load);
  requireUsableA(abcd, network);
  const receivingVoltage = new Complex(phaseVoltsFromLineKv(receivingVoltageKv), 0);
  const receivingCurrent = load.div(3).div(receivingVoltage).conjugate();
  const sendingVoltage = abcd.A.mul(receivingVoltage).add(abcd.B.mul(receivingCurrent));
  const sendingCurrent = abcd.C.mul(receivingVoltage).add(abcd.D.mul(receivingCurrent));
  return assertFiniteResult(
    'solveReceivingLoad',
    buildOperatingPoint(
      'receiving-load',
      network,
      abcd,
      { voltage: sendingVoltage, current: sendingCurrent },
      { voltage: receivingVoltage, current: receivingCurrent },
      null,
    ),
  );
}

/** Phase phasors at both ends when both voltages and the angle by which Vs leads Vr are fixed. */
export function twoEndPhasors(abcd: AbcdMatrix, sendingVoltageKv: number, receivingVoltageKv: number, angleRad: number) {
  const receivingVoltage = new Complex(phaseVoltsFromLineKv(receivingVoltageKv), 0);
  const sendingVoltage = fromPolar(phaseVoltsFromLineKv(sendingVoltageKv), angleRad);
  const receivingCurrent = sendingVoltage.sub(abcd.A.mul(receivingVoltage)).div(abcd.B);
  const sendingCurrent = abcd.C.mul(receivingVoltage).add(abcd.D.mul(receivingCurrent));
  return { sendingVoltage, sendingCurrent, receivingVoltage, receivingCurrent };
}

/** Both end voltages and the angle by which the sending voltage leads the receiving voltage are given. */
export function solveTwoEndVoltages(options: {
  network: TwoPort;
  sendingVoltageKv: number;
  receivingVoltageKv: number;
  angleDeg: number;
}): OperatingPoint {
  const record = requireObject('options', options, 'Pass { network, sendingVoltageKv, receivingVoltageKv, angleDeg }.');
  const { network, abcd } = readNetwork(record);
  const sendingVoltageKv = requireNumber('sendingVoltageKv', record.sendingVoltageKv, VOLTAGE_RANGE_KV, 'Line-to-line sending-end voltage.');
  const receivingVoltageKv = requireNumber('receivingVoltageKv', record.receivingVoltageKv, VOLTAGE_RANGE_KV, 'Line-to-line receiving-end voltage.');
  const angleDeg = requireNumber(
    'angleDeg',
    record.angleDeg,
    { min: -180, max: 180, unit: 'deg' },
    'Angle by which the sending voltage leads the receiving voltage.',
  );
  requireSeriesPath(abcd, network);
  const phasors = twoEndPhasors(abcd, sendingVoltageKv, receivingVoltageKv, degToRad(angleDeg));
  return assertFiniteResult(
    'solveTwoEndVoltages',
    buildOperatingPoint(
      'two-end-voltages',
      network,
      abcd,
      { voltage: phasors.sendingVoltage, current: phasors.sendingCurrent },
      { voltage: phasors.receivingVoltage, current: phasors.receivingCurrent },
      null,
    ),
  );
}

/**
 * Largest multiple t of a load S (three-phase VA) that a fixed sending voltage can still supply: the nose of the P-V curve.
 * From |A u + B conj(tS)|^2 = Vs^2 u with u = Vr^2 (line-to-line), a quadratic in u whose discriminant vanishes at
 * t = Vs^2 / (2 (Re(A conj(B) S) + |A||B||S|)).
 */
export function noseLoadMultiple(abcd: AbcdMatrix, sendingVoltageLineV: number, load: Complex): number {
  const alpha = abcd.A.mul(abcd.B.conjugate()).mul(load).re;
  const denominator = 2 * (alpha + abcd.A.abs() * abcd.B.abs() * load.abs());
  return denominator <= 0 ? Number.POSITIVE_INFINITY : (sendingVoltageLineV * sendingVoltageLineV) / denominator;
}

/** Both receiving voltages (line-to-line V) that carry load S with a fixed sending voltage, upper branch first; null beyond the nose. */
export function receivingVoltageRoots(abcd: AbcdMatrix, sendingVoltageLineV: number, load: Complex): { upper: number; lower: number } | null {
  const a = abcd.A.abs() ** 2;
  const b = 2 * abcd.A.mul(abcd.B.conjugate()).mul(load).re - sendingVoltageLineV * sendingVoltageLineV;
  const c = abcd.B.abs() ** 2 * load.abs() ** 2;
  const discriminant = b * b - 4 * a * c;
  if (discriminant < 0 || b > 0) return null;
  const root = Math.sqrt(discriminant);
  // The product form avoids cancellation in the small root.
  const upperSquared = (-b + root) / (2 * a);
  const lowerSquared = upperSquared > 0 ? c / (a * upperSquared) : 0;
  return { upper: Math.sqrt(upperSquared), lower: Math.sqrt(lowerSquared) };
}

/**
 * Reactive power (VA, three-phase) the network delivers into a bus held at busV (line-to-line) carrying active power pW, with the
 * sending voltage fixed: |A V + B (P - j Q) / V| = Vs is a quadratic in Q; the larger root is the normal (small-angle) solution.
 * Null when no angle delivers pW at that bus voltage.
 */
export function deliveredReactiveVa(abcd: AbcdMatrix, sendingLineV: number, busV: number, pW: number): number | null {
  const fixedPart = abcd.A.mul(busV).add(abcd.B.mul(pW).div(busV));
  const perReactive = abcd.B.mul(new Complex(0, -1)).div(busV);
  const a = perReactive.abs() ** 2;
  const b = 2 * fixedPart.mul(perReactive.conjugate()).re;
  const c = fixedPart.abs() ** 2 - sendingLineV * sendingLineV;
  const discriminant = b * b - 4 * a * c;
  return discriminant < 0 ? null : (-b + Math.sqrt(discriminant)) / (2 * a);
}

export function beyondNoseError(abcd: AbcdMatrix, sendingVoltageKv: number, load: Complex): SolverDomainError {
  const multiple = noseLoadMultiple(abcd, kvToV(sendingVoltageKv), load);
  const allowedRange = `up to P = ${forMessage(wToMw(multiple * load.re))} MW, Q = ${forMessage(varToMvar(multiple * load.im))} Mvar at this power factor (the nose of the P-V curve at Vs = ${forMessage(sendingVoltageKv)} kV)`;
  return new SolverDomainError({
    code: 'no-operating-point',
    quantity: 'load',
    ...loadForError(wToMw(load.re), varToMvar(load.im)),
    allowedRange,
    hint: 'No receiving voltage carries this load: it lies beyond the maximum loadability. Reduce the load, add shunt or series compensation, or raise the sending voltage.',
  });
}

/**
 * Fixed sending voltage and a PQ load: the receiving voltage by Newton-Raphson on the receiving-bus power mismatch,
 * started from the no-load voltage so it lands on the upper (normal) branch.
 */
export function solveFixedSendingVoltage(options: {
  network: TwoPort;
  sendingVoltageKv: number;
  load: LoadInput;
  maxIterations?: number;
  toleranceMva?: number;
}): OperatingPoint {
  const record = requireObject('options', options, 'Pass { network, sendingVoltageKv, load }.');
  const { network, abcd } = readNetwork(record);
  const sendingVoltageKv = requireNumber('sendingVoltageKv', record.sendingVoltageKv, VOLTAGE_RANGE_KV, 'Line-to-line sending-end voltage.');
  const load = readLoad('load', record.load);
  const maxIterations = optionalNumber('maxIterations', record.maxIterations, 30, { min: 1, max: 200 }, 'Newton iteration limit.');
  const toleranceMva = optionalNumber(
    'toleranceMva',
    record.toleranceMva,
    1e-6,
    { min: 0, max: 1, minInclusive: false, unit: 'MVA' },
    'Power mismatch accepted at convergence.',
  );
  requireSeriesPath(abcd, network);
  requireUsableA(abcd, network);
  const sendingLineV = kvToV(sendingVoltageKv);
  if (receivingVoltageRoots(abcd, sendingLineV, load) === null) throw beyondNoseError(abcd, sendingVoltageKv, load);

  // Bus admittances of the two-port seen from the receiving bus (line-to-line phasors give three-phase power).
  const transferAdmittance = new Complex(-1, 0).div(abcd.B);
  const receivingSelfAdmittance = abcd.A.div(abcd.B);
  const sendingPart = transferAdmittance.conjugate().mul(sendingLineV);
  const selfPart = receivingSelfAdmittance.conjugate();
  let magnitude = sendingLineV / abcd.A.abs();
  let angle = -abcd.A.arg();
  let iterations = 0;
  let mismatch = Number.POSITIVE_INFINITY;
  for (; iterations <= maxIterations; iterations += 1) {
    const rotation = fromPolar(1, angle);
    const injected = sendingPart
      .mul(rotation)
      .mul(magnitude)
      .add(selfPart.mul(magnitude * magnitude));
    const residual = injected.add(load);
    mismatch = residual.abs();
    if (mismatch <= toleranceMva * 1e6 || iterations === maxIterations) break;
    const byMagnitude = sendingPart.mul(rotation).add(selfPart.mul(2 * magnitude));
    const byAngle = sendingPart.mul(rotation).mul(new Complex(0, magnitude));
    const determinant = byMagnitude.re * byAngle.im - byAngle.re * byMagnitude.im;
    if (Math.abs(determinant) < 1e-300) break;
    magnitude -= (residual.re * byAngle.im - byAngle.re * residual.im) / determinant;
    angle -= (byMagnitude.re * residual.im - residual.re * byMagnitude.im) / determinant;
  }
  if (!(mismatch <= toleranceMva * 1e6) || !(magnitude > 0)) {
    throw new SolverDomainError({
      code: 'no-convergence',
      quantity: 'power mismatch at the receiving bus',
      value: vaToMva(mismatch),
      allowedRange: `[0, ${toleranceMva}] MVA within ${maxIterations} iterations`,
      hint: 'The load is very close to the nose of the P-V curve; reduce it slightly or raise maxIterations.',
    });
  }
  const sendingVoltage = new Complex(sendingLineV / SQRT3, 0);
  const receivingVoltage = fromPolar(magnitude / SQRT3, angle);
  const receivingCurrent = sendingVoltage.sub(abcd.A.mul(receivingVoltage)).div(abcd.B);
  const sendingCurrent = abcd.C.mul(receivingVoltage).add(abcd.D.mul(receivingCurrent));
  return assertFiniteResult(
    'solveFixedSendingVoltage',
    buildOperatingPoint(
      'fixed-sending-voltage',
      network,
      abcd,
      { voltage: sendingVoltage, current: sendingCurrent },
      { voltage: receivingVoltage, current: receivingCurrent },
      { iterations, mismatchMva: vaToMva(mismatch) },
    ),
  );
}
