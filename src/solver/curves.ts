// Transfer curves of a two-port: P-V and Q-V curves, P-delta curve, power circles, steady-state limit and margin, and the angle for a given transfer.
import { Complex } from './complex.ts';
import { SolverDomainError, assertFiniteResult, forMessage, optionalNumber, requireChoice, requireNumber, requireObject } from './errors.ts';
import { VOLTAGE_RANGE_KV } from './lineModels.ts';
import {
  beyondNoseError,
  deliveredReactiveVa,
  lineModelsOf,
  noseLoadMultiple,
  readLoad,
  readNetwork,
  receivingVoltageRoots,
  requireSeriesPath,
  twoEndPhasors,
  type LoadInput,
} from './solutions.ts';
import { labelOf, type AbcdMatrix, type TwoPort } from './twoPort.ts';
import { degToRad, kvToV, mwToW, radToDeg, varToMvar, vaToMva, vToKv, wToMw } from './units.ts';

const POINT_COUNT_RANGE = { min: 2, max: 100_000 } as const;

/** The options every fixed-end-voltage curve starts from: the network and both line-to-line end voltages. */
function readTwoEndOptions(options: unknown, hint: string) {
  const record = requireObject('options', options, hint);
  const { network, abcd } = readNetwork(record);
  const sendingVoltageKv = requireNumber('sendingVoltageKv', record.sendingVoltageKv, VOLTAGE_RANGE_KV, hint);
  const receivingVoltageKv = requireNumber('receivingVoltageKv', record.receivingVoltageKv, VOLTAGE_RANGE_KV, hint);
  return { record, network, abcd, sendingVoltageKv, receivingVoltageKv };
}

export interface PvPoint {
  pMw: number;
  qMvar: number;
  receivingVoltageKv: number;
}

export interface PvCurve {
  networkLabel: string;
  lineModels: string[];
  sendingVoltageKv: number;
  powerFactor: number;
  powerFactorSense: 'lagging' | 'leading';
  /** Normal operating branch from no load up to the nose. */
  upperBranch: PvPoint[];
  /** Low-voltage branch from the nose back to no load. */
  lowerBranch: PvPoint[];
  nose: PvPoint;
}

/** Receiving voltage versus load at a fixed power factor with a fixed sending voltage, both branches, up to the collapse point. */
export function pvCurve(options: {
  network: TwoPort;
  sendingVoltageKv: number;
  powerFactor: number;
  powerFactorSense: 'lagging' | 'leading';
  pointCount?: number;
}): PvCurve {
  const hint = "Pass { network, sendingVoltageKv, powerFactor, powerFactorSense: 'lagging' | 'leading', pointCount? }.";
  const record = requireObject('options', options, hint);
  const { network, abcd } = readNetwork(record);
  const sendingVoltageKv = requireNumber('sendingVoltageKv', record.sendingVoltageKv, VOLTAGE_RANGE_KV, hint);
  const powerFactor = requireNumber('powerFactor', record.powerFactor, { min: 0, max: 1, minInclusive: false }, hint);
  const powerFactorSense = requireChoice('powerFactorSense', record.powerFactorSense, ['lagging', 'leading'] as const, hint);
  const pointCount = Math.round(optionalNumber('pointCount', record.pointCount, 101, POINT_COUNT_RANGE, 'Points on each branch.'));
  requireSeriesPath(abcd, network);
  const tangent = Math.tan(Math.acos(powerFactor)) * (powerFactorSense === 'lagging' ? 1 : -1);
  const unitLoad = new Complex(1e6, tangent * 1e6);
  const sendingLineV = kvToV(sendingVoltageKv);
  const noseMultiple = noseLoadMultiple(abcd, sendingLineV, unitLoad);
  if (!Number.isFinite(noseMultiple)) {
    throw new SolverDomainError({
      code: 'degenerate-network',
      quantity: 'powerFactor',
      value: powerFactor,
      allowedRange: 'a power factor for which this network has a finite maximum loadability',
      hint: 'With this leading power factor the load supplies enough vars that no voltage collapse point exists.',
    });
  }
  const voltagesAt = (pMw: number) => {
    const roots = receivingVoltageRoots(abcd, sendingLineV, unitLoad.mul(pMw));
    if (roots === null) throw beyondNoseError(abcd, sendingVoltageKv, unitLoad.mul(pMw));
    return roots;
  };
  const upperBranch: PvPoint[] = [];
  const lowerBranch: PvPoint[] = [];
  for (let index = 0; index < pointCount; index += 1) {
    // The last sample stays a hair below the nose, where the two branches meet.
    const pMw = ((noseMultiple * index) / (pointCount - 1)) * (index === pointCount - 1 ? 1 - 1e-12 : 1);
    const roots = voltagesAt(pMw);
    upperBranch.push({ pMw, qMvar: pMw * tangent, receivingVoltageKv: vToKv(roots.upper) });
    lowerBranch.unshift({ pMw, qMvar: pMw * tangent, receivingVoltageKv: vToKv(roots.lower) });
  }
  // At the nose the quadratic's two roots coincide: u = -b / (2 |A|^2).
  const noseB = 2 * noseMultiple * abcd.A.mul(abcd.B.conjugate()).mul(unitLoad).re - sendingLineV * sendingLineV;
  const noseVoltageKv = vToKv(Math.sqrt(-noseB / (2 * abcd.A.abs() ** 2)));
  const nose = { pMw: noseMultiple, qMvar: noseMultiple * tangent, receivingVoltageKv: noseVoltageKv };
  return assertFiniteResult('pvCurve', {
    networkLabel: labelOf(network),
    lineModels: lineModelsOf(network),
    sendingVoltageKv,
    powerFactor,
    powerFactorSense,
    upperBranch,
    lowerBranch,
    nose,
  });
}

