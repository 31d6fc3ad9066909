// Line loadability versus length by the voltage-drop and stability-margin method, with the thermal limit, in multiples of SIL.
import { Complex } from './complex.ts';
import { SolverDomainError, assertFiniteResult, optionalNumber, requireArray, requireNumber, requireObject } from './errors.ts';
import { receivingPowerAtAngleMw, steadyStateLimitAngleRad } from './curves.ts';
import { noseLoadMultiple, receivingVoltageRoots } from './solutions.ts';
import { LENGTH_RANGE_KM, VOLTAGE_RANGE_KV, lineAbcd, resolveLineConstants, type LinePerKmInput } from './lineModels.ts';
import { multiplyAbcd, seriesImpedanceAbcd, type AbcdMatrix } from './twoPort.ts';
import { SQRT3, kvToV, radToDeg } from './units.ts';

export type LoadabilityLimit = 'thermal' | 'voltage-drop' | 'stability';

export interface LoadabilityPoint {
  lengthKm: number;
  electricalLengthDeg: number;
  thermalLimitMw: number;
  voltageDropLimitMw: number;
  stabilityLimitMw: number;
  /** Angle between the sending and receiving EMFs at the stability-limited power (44.4 deg for a 30 % margin on a lossless system). */
  stabilityLimitAngleDeg: number;
  loadabilityMw: number;
  /** Loadability in multiples of the surge impedance loading. */
  loadabilitySil: number;
  limitedBy: LoadabilityLimit;
}

export interface LoadabilityCurve {
  model: 'distributed';
  nominalVoltageKv: number;
  surgeImpedanceLoadingMw: number;
  terminalReactanceOhm: { sending: number; receiving: number };
  criteria: { voltageDropPercent: number; stabilityMarginPercent: number };
  points: LoadabilityPoint[];
}

const HINT =
  'Pass the per-km constants, nominalVoltageKv, lengthsKm: [...], thermalLimitMw (or thermalLimitA), and optionally sendingShortCircuitKa, receivingShortCircuitKa, voltageDropPercent, stabilityMarginPercent.';

/** Largest x in [0, upper] for which feasible(x) holds, assuming feasibility is lost once and for all as x grows. */
function largestFeasible(feasible: (value: number) => boolean, upper: number): number {
  if (feasible(upper)) return upper;
  let lower = 0;
  let high = upper;
  for (let iteration = 0; iteration < 100 && high - lower > 1e-9 * upper; iteration += 1) {
    const middle = (lower + high) / 2;
    if (feasible(middle)) lower = middle;
    else high = middle;
  }
  return lower;
}

/**
 * Loadability of a line versus length after Dunlop, Gutman and Marchenko (IEEE Trans. PAS-98, 1979). Our reading of the method:
 * the line sits between a sending system and a receiving system, each a reactance from its short-circuit current (50 kA by default,
 * the published assumption, from memory). The sending terminal is held at 1.0 pu and the line delivers P at unity power factor to the
 * receiving terminal. P is limited by (a) the line voltage drop (|Vs| - |Vr|) / |Vs| (5 %), (b) the steady-state stability margin
 * (Pmax - P) / Pmax (30 %) of the whole system between the sending and receiving EMFs that this operating point implies, and (c) the
 * thermal limit.
 */
