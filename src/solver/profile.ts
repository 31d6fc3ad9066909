// Voltage and current profile along a compensated route, sampled inside line sections and across lumped elements.
import { type Complex, requireComplex } from './complex.ts';
import { SolverDomainError, assertFiniteResult, optionalNumber, requireNumber, requireObject } from './errors.ts';
import { VOLTAGE_RANGE_KV, lineAbcd, perKmToSi } from './lineModels.ts';
import { lineModelsOf, readNetwork } from './solutions.ts';
import { abcdOf, elementsOf, labelOf, throughTwoPort, type LineSectionTwoPort, type TwoPort } from './twoPort.ts';
import { kmToM, lineKvFromPhaseVolts } from './units.ts';

/**
 * Profile as columns of equal length (one entry per point), which keeps 10,000-point profiles small in the calculation log
 * and cheap to build; row i is (positionKm[i], voltageKv[i], ...).
 */
export interface VoltageProfile {
  networkLabel: string;
  lineModels: string[];
  routeLengthKm: number;
  pointCount: number;
  /** Distance along the route from the sending end; a lumped element gives two points at the same position. */
  positionKm: number[];
  /** Line-to-line voltage magnitude. */
  voltageKv: number[];
  voltageAngleDeg: number[];
  currentA: number[];
  /** Voltage in per unit of nominalVoltageKv, or null when no nominal voltage was given. */
  voltagePu: number[] | null;
  /** Index into elementLabels of the element each point belongs to (the output side for lumped elements). */
  elementIndex: number[];
  elementLabels: string[];
  maximum: { positionKm: number; voltageKv: number };
  minimum: { positionKm: number; voltageKv: number };
}

const PROFILE_HINT =
  'Pass { network, operatingPoint, pointCount?, nominalVoltageKv? } with operatingPoint from a solve... function on the same network.';

/** Sample positions strictly inside (0, lengthKm) on a route-wide grid, so adjacent sections share one spacing. */
function interiorPositions(startKm: number, lengthKm: number, stepKm: number): number[] {
  const positions: number[] = [];
  const first = Math.floor(startKm / stepKm + 1e-9) + 1;
  for (let index = first; index * stepKm < startKm + lengthKm - 1e-9 * stepKm; index += 1) {
    positions.push(index * stepKm - startKm);
  }
  return positions;
}

type Emit = (distanceKm: number, voltageRe: number, voltageIm: number, currentRe: number, currentIm: number) => void;

/**
 * Distributed-model samples, hand-written on plain numbers: V(d) = cosh(gd) V0 - Zc sinh(gd) I0, I(d) = -sinh(gd)/Zc V0 + cosh(gd) I0.
 * Why not complex.js here: bench/profile.bench.ts measured the profile with this loop written in complex.js (a cosh, a sinh and six
 * products per point, each a new object, plus row objects) at 47x a plain Float64Array loop for 10,000 points, against a 3x budget.
 * With this unrolled kernel and column output the whole function measures about 4-6x (2-core machine under load); the rest is input validation, plain JSON
 * arrays for the calculation log and the finiteness guard, which the typed-array loop does not do.
 */
function sampleDistributed(section: LineSectionTwoPort, distancesKm: number[], voltage: Complex, current: Complex, emit: Emit): void {
  const { z, y } = perKmToSi(section.perKm);
  const gamma = z.mul(y).sqrt();
  const surgeImpedance = z.div(y).sqrt();
  const inverseSquaredMagnitude = 1 / surgeImpedance.abs() ** 2;
  const gRe = gamma.re * 1e3;
  const gIm = gamma.im * 1e3;
  const vRe = voltage.re;
  const vIm = voltage.im;
  const iRe = current.re;
  const iIm = current.im;
  // Zc I0 and V0 / Zc do not depend on the position.
  const zcIRe = surgeImpedance.re * iRe - surgeImpedance.im * iIm;
  const zcIIm = surgeImpedance.re * iIm + surgeImpedance.im * iRe;
  const ycRe = surgeImpedance.re * inverseSquaredMagnitude;
  const ycIm = -surgeImpedance.im * inverseSquaredMagnitude;
  const vYcRe = vRe * ycRe - vIm * ycIm;
  const vYcIm = vRe * ycIm + vIm * ycRe;
  for (const distanceKm of distancesKm) {
    const growth = Math.exp(gRe * distanceKm);
    const decay = 1 / growth;
    const cos = Math.cos(gIm * distanceKm);
    const sin = Math.sin(gIm * distanceKm);
    const coshRe = ((growth + decay) / 2) * cos;
    const coshIm = ((growth - decay) / 2) * sin;
    const sinhRe = ((growth - decay) / 2) * cos;
    const sinhIm = ((growth + decay) / 2) * sin;
    emit(
      distanceKm,
      coshRe * vRe - coshIm * vIm - (sinhRe * zcIRe - sinhIm * zcIIm),
      coshRe * vIm + coshIm * vRe - (sinhRe * zcIIm + sinhIm * zcIRe),
      coshRe * iRe - coshIm * iIm - (sinhRe * vYcRe - sinhIm * vYcIm),
      coshRe * iIm + coshIm * iRe - (sinhRe * vYcIm + sinhIm * vYcRe),
    );
  }
}