function receivingPowerMw(abcd: AbcdMatrix, sendingVoltageKv: number, receivingVoltageKv: number, angleRad: number) {
  const phasors = twoEndPhasors(abcd, sendingVoltageKv, receivingVoltageKv, angleRad);
  const receiving = phasors.receivingVoltage.mul(phasors.receivingCurrent.conjugate()).mul(3);
  const sending = phasors.sendingVoltage.mul(phasors.sendingCurrent.conjugate()).mul(3);
  return {
    receivingPMw: wToMw(receiving.re),
    receivingQMvar: varToMvar(receiving.im),
    sendingPMw: wToMw(sending.re),
    sendingQMvar: varToMvar(sending.im),
  };
}

/** Angle (rad) of maximum receiving-end power: P_r = Vs Vr/|B| cos(beta - delta) - |A| Vr^2/|B| cos(beta - alpha) peaks at delta = beta = arg B. */
export function steadyStateLimitAngleRad(abcd: AbcdMatrix): number {
  return abcd.B.arg();
}

export interface PowerAnglePoint {
  angleDeg: number;
  sendingPMw: number;
  receivingPMw: number;
  receivingQMvar: number;
}

export interface PowerAngleCurve {
  networkLabel: string;
  lineModels: string[];
  sendingVoltageKv: number;
  receivingVoltageKv: number;
  points: PowerAnglePoint[];
  steadyStateLimit: { receivingPMw: number; angleDeg: number };
}

/** Active power versus the angle between fixed end voltages, and the steady-state transfer limit. */
export function powerAngleCurve(options: {
  network: TwoPort;
  sendingVoltageKv: number;
  receivingVoltageKv: number;
  pointCount?: number;
  maxAngleDeg?: number;
}): PowerAngleCurve {
  const hint = 'Pass { network, sendingVoltageKv, receivingVoltageKv, pointCount?, maxAngleDeg? }.';
  const { record, network, abcd, sendingVoltageKv, receivingVoltageKv } = readTwoEndOptions(options, hint);
  const pointCount = Math.round(optionalNumber('pointCount', record.pointCount, 181, POINT_COUNT_RANGE, 'Points on the curve.'));
  const maxAngleDeg = optionalNumber('maxAngleDeg', record.maxAngleDeg, 180, { min: 0, max: 180, minInclusive: false, unit: 'deg' }, hint);
  requireSeriesPath(abcd, network);
  const points: PowerAnglePoint[] = [];
  for (let index = 0; index < pointCount; index += 1) {
    const angleDeg = (maxAngleDeg * index) / (pointCount - 1);
    const powers = receivingPowerMw(abcd, sendingVoltageKv, receivingVoltageKv, degToRad(angleDeg));
    points.push({ angleDeg, sendingPMw: powers.sendingPMw, receivingPMw: powers.receivingPMw, receivingQMvar: powers.receivingQMvar });
  }
  const limitAngle = steadyStateLimitAngleRad(abcd);
  return assertFiniteResult('powerAngleCurve', {
    networkLabel: labelOf(network),
    lineModels: lineModelsOf(network),
    sendingVoltageKv,
    receivingVoltageKv,
    points,
    steadyStateLimit: {
      receivingPMw: receivingPowerMw(abcd, sendingVoltageKv, receivingVoltageKv, limitAngle).receivingPMw,
      angleDeg: radToDeg(limitAngle),
    },
  });
}

