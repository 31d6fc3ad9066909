// Line loadability versus length between two terminal systems: thermal, voltage-band and stability-margin limits, in multiples of SIL.
import { Complex } from './complex.ts';
import { SolverDomainError, assertFiniteResult, optionalNumber, requireArray, requireNumber, requireObject } from './errors.ts';
import { receivingPowerAtAngleMw, stableAngleForPowerRad, steadyStateLimitAngleRad } from './curves.ts';
import { LENGTH_RANGE_KM, VOLTAGE_RANGE_KV, lineAbcd, lineCharacteristics, resolveLineConstants, type LinePerKmInput } from './lineModels.ts';
import { multiplyAbcd, seriesImpedanceAbcd, type AbcdMatrix } from './twoPort.ts';
import { kmToM, kvToV, radToDeg, SQRT3, varToMvar, wToMw } from './units.ts';

export type LoadabilityLimit = 'thermal' | 'voltage-drop' | 'voltage-rise' | 'stability';

export interface LoadabilityPoint {
  lengthKm: number;
  electricalLengthDeg: number;
  thermalLimitMw: number;
  /** Largest transfer with no voltage along the line below 1 - band (pu of nominal). */
  voltageDropLimitMw: number;
  stabilityLimitMw: number;
  /** Angle between the system EMFs at the stability-limited power (44.4 deg for a 30 % margin on a lossless system). */
  stabilityLimitAngleDeg: number;
  loadabilityMw: number;
  /** Loadability in multiples of the surge impedance loading. */
  loadabilitySil: number;
  limitedBy: LoadabilityLimit;
  /** The operating point at the loadability: angles, terminal voltages and the extremes along the line. */
  systemAngleDeg: number;
  lineAngleDeg: number;
  sendingVoltagePu: number;
  receivingVoltagePu: number;
  minimumVoltagePu: number;
  minimumVoltageAtKm: number;
  maximumVoltagePu: number;
  maximumVoltageAtKm: number;
  /** Reactive power the line delivers into the receiving terminal (negative: the receiving system supplies it to the line). */
  receivingQMvar: number;
  warnings: string[];
}

export interface LoadabilityCurve {
  model: 'distributed';
  method: string;
  nominalVoltageKv: number;
  surgeImpedanceLoadingMw: number;
  terminalReactanceOhm: { sending: number; receiving: number };
  systemEmfPu: number;
  criteria: { voltageDropPercent: number; stabilityMarginPercent: number };
  points: LoadabilityPoint[];
  warnings: string[];
}

const HINT =
  'Pass the per-km constants, nominalVoltageKv, lengthsKm: [...], thermalLimitMw (or thermalLimitA), and optionally sendingShortCircuitKa, receivingShortCircuitKa, systemEmfPu, voltageDropPercent, stabilityMarginPercent.';

const METHOD =
  'Two terminal systems (equal EMFs behind their short-circuit reactances) joined by the exact distributed line; the transfer grows with the angle between the EMFs until the thermal limit, a voltage along the line leaving the band, or the steady-state stability margin between the EMFs binds.';

/** Voltage samples per line for the lowest and highest voltage along it; the extremes of a uniform line are smooth, so 64 intervals resolve them well. */
const PROFILE_INTERVALS = 64;

/** Boundary of a property that holds at `low` and fails at `high` (bisection on the angle). */
function boundary(holds: (angleRad: number) => boolean, low: number, high: number): number {
  let lower = low;
  let upper = high;
  for (let iteration = 0; iteration < 60 && upper - lower > 1e-12; iteration += 1) {
    const middle = (lower + upper) / 2;
    if (holds(middle)) lower = middle;
    else upper = middle;
  }
  return lower;
}

/**
 * Loadability of a line versus length after St. Clair (1953) and Dunlop, Gutman and Marchenko (IEEE Trans. PAS-98, 1979). Our
 * reading of the method: the line joins a sending and a receiving system, each an EMF of systemEmfPu behind the reactance of its
 * short-circuit current (50 kA by default, the published assumption, from memory). The transfer is raised by the angle between the
 * EMFs and limited by (a) the thermal limit, (b) the voltage criterion: no voltage along the line below 1 - band and neither line
 * terminal outside 1 +/- band (pu of nominal), and (c) the steady-state stability margin (Pmax - P) / Pmax between the EMFs (30 %).
 */