/**
 * Voltage and current propagated from the sending end of a section through the inverse ABCD of the partial length,
 * V(d) = D V0 - B I0, I(d) = -C V0 + A I0 (valid because AD - BC = 1).
 */
function sampleSection(section: LineSectionTwoPort, distancesKm: number[], voltage: Complex, current: Complex, emit: Emit): void {
  if (section.model === 'distributed') {
    sampleDistributed(section, distancesKm, voltage, current, emit);
    return;
  }
  const { z, y } = perKmToSi(section.perKm);
  for (const distanceKm of distancesKm) {
    const at = throughTwoPort(lineAbcd(section.model, z, y, kmToM(distanceKm)), voltage, current);
    emit(distanceKm, at.voltage.re, at.voltage.im, at.current.re, at.current.im);
  }
}

/** The phasors at both ends of an operating point handed in by a study block. */
export function readOperatingPointEnds(value: unknown, hint: string) {
  const operatingPoint = requireObject('operatingPoint', value, hint);
  const end = (name: 'sendingEnd' | 'receivingEnd') => {
    const record = requireObject(`operatingPoint.${name}`, operatingPoint[name], hint);
    return {
      voltage: requireComplex(`operatingPoint.${name}.phaseVoltageV`, record.phaseVoltageV, hint),
      current: requireComplex(`operatingPoint.${name}.lineCurrentA`, record.lineCurrentA, hint),
    };
  };
  return { sending: end('sendingEnd'), receiving: end('receivingEnd') };
}

/**
 * The sending end propagated through the network must arrive at the operating point's own receiving end. Currents are
 * compared on the scale of the larger end current: an open or lightly loaded receiving end carries only the rounding
 * of the sending end's charging current.
 */
export function requireSameNetwork(
  voltage: Complex,
  current: Complex,
  expectedVoltage: Complex,
  expectedCurrent: Complex,
  sendingCurrent: Complex,
  label: string,
): void {
  const scaleV = Math.max(voltage.abs(), expectedVoltage.abs(), 1);
  const scaleI = Math.max(current.abs(), expectedCurrent.abs(), sendingCurrent.abs(), 1e-3);
  const voltageDeviation = voltage.sub(expectedVoltage).abs() / scaleV;
  const currentDeviation = current.sub(expectedCurrent).abs() / scaleI;
  if (!(voltageDeviation <= 1e-6 && currentDeviation <= 1e-6)) {
    throw new SolverDomainError({
      code: 'inconsistent-quantities',
      quantity: 'operatingPoint',
      value: `receiving end ${lineKvFromPhaseVolts(expectedVoltage.abs())} kV, ${expectedCurrent.abs()} A`,
      allowedRange: `the receiving end this network gives for the same sending end: ${lineKvFromPhaseVolts(voltage.abs())} kV, ${current.abs()} A`,
      hint: 'Solve the operating point on the same network you draw the profile of (e.g. the compensated cascade, not the bare line).',
      message: `The operating point (receiving end ${lineKvFromPhaseVolts(expectedVoltage.abs()).toFixed(3)} kV, ${expectedCurrent.abs().toFixed(3)} A) does not belong to this network '${label}', which gives ${lineKvFromPhaseVolts(voltage.abs()).toFixed(3)} kV, ${current.abs().toFixed(3)} A for the same sending end`,
    });
  }
}