/** Steady-state stability margin in % of the transfer limit: (Pmax − P0) / Pmax × 100. */
export function stabilityMarginPercent(maxPowerMw: number, operatingPowerMw: number): number {
  requireNumber(
    'operatingPowerMw',
    operatingPowerMw,
    { unit: 'MW' },
    'NaN or Infinity usually means a division by zero upstream in the calculation.',
  );
  requireNumber('maxPowerMw', maxPowerMw, { min: 0, minInclusive: false, unit: 'MW' }, 'Pass the peak of the P-δ curve, e.g. V_S·V_R/X in MW.');
  requireNumber(
    'operatingPowerMw',
    operatingPowerMw,
    { max: maxPowerMw, unit: 'MW' },
    'An operating point above Pmax has no steady state; check the curve or the operating point.',
  );
  return ((maxPowerMw - operatingPowerMw) / maxPowerMw) * 100;
}

/** Receiving-end power (MW) at a given angle; exported for the sizing and loadability modules. */
export function receivingPowerAtAngleMw(abcd: AbcdMatrix, sendingVoltageKv: number, receivingVoltageKv: number, angleRad: number): number {
  return receivingPowerMw(abcd, sendingVoltageKv, receivingVoltageKv, angleRad).receivingPMw;
}

/**
 * Stable-side angle (rad) at which the receiving end gets pMw, for a power not above the steady-state limit.
 * P_r(delta) = k1 cos(beta - delta) - k0 rises monotonically on [beta - pi, beta], so the angle has a closed form.
 */
export function stableAngleForPowerRad(abcd: AbcdMatrix, sendingVoltageKv: number, receivingVoltageKv: number, pMw: number): number {
  const limitAngle = steadyStateLimitAngleRad(abcd);
  const limitMw = receivingPowerAtAngleMw(abcd, sendingVoltageKv, receivingVoltageKv, limitAngle);
  const voltageProduct = kvToV(sendingVoltageKv) * kvToV(receivingVoltageKv);
  const offsetMw = limitMw - wToMw(voltageProduct / abcd.B.abs());
  const cosine = (mwToW(pMw - offsetMw) * abcd.B.abs()) / voltageProduct;
  return limitAngle - Math.acos(Math.max(-1, Math.min(1, cosine)));
}