export function lineLoadability(
  options: LinePerKmInput & {
    nominalVoltageKv: number;
    lengthsKm: number[];
    thermalLimitMw?: number;
    thermalLimitA?: number;
    sendingShortCircuitKa?: number;
    receivingShortCircuitKa?: number;
    systemEmfPu?: number;
    voltageDropPercent?: number;
    stabilityMarginPercent?: number;
  },
): LoadabilityCurve {
  const record = requireObject('options', options, HINT);
  const constants = resolveLineConstants(record);
  const nominalVoltageKv = requireNumber('nominalVoltageKv', record.nominalVoltageKv, VOLTAGE_RANGE_KV, HINT);
  const lengthsKm = requireArray('lengthsKm', record.lengthsKm, 1, HINT).map((length, index) =>
    requireNumber(`lengthsKm[${index}]`, length, LENGTH_RANGE_KM, HINT),
  );
  const nominalV = kvToV(nominalVoltageKv);
  let thermalLimitMw: number;
  if (record.thermalLimitMw !== undefined) {
    thermalLimitMw = requireNumber('thermalLimitMw', record.thermalLimitMw, { min: 0, max: 1e5, minInclusive: false, unit: 'MW' }, HINT);
  } else if (record.thermalLimitA !== undefined) {
    thermalLimitMw = wToMw(
      SQRT3 * nominalV * requireNumber('thermalLimitA', record.thermalLimitA, { min: 0, max: 1e5, minInclusive: false, unit: 'A' }, HINT),
    );
  } else {
    throw new SolverDomainError({
      code: 'missing-quantity',
      quantity: 'thermalLimitMw (or thermalLimitA)',
      value: null,
      allowedRange: '(0, 100000] MW',
      hint: HINT,
    });
  }
  const shortCircuitRange = { min: 0, max: 1000, minInclusive: false, unit: 'kA' } as const;
  const terminalHint = 'Short-circuit current of the system at the line terminal; the published method used 50 kA at both ends (from memory).';
  const sendingKa = optionalNumber('sendingShortCircuitKa', record.sendingShortCircuitKa, 50, shortCircuitRange, terminalHint);
  const receivingKa = optionalNumber('receivingShortCircuitKa', record.receivingShortCircuitKa, 50, shortCircuitRange, terminalHint);
  const systemEmfPu = optionalNumber(
    'systemEmfPu',
    record.systemEmfPu,
    1,
    { min: 0.8, max: 1.2 },
    'EMF magnitude of both terminal systems in pu of nominal voltage; 1.0 in the published method.',
  );
  const voltageDropPercent = optionalNumber(
    'voltageDropPercent',
    record.voltageDropPercent,
    5,
    { min: 0, max: 50, minInclusive: false, unit: '%' },
    'Half-width of the voltage band in % of nominal; the published criterion is 5 %.',
  );
  const stabilityMarginPercent = optionalNumber(
    'stabilityMarginPercent',
    record.stabilityMarginPercent,
    30,
    { min: 0, max: 90, unit: '%' },
    'The published criterion is 30 %.',
  );
  const band = voltageDropPercent / 100;
  const sendingReactanceOhm = nominalV / (SQRT3 * sendingKa * 1e3);
  const receivingReactanceOhm = nominalV / (SQRT3 * receivingKa * 1e3);
  const sendingSystem = seriesImpedanceAbcd(new Complex(0, sendingReactanceOhm));
  const receivingSystem = seriesImpedanceAbcd(new Complex(0, receivingReactanceOhm));
  const losslessSurgeImpedanceOhm = Math.sqrt(constants.perKm.seriesReactanceOhmPerKm / (constants.perKm.shuntSusceptanceUsPerKm * 1e-6));
  const silMw = wToMw((nominalV * nominalV) / losslessSurgeImpedanceOhm);
  const emfKv = systemEmfPu * nominalVoltageKv;
  const lineWarnings = lineCharacteristics({ ...(record as unknown as LinePerKmInput), lengthKm: 1, nominalVoltageKv }).warnings;

  const points = lengthsKm.map((lengthKm): LoadabilityPoint => {
    const lengthM = kmToM(lengthKm);
    const line = lineAbcd('distributed', constants.seriesImpedanceOhmPerM, constants.shuntAdmittanceSPerM, lengthM);
    const wholeSystem = multiplyAbcd(multiplyAbcd(sendingSystem, line), receivingSystem);
    const partials = Array.from({ length: PROFILE_INTERVALS + 1 }, (_, index) =>
      lineAbcd('distributed', constants.seriesImpedanceOhmPerM, constants.shuntAdmittanceSPerM, (lengthM * index) / PROFILE_INTERVALS),
    );
    const stateAt = (angleRad: number) =>
      operatingState(line, wholeSystem, partials, lengthKm, receivingReactanceOhm, emfKv * 1e3, angleRad, nominalV);
    const limitAngle = steadyStateLimitAngleRad(wholeSystem);
    const maximumMw = receivingPowerAtAngleMw(wholeSystem, emfKv, emfKv, limitAngle);
    const angleForMw = (pMw: number) => (pMw >= maximumMw ? limitAngle : stableAngleForPowerRad(wholeSystem, emfKv, emfKv, pMw));
    const stabilityAngle = angleForMw((1 - stabilityMarginPercent / 100) * maximumMw);
    const thermalAngle = angleForMw(thermalLimitMw);
    const aboveFloor = (angleRad: number) => stateAt(angleRad).minimumPu >= 1 - band;
    const voltageAngle = aboveFloor(limitAngle) ? limitAngle : aboveFloor(0) ? boundary(aboveFloor, 0, limitAngle) : 0;
    // Terminal voltages fall as the transfer grows; on a long line at light load they can start above the band.
    const terminalsBelowCeiling = (angleRad: number) => Math.max(stateAt(angleRad).sendingPu, stateAt(angleRad).receivingPu) <= 1 + band;
    const candidates: Array<[LoadabilityLimit, number]> = [
      ['thermal', thermalAngle],
      ['voltage-drop', voltageAngle],
      ['stability', stabilityAngle],
    ];
    let [limitedBy, operatingAngle] = candidates.reduce((smallest, candidate) => (candidate[1] < smallest[1] ? candidate : smallest));
    const warnings: string[] = [];
    if (!terminalsBelowCeiling(operatingAngle)) {
      limitedBy = 'voltage-rise';
      warnings.push(
        `At ${lengthKm} km no transfer within the limits keeps both line terminals at or below ${(1 + band).toFixed(3)} pu: the uncompensated line needs shunt reactors.`,
      );
    }
    const state = stateAt(operatingAngle);
    const loadabilityMw = limitedBy === 'voltage-rise' ? 0 : state.pMw;
    if (limitedBy !== 'voltage-rise' && state.maximumPu > 1 + band) {
      warnings.push(
        `At the loadability of the ${lengthKm} km line the voltage along it peaks at ${state.maximumPu.toFixed(3)} pu (${state.maximumAtKm.toFixed(0)} km from the sending end), above the band: the published criterion limits only the drop.`,
      );
    }
    return {
      lengthKm,
      electricalLengthDeg: radToDeg(constants.shuntAdmittanceSPerM.mul(constants.seriesImpedanceOhmPerM).sqrt().im * lengthM),
      thermalLimitMw,
      voltageDropLimitMw: stateAt(voltageAngle).pMw,
      stabilityLimitMw: stateAt(stabilityAngle).pMw,
      stabilityLimitAngleDeg: radToDeg(stabilityAngle),
      loadabilityMw,
      loadabilitySil: loadabilityMw / silMw,
      limitedBy,
      systemAngleDeg: radToDeg(operatingAngle),
      lineAngleDeg: state.lineAngleDeg,
      sendingVoltagePu: state.sendingPu,
      receivingVoltagePu: state.receivingPu,
      minimumVoltagePu: state.minimumPu,
      minimumVoltageAtKm: state.minimumAtKm,
      maximumVoltagePu: state.maximumPu,
      maximumVoltageAtKm: state.maximumAtKm,
      receivingQMvar: state.receivingQMvar,
      warnings,
    };
  });
  return assertFiniteResult('lineLoadability', {
    model: 'distributed' as const,
    method: METHOD,
    nominalVoltageKv,
    surgeImpedanceLoadingMw: silMw,
    terminalReactanceOhm: { sending: sendingReactanceOhm, receiving: receivingReactanceOhm },
    systemEmfPu,
    criteria: { voltageDropPercent, stabilityMarginPercent },
    points,
    warnings: lineWarnings,
  });
}