/** Profile of voltage and current along the route for a solved operating point. */
export function voltageProfile(options: {
  network: TwoPort;
  operatingPoint: {
    sendingEnd: { phaseVoltageV: { re: number; im: number }; lineCurrentA: { re: number; im: number } };
    receivingEnd: { phaseVoltageV: { re: number; im: number }; lineCurrentA: { re: number; im: number } };
  };
  pointCount?: number;
  nominalVoltageKv?: number;
}): VoltageProfile {
  const record = requireObject('options', options, PROFILE_HINT);
  const { network } = readNetwork(record);
  const ends = readOperatingPointEnds(record.operatingPoint, PROFILE_HINT);
  let { voltage, current } = ends.sending;
  const requestedPoints = Math.round(
    optionalNumber('pointCount', record.pointCount, 201, { min: 2, max: 1_000_000 }, 'About how many points along the route.'),
  );
  const nominalVoltageKv =
    record.nominalVoltageKv === undefined ? null : requireNumber('nominalVoltageKv', record.nominalVoltageKv, VOLTAGE_RANGE_KV, PROFILE_HINT);
  const elements = elementsOf(network);
  const routeLengthKm = elements.reduce((sum, element) => sum + (element.kind === 'line-section' ? element.lengthKm : 0), 0);
  if (!(routeLengthKm > 0)) {
    throw new SolverDomainError({
      code: 'degenerate-network',
      quantity: 'route length of network',
      value: routeLengthKm,
      allowedRange: '(0, ∞) km',
      hint: 'A profile needs at least one line section in the network.',
    });
  }
  const stepKm = routeLengthKm / (requestedPoints - 1);
  const profile = {
    positionKm: [] as number[],
    voltageKv: [] as number[],
    voltageAngleDeg: [] as number[],
    currentA: [] as number[],
    elementIndex: [] as number[],
  };
  let offsetKm = 0;
  let elementIndex = 0;
  const emit: Emit = (distanceKm, voltageRe, voltageIm, currentRe, currentIm) => {
    profile.positionKm.push(offsetKm + distanceKm);
    profile.voltageKv.push(lineKvFromPhaseVolts(Math.sqrt(voltageRe * voltageRe + voltageIm * voltageIm)));
    profile.voltageAngleDeg.push((Math.atan2(voltageIm, voltageRe) * 180) / Math.PI);
    profile.currentA.push(Math.sqrt(currentRe * currentRe + currentIm * currentIm));
    profile.elementIndex.push(elementIndex);
  };
  emit(0, voltage.re, voltage.im, current.re, current.im);
  elements.forEach((element, index) => {
    elementIndex = index;
    if (element.kind === 'line-section') {
      sampleSection(element, interiorPositions(offsetKm, element.lengthKm, stepKm), voltage, current, emit);
      const { z, y } = perKmToSi(element.perKm);
      ({ voltage, current } = throughTwoPort(lineAbcd(element.model, z, y, kmToM(element.lengthKm)), voltage, current));
      emit(element.lengthKm, voltage.re, voltage.im, current.re, current.im);
      offsetKm += element.lengthKm;
    } else {
      ({ voltage, current } = throughTwoPort(abcdOf(element), voltage, current));
      emit(0, voltage.re, voltage.im, current.re, current.im);
    }
  });
  requireSameNetwork(voltage, current, ends.receiving.voltage, ends.receiving.current, ends.sending.current, labelOf(network));
  // A source equivalent's outer terminal is the system EMF, not a point of the route: it takes no part in the extremes.
  const firstRouteIndex = elements[0]?.kind === 'source-equivalent' ? 1 : 0;
  const lastRouteIndex = profile.voltageKv.length - 1 - (elements[elements.length - 1]?.kind === 'source-equivalent' && elements.length > 1 ? 1 : 0);
  let maximumIndex = firstRouteIndex;
  let minimumIndex = firstRouteIndex;
  for (let index = firstRouteIndex; index <= lastRouteIndex; index += 1) {
    const value = profile.voltageKv[index] as number;
    if (value > (profile.voltageKv[maximumIndex] as number)) maximumIndex = index;
    if (value < (profile.voltageKv[minimumIndex] as number)) minimumIndex = index;
  }
  const at = (index: number) => ({ positionKm: profile.positionKm[index] as number, voltageKv: profile.voltageKv[index] as number });
  return assertFiniteResult('voltageProfile', {
    networkLabel: labelOf(network),
    lineModels: lineModelsOf(network),
    routeLengthKm,
    pointCount: profile.positionKm.length,
    ...profile,
    voltagePu: nominalVoltageKv === null ? null : profile.voltageKv.map((value) => value / nominalVoltageKv),
    elementLabels: elements.map(labelOf),
    maximum: at(maximumIndex),
    minimum: at(minimumIndex),
  });
}