/** Angle by which Vs must lead Vr to deliver a receiving-end power; beyond the steady-state limit in either direction it throws transfer-limit-exceeded. */
export function angleForTransfer(options: { network: TwoPort; sendingVoltageKv: number; receivingVoltageKv: number; receivingPMw: number }): {
  angleDeg: number;
  steadyStateLimitMw: number;
  marginPercent: number;
} {
  const hint = 'Pass { network, sendingVoltageKv, receivingVoltageKv, receivingPMw }.';
  const { record, network, abcd, sendingVoltageKv, receivingVoltageKv } = readTwoEndOptions(options, hint);
  const receivingPMw = requireNumber('receivingPMw', record.receivingPMw, { min: -1e5, max: 1e5, unit: 'MW' }, hint);
  requireSeriesPath(abcd, network);
  const limitAngle = steadyStateLimitAngleRad(abcd);
  const limitMw = receivingPowerAtAngleMw(abcd, sendingVoltageKv, receivingVoltageKv, limitAngle);
  // The stable side runs from delta = beta - pi (largest reverse flow) to delta = beta (largest forward flow).
  const minimumMw = receivingPowerAtAngleMw(abcd, sendingVoltageKv, receivingVoltageKv, limitAngle - Math.PI);
  if (receivingPMw > limitMw || receivingPMw < minimumMw) {
    throw new SolverDomainError({
      code: 'transfer-limit-exceeded',
      quantity: 'receivingPMw',
      value: receivingPMw,
      allowedRange: `[${forMessage(minimumMw)}, ${forMessage(limitMw)}] MW (steady-state limits in both directions at ${sendingVoltageKv} kV / ${receivingVoltageKv} kV)`,
      hint:
        receivingPMw > limitMw
          ? 'The transfer exceeds the steady-state limit of this network; add series compensation, raise the voltages or add a parallel path.'
          : 'No angle delivers this reverse (negative) transfer: it lies below the steady-state limit in the reverse direction.',
    });
  }
  const angleRad = stableAngleForPowerRad(abcd, sendingVoltageKv, receivingVoltageKv, receivingPMw);
  return assertFiniteResult('angleForTransfer', {
    angleDeg: radToDeg(angleRad),
    steadyStateLimitMw: limitMw,
    marginPercent: ((limitMw - receivingPMw) / limitMw) * 100,
  });
}

/** Minimum of a function with one minimum on [low, high], by golden-section search. */
export function goldenSectionMinimum(fn: (value: number) => number, low: number, high: number): number {
  const ratio = (Math.sqrt(5) - 1) / 2;
  let lower = low;
  let upper = high;
  for (let iteration = 0; iteration < 100 && upper - lower > 1e-12 * Math.max(1, Math.abs(upper)); iteration += 1) {
    const left = upper - ratio * (upper - lower);
    const right = lower + ratio * (upper - lower);
    if (fn(left) < fn(right)) upper = right;
    else lower = left;
  }
  return (lower + upper) / 2;
}

export interface PowerCircle {
  centreMw: number;
  centreMvar: number;
  radiusMva: number;
  /** Largest active power on the circle: the steady-state limit at this end. */
  maximumPMw: number;
}

/**
 * Receiving-end and sending-end power circles for fixed end voltages: S_r = Vs Vr e^(-j delta) / B* - A* Vr^2 / B* and
 * S_s = D* Vs^2 / B* - Vs Vr e^(j delta) / B* (three-phase, Q > 0 delivered to the receiving bus / drawn from the sending bus).
 */
export function powerCircles(options: { network: TwoPort; sendingVoltageKv: number; receivingVoltageKv: number }): {
  networkLabel: string;
  lineModels: string[];
  sendingVoltageKv: number;
  receivingVoltageKv: number;
  receivingEnd: PowerCircle;
  sendingEnd: PowerCircle;
} {
  const hint = 'Pass { network, sendingVoltageKv, receivingVoltageKv }.';
  const { network, abcd, sendingVoltageKv, receivingVoltageKv } = readTwoEndOptions(options, hint);
  requireSeriesPath(abcd, network);
  const sendingV = kvToV(sendingVoltageKv);
  const receivingV = kvToV(receivingVoltageKv);
  const bConjugate = abcd.B.conjugate();
  const radiusMva = vaToMva((sendingV * receivingV) / abcd.B.abs());
  const receivingCentre = abcd.A.conjugate()
    .mul(-receivingV * receivingV)
    .div(bConjugate)
    .div(1e6);
  const sendingCentre = abcd.D.conjugate()
    .mul(sendingV * sendingV)
    .div(bConjugate)
    .div(1e6);
  const circle = (centre: Complex) => ({ centreMw: centre.re, centreMvar: centre.im, radiusMva, maximumPMw: centre.re + radiusMva });
  return assertFiniteResult('powerCircles', {
    networkLabel: labelOf(network),
    lineModels: lineModelsOf(network),
    sendingVoltageKv,
    receivingVoltageKv,
    receivingEnd: circle(receivingCentre),
    sendingEnd: circle(sendingCentre),
  });
}