export function lineLoadability(
  options: LinePerKmInput & {
    nominalVoltageKv: number;
    lengthsKm: number[];
    thermalLimitMw?: number;
    thermalLimitA?: number;
    sendingShortCircuitKa?: number;
    receivingShortCircuitKa?: number;
    voltageDropPercent?: number;
    stabilityMarginPercent?: number;
  },
): LoadabilityCurve {
  const record = requireObject('options', options, HINT);
  const constants = resolveLineConstants(record);
  const nominalVoltageKv = requireNumber('nominalVoltageKv', record.nominalVoltageKv, VOLTAGE_RANGE_KV, HINT);
  const lengthsKm = requireArray('lengthsKm', record.lengthsKm, 1, HINT).map((length, index) => requireNumber(`lengthsKm[${index}]`, length, LENGTH_RANGE_KM, HINT));
  const nominalV = kvToV(nominalVoltageKv);
  let thermalLimitMw: number;
  if (record.thermalLimitMw !== undefined) {
    thermalLimitMw = requireNumber('thermalLimitMw', record.thermalLimitMw, { min: 0, max: 1e5, minInclusive: false, unit: 'MW' }, HINT);
  } else if (record.thermalLimitA !== undefined) {
    thermalLimitMw = (SQRT3 * nominalV * requireNumber('thermalLimitA', record.thermalLimitA, { min: 0, max: 1e5, minInclusive: false, unit: 'A' }, HINT)) / 1e6;
  } else {
    throw new SolverDomainError({ code: 'MISSING_QUANTITY', quantity: 'thermalLimitMw (or thermalLimitA)', value: null, allowedRange: '(0, 100000] MW', hint: HINT });
  }
  const shortCircuitRange = { min: 0, max: 1000, minInclusive: false, unit: 'kA' } as const;
  const terminalHint = 'Short-circuit current of the system at the line terminal; the published method used 50 kA at both ends (from memory).';
  const sendingKa = optionalNumber('sendingShortCircuitKa', record.sendingShortCircuitKa, 50, shortCircuitRange, terminalHint);
  const receivingKa = optionalNumber('receivingShortCircuitKa', record.receivingShortCircuitKa, 50, shortCircuitRange, terminalHint);
  const voltageDropPercent = optionalNumber('voltageDropPercent', record.voltageDropPercent, 5, { min: 0, max: 50, minInclusive: false, unit: '%' }, 'The published criterion is 5 %.');
  const stabilityMarginPercent = optionalNumber('stabilityMarginPercent', record.stabilityMarginPercent, 30, { min: 0, max: 90, unit: '%' }, 'The published criterion is 30 %.');
  const sendingReactanceOhm = nominalV / (SQRT3 * sendingKa * 1e3);
  const receivingReactanceOhm = nominalV / (SQRT3 * receivingKa * 1e3);
  const sendingSystem = seriesImpedanceAbcd(new Complex(0, sendingReactanceOhm));
  const receivingSystem = seriesImpedanceAbcd(new Complex(0, receivingReactanceOhm));
  const losslessSurgeImpedanceOhm = Math.sqrt(constants.perKm.seriesReactanceOhmPerKm / (constants.perKm.shuntSusceptanceUsPerKm * 1e-6));
  const silMw = (nominalV * nominalV) / losslessSurgeImpedanceOhm / 1e6;

  const points = lengthsKm.map((lengthKm) => {
    const line = lineAbcd('distributed', constants.seriesImpedanceOhmPerM, constants.shuntAdmittanceSPerM, lengthKm * 1e3);
    const wholeSystem = multiplyAbcd(multiplyAbcd(sendingSystem, line), receivingSystem);
    const noseMw = (noseLoadMultiple(line, nominalV, new Complex(1e6, 0)) * (1 - 1e-9));
    const stateAt = (pMw: number) => operatingState(line, wholeSystem, sendingReactanceOhm, receivingReactanceOhm, nominalV, pMw);
    const voltageDropLimitMw = largestFeasible((pMw) => stateAt(pMw).voltageDrop <= voltageDropPercent / 100, noseMw);
    const stabilityLimitMw = largestFeasible((pMw) => stateAt(pMw).stabilityMargin >= stabilityMarginPercent / 100, noseMw);
    const candidates: Array<[LoadabilityLimit, number]> = [
      ['thermal', thermalLimitMw],
      ['voltage-drop', voltageDropLimitMw],
      ['stability', stabilityLimitMw],
    ];
    const [limitedBy, loadabilityMw] = candidates.reduce((smallest, candidate) => (candidate[1] < smallest[1] ? candidate : smallest));
    return {
      lengthKm,
      electricalLengthDeg: radToDeg(constants.shuntAdmittanceSPerM.mul(constants.seriesImpedanceOhmPerM).sqrt().im * lengthKm * 1e3),
      thermalLimitMw,
      voltageDropLimitMw,
      stabilityLimitMw,
      stabilityLimitAngleDeg: stateAt(stabilityLimitMw).emfAngleDeg,
      loadabilityMw,
      loadabilitySil: loadabilityMw / silMw,
      limitedBy,
    };
  });
  return assertFiniteResult('lineLoadability', {
    model: 'distributed' as const,
    nominalVoltageKv,
    surgeImpedanceLoadingMw: silMw,
    terminalReactanceOhm: { sending: sendingReactanceOhm, receiving: receivingReactanceOhm },
    criteria: { voltageDropPercent, stabilityMarginPercent },
    points,
  });
}

/** Receiving voltage, voltage drop, EMFs and stability margin when the line delivers pMw at unity power factor from a 1.0 pu sending terminal. */
function operatingState(
  line: AbcdMatrix,
  wholeSystem: AbcdMatrix,
  sendingReactanceOhm: number,
  receivingReactanceOhm: number,
  nominalV: number,
  pMw: number,
) {
  // Line-to-line phasors throughout, so "currents" are sqrt(3) times line currents; powers come out three-phase.
  const load = new Complex(pMw * 1e6, 0);
  const roots = receivingVoltageRoots(line, nominalV, load);
  if (roots === null) return { voltageDrop: 1, stabilityMargin: 0, emfAngleDeg: 90 };
  const receivingTerminal = new Complex(roots.upper, 0);
  const receivingCurrent = load.div(receivingTerminal).conjugate();
  const sendingTerminal = line.A.mul(receivingTerminal).add(line.B.mul(receivingCurrent));
  const sendingCurrent = line.C.mul(receivingTerminal).add(line.D.mul(receivingCurrent));
  const receivingEmf = receivingTerminal.sub(receivingCurrent.mul(new Complex(0, receivingReactanceOhm)));
  const sendingEmf = sendingTerminal.add(sendingCurrent.mul(new Complex(0, sendingReactanceOhm)));
  const systemMaxMw = receivingPowerAtAngleMw(wholeSystem, sendingEmf.abs() / 1e3, receivingEmf.abs() / 1e3, steadyStateLimitAngleRad(wholeSystem));
  return {
    voltageDrop: 1 - roots.upper / nominalV,
    stabilityMargin: 1 - pMw / systemMaxMw,
    emfAngleDeg: radToDeg(sendingEmf.arg() - receivingEmf.arg()),
  };
}