/** Terminal and along-line voltages when the sending EMF leads the receiving EMF (both emfV, line-to-line) by angleRad. */
function operatingState(
  line: AbcdMatrix,
  wholeSystem: AbcdMatrix,
  partials: AbcdMatrix[],
  lengthKm: number,
  receivingReactanceOhm: number,
  emfV: number,
  angleRad: number,
  nominalV: number,
) {
  // Line-to-line phasors throughout, so "currents" are sqrt(3) times line currents; powers come out three-phase.
  const receivingEmf = new Complex(emfV, 0);
  const sendingEmf = new Complex(emfV * Math.cos(angleRad), emfV * Math.sin(angleRad));
  const receivingCurrent = sendingEmf.sub(wholeSystem.A.mul(receivingEmf)).div(wholeSystem.B);
  const receivingTerminal = receivingEmf.add(receivingCurrent.mul(new Complex(0, receivingReactanceOhm)));
  const sendingTerminal = line.A.mul(receivingTerminal).add(line.B.mul(receivingCurrent));
  const sendingCurrent = line.C.mul(receivingTerminal).add(line.D.mul(receivingCurrent));
  let minimumPu = Number.POSITIVE_INFINITY;
  let maximumPu = 0;
  let minimumAtKm = 0;
  let maximumAtKm = 0;
  const intervals = partials.length - 1;
  partials.forEach((partial, index) => {
    // V(d) = D(d) Vs - B(d) Is, the inverse of the partial line's ABCD.
    const voltagePu = partial.D.mul(sendingTerminal).sub(partial.B.mul(sendingCurrent)).abs() / nominalV;
    const atKm = (lengthKm * index) / intervals;
    if (voltagePu < minimumPu) [minimumPu, minimumAtKm] = [voltagePu, atKm];
    if (voltagePu > maximumPu) [maximumPu, maximumAtKm] = [voltagePu, atKm];
  });
  const delivered = receivingTerminal.mul(receivingCurrent.conjugate());
  return {
    pMw: wToMw(delivered.re),
    receivingQMvar: varToMvar(delivered.im),
    sendingPu: sendingTerminal.abs() / nominalV,
    receivingPu: receivingTerminal.abs() / nominalV,
    lineAngleDeg: radToDeg(sendingTerminal.arg() - receivingTerminal.arg()),
    minimumPu,
    maximumPu,
    minimumAtKm,
    maximumAtKm,
  };
}