export interface QvCurve {
  networkLabel: string;
  lineModels: string[];
  sendingVoltageKv: number;
  pMw: number;
  qMvar: number;
  /** Bus voltages where the network can carry the load's active power, ascending. */
  voltageKv: number[];
  /** Reactive power a source at the receiving bus must supply to hold each voltage (positive capacitive, negative inductive). */
  supportMvar: number[];
  /** Bottom of the curve: the critical voltage and the support there. */
  minimum: { voltageKv: number; supportMvar: number };
  /** Reactive margin: -minimum.supportMvar; positive when the bus can take that much more reactive load before collapse. */
  reactiveMarginMvar: number;
}

/** Receiving-bus Q-V curve: the reactive support that holds each bus voltage with the load's P and Q and a fixed sending voltage. */
export function qvCurve(options: {
  network: TwoPort;
  sendingVoltageKv: number;
  load: LoadInput;
  minimumVoltageKv?: number;
  maximumVoltageKv?: number;
  pointCount?: number;
}): QvCurve {
  const hint = 'Pass { network, sendingVoltageKv, load, minimumVoltageKv?, maximumVoltageKv?, pointCount? }.';
  const record = requireObject('options', options, hint);
  const { network, abcd } = readNetwork(record);
  const sendingVoltageKv = requireNumber('sendingVoltageKv', record.sendingVoltageKv, VOLTAGE_RANGE_KV, hint);
  const load = readLoad('load', record.load);
  const minimumVoltageKv = optionalNumber('minimumVoltageKv', record.minimumVoltageKv, 0.2 * sendingVoltageKv, VOLTAGE_RANGE_KV, hint);
  const maximumVoltageKv = optionalNumber(
    'maximumVoltageKv',
    record.maximumVoltageKv,
    1.3 * sendingVoltageKv,
    { min: minimumVoltageKv, max: 2000, minInclusive: false, unit: 'kV' },
    hint,
  );
  const pointCount = Math.round(optionalNumber('pointCount', record.pointCount, 101, POINT_COUNT_RANGE, 'Points on the curve.'));
  requireSeriesPath(abcd, network);
  const sendingLineV = kvToV(sendingVoltageKv);
  const supportAt = (voltageKv: number): number | null => {
    const delivered = deliveredReactiveVa(abcd, sendingLineV, kvToV(voltageKv), load.re);
    return delivered === null ? null : varToMvar(load.im - delivered);
  };
  const voltageKv: number[] = [];
  const supportMvar: number[] = [];
  for (let index = 0; index < pointCount; index += 1) {
    const voltage = minimumVoltageKv + ((maximumVoltageKv - minimumVoltageKv) * index) / (pointCount - 1);
    const support = supportAt(voltage);
    if (support !== null) {
      voltageKv.push(voltage);
      supportMvar.push(support);
    }
  }
  if (voltageKv.length === 0) {
    throw new SolverDomainError({
      code: 'no-operating-point',
      quantity: 'load.pMw',
      value: wToMw(load.re),
      allowedRange: `active powers the network can carry at some bus voltage in [${minimumVoltageKv}, ${maximumVoltageKv}] kV`,
      hint: 'No bus voltage in the range carries this active power; widen the voltage range or reduce the load.',
    });
  }
  // Refine the bottom between the neighbours of the lowest sample (the curve is smooth and has one minimum).
  const best = supportMvar.reduce((lowest, value, index) => (value < (supportMvar[lowest] as number) ? index : lowest), 0);
  const refinedVoltage = goldenSectionMinimum(
    (voltage) => supportAt(voltage) ?? Number.POSITIVE_INFINITY,
    voltageKv[Math.max(0, best - 1)] as number,
    voltageKv[Math.min(voltageKv.length - 1, best + 1)] as number,
  );
  const refinedSupport = supportAt(refinedVoltage);
  const minimum =
    refinedSupport !== null && refinedSupport < (supportMvar[best] as number)
      ? { voltageKv: refinedVoltage, supportMvar: refinedSupport }
      : { voltageKv: voltageKv[best] as number, supportMvar: supportMvar[best] as number };
  return assertFiniteResult('qvCurve', {
    networkLabel: labelOf(network),
    lineModels: lineModelsOf(network),
    sendingVoltageKv,
    pMw: wToMw(load.re),
    qMvar: varToMvar(load.im),
    voltageKv,
    supportMvar,
    minimum,
    reactiveMarginMvar: -minimum.supportMvar,
  });
}
