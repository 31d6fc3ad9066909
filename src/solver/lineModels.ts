// Line models from per-km constants: short, nominal pi and exact distributed two-ports, and the line's wave characteristics.
import { Complex, toPlain, type ComplexValue } from './complex.ts';
import { SolverDomainError, assertFiniteResult, optionalNumber, requireChoice, requireNumber, requireObject } from './errors.ts';
import { abcdToPlain, type AbcdMatrix, type LineModelName, type LineSectionTwoPort, type PerKmConstants } from './twoPort.ts';
import { angularFrequency, kmToM, kvToV, phaseVoltsFromLineKv, radToDeg, SPEED_OF_LIGHT_M_PER_S, varToMvar, wToMw } from './units.ts';

/** Per-km line constants as a study gives them; reactance or inductance, susceptance or capacitance. */
export interface LinePerKmInput {
  frequencyHz: number;
  seriesResistanceOhmPerKm: number;
  seriesReactanceOhmPerKm?: number;
  seriesInductanceMhPerKm?: number;
  shuntConductanceUsPerKm?: number;
  shuntSusceptanceUsPerKm?: number;
  shuntCapacitanceNfPerKm?: number;
  /** Share of the line's charging susceptance cancelled by uniformly distributed shunt reactors (0 to below 1); default 0. */
  distributedShuntCompensationDegree?: number;
}

export const LENGTH_RANGE_KM = { min: 0, max: 5000, minInclusive: false, unit: 'km' } as const;
export const FREQUENCY_RANGE_HZ = { min: 0, max: 1000, minInclusive: false, unit: 'Hz' } as const;
export const VOLTAGE_RANGE_KV = { min: 0, max: 2000, minInclusive: false, unit: 'kV' } as const;

const PER_KM_HINT =
  'Give frequencyHz, seriesResistanceOhmPerKm, seriesReactanceOhmPerKm (or seriesInductanceMhPerKm) and shuntSusceptanceUsPerKm (or shuntCapacitanceNfPerKm) for one phase, positive sequence.';

/** Picks one of two equivalent inputs; when both are given they must describe the same quantity. */
function eitherOf(
  names: [string, string],
  values: [unknown, unknown],
  toFirstUnit: (second: number) => number,
  range: { min: number; max: number; minInclusive?: boolean; unit: string },
  secondUnit: string,
): number {
  const [firstName, secondName] = names;
  const [firstValue, secondValue] = values;
  if (firstValue === undefined && secondValue === undefined) {
    throw new SolverDomainError({
      code: 'missing-quantity',
      quantity: `${firstName} (or ${secondName})`,
      value: null,
      allowedRange: `[${range.min}, ${range.max}] ${range.unit}`,
      hint: PER_KM_HINT,
    });
  }
  const first = firstValue === undefined ? undefined : requireNumber(firstName, firstValue, range, PER_KM_HINT);
  const second =
    secondValue === undefined
      ? undefined
      : toFirstUnit(requireNumber(secondName, secondValue, { min: 0, max: Number.MAX_VALUE, unit: secondUnit }, PER_KM_HINT));
  if (first !== undefined && second !== undefined) {
    if (Math.abs(first - second) > 1e-9 * Math.max(Math.abs(first), Math.abs(second))) {
      throw new SolverDomainError({
        code: 'inconsistent-quantities',
        quantity: firstName,
        value: first,
        allowedRange: `${second} ${range.unit} (the value implied by ${secondName} at this frequency)`,
        hint: `Give either ${firstName} or ${secondName}, or make them agree.`,
      });
    }
  }
  const resolved = first ?? second;
  return requireNumber(firstName, resolved, range, PER_KM_HINT);
}

/** Validated per-km constants in practitioner units plus the SI per-metre impedance and admittance. */
export interface ResolvedLineConstants {
  frequencyHz: number;
  distributedShuntCompensationDegree: number;
  perKm: PerKmConstants;
  seriesImpedanceOhmPerM: Complex;
  shuntAdmittanceSPerM: Complex;
}

export function resolveLineConstants(input: Record<string, unknown>): ResolvedLineConstants {
  const frequencyHz = requireNumber('frequencyHz', input.frequencyHz, FREQUENCY_RANGE_HZ, 'Power frequency, usually 50 or 60 Hz.');
  const omega = angularFrequency(frequencyHz);
  const seriesResistanceOhmPerKm = requireNumber(
    'seriesResistanceOhmPerKm',
    input.seriesResistanceOhmPerKm,
    { min: 0, max: 100, unit: 'ohm/km' },
    PER_KM_HINT,
  );
  const seriesReactanceOhmPerKm = eitherOf(
    ['seriesReactanceOhmPerKm', 'seriesInductanceMhPerKm'],
    [input.seriesReactanceOhmPerKm, input.seriesInductanceMhPerKm],
    (mhPerKm) => omega * mhPerKm * 1e-3,
    { min: 0, max: 100, minInclusive: false, unit: 'ohm/km' },
    'mH/km',
  );
  const shuntSusceptanceUsPerKm = eitherOf(
    ['shuntSusceptanceUsPerKm', 'shuntCapacitanceNfPerKm'],
    [input.shuntSusceptanceUsPerKm, input.shuntCapacitanceNfPerKm],
    (nfPerKm) => omega * nfPerKm * 1e-9 * 1e6,
    { min: 0, max: 1000, unit: 'uS/km' },
    'nF/km',
  );
  const shuntConductanceUsPerKm = optionalNumber(
    'shuntConductanceUsPerKm',
    input.shuntConductanceUsPerKm,
    0,
    { min: 0, max: 100, unit: 'uS/km' },
    PER_KM_HINT,
  );
  const distributedShuntCompensationDegree = optionalNumber(
    'distributedShuntCompensationDegree',
    input.distributedShuntCompensationDegree,
    0,
    { min: 0, max: 1, maxInclusive: false },
    'Share of the charging susceptance cancelled by shunt reactors spread uniformly along the line; 1 would cancel it all.',
  );
  // The reactors act on the susceptance per km, so the stored constants are the compensated ones (beta' = beta sqrt(1 - k)).
  const effectiveSusceptanceUsPerKm = shuntSusceptanceUsPerKm * (1 - distributedShuntCompensationDegree);
  return {
    frequencyHz,
    distributedShuntCompensationDegree,
    perKm: { seriesResistanceOhmPerKm, seriesReactanceOhmPerKm, shuntConductanceUsPerKm, shuntSusceptanceUsPerKm: effectiveSusceptanceUsPerKm },
    seriesImpedanceOhmPerM: new Complex(seriesResistanceOhmPerKm / 1e3, seriesReactanceOhmPerKm / 1e3),
    shuntAdmittanceSPerM: new Complex(shuntConductanceUsPerKm * 1e-9, effectiveSusceptanceUsPerKm * 1e-9),
  };
}

export function perKmToSi(perKm: PerKmConstants): { z: Complex; y: Complex } {
  return {
    z: new Complex(perKm.seriesResistanceOhmPerKm / 1e3, perKm.seriesReactanceOhmPerKm / 1e3),
    y: new Complex(perKm.shuntConductanceUsPerKm * 1e-9, perKm.shuntSusceptanceUsPerKm * 1e-9),
  };
}

function requirePositiveSusceptance(model: LineModelName, perKm: PerKmConstants): void {
  if (model === 'distributed' && !(perKm.shuntSusceptanceUsPerKm > 0)) {
    throw new SolverDomainError({
      code: 'out-of-range',
      quantity: 'shuntSusceptanceUsPerKm',
      value: perKm.shuntSusceptanceUsPerKm,
      allowedRange: '(0, 1000] uS/km for the distributed model',
      hint: "The distributed model needs the line's shunt susceptance; use model 'short' to neglect it.",
    });
  }
}

/** Phase velocity omega / beta as a multiple of the speed of light, or null when the line has no shunt susceptance. */
function velocityToLightRatio(constants: ResolvedLineConstants): number | null {
  const betaPerM = constants.seriesImpedanceOhmPerM.mul(constants.shuntAdmittanceSPerM).sqrt().im;
  return betaPerM > 0 ? angularFrequency(constants.frequencyHz) / betaPerM / SPEED_OF_LIGHT_M_PER_S : null;
}

/**
 * Waves on an overhead line travel a little slower than light (L C >= mu0 eps0 for conductors in air); faster means the per-km
 * constants do not belong together, often reactance and susceptance rounded from different tables or taken at different frequencies.
 */
function lineDataWarnings(ratio: number | null): string[] {
  if (ratio === null || !(ratio > 1)) return [];
  return [
    `The line constants imply waves travelling at ${ratio.toFixed(3)} times the speed of light, faster than light: the series reactance and shunt susceptance per km do not belong together (check the data source, units and frequency).`,
  ];
}

/** ABCD of a uniform line of the given length (metres) under one model; used for whole sections and for points inside them. */
export function lineAbcd(model: LineModelName, z: Complex, y: Complex, lengthM: number): AbcdMatrix {
  const seriesImpedance = z.mul(lengthM);
  const shuntAdmittance = y.mul(lengthM);
  if (model === 'short') {
    return { A: new Complex(1, 0), B: seriesImpedance, C: new Complex(0, 0), D: new Complex(1, 0) };
  }
  if (model === 'nominal-pi') {
    const halfZy = seriesImpedance.mul(shuntAdmittance).div(2);
    const A = halfZy.add(1);
    return { A, B: seriesImpedance, C: shuntAdmittance.mul(halfZy.div(2).add(1)), D: A };
  }
  const gammaLength = z.mul(y).sqrt().mul(lengthM);
  const surgeImpedance = z.div(y).sqrt();
  const cosh = gammaLength.cosh();
  const sinh = gammaLength.sinh();
  return { A: cosh, B: surgeImpedance.mul(sinh), C: sinh.div(surgeImpedance), D: cosh };
}

export interface LineModelOptions extends LinePerKmInput {
  lengthKm: number;
  model?: LineModelName;
  label?: string;
}

const MODELS: readonly LineModelName[] = ['distributed', 'nominal-pi', 'short'];

/** A line section as a two-port under the chosen model (default: exact distributed). */
export function lineModel(options: LineModelOptions): LineSectionTwoPort {
  const record = requireObject('options', options, PER_KM_HINT);
  const constants = resolveLineConstants(record);
  const lengthKm = requireNumber('lengthKm', record.lengthKm, LENGTH_RANGE_KM, 'Route length of this section.');
  const model = record.model === undefined ? 'distributed' : requireChoice('model', record.model, MODELS, 'Choose the line model.');
  requirePositiveSusceptance(model, constants.perKm);
  const matrix = lineAbcd(model, constants.seriesImpedanceOhmPerM, constants.shuntAdmittanceSPerM, kmToM(lengthKm));
  const label = typeof record.label === 'string' && record.label !== '' ? record.label : `line ${lengthKm} km`;
  return assertFiniteResult('lineModel', {
    kind: 'line-section' as const,
    model,
    label,
    lengthKm,
    frequencyHz: constants.frequencyHz,
    perKm: constants.perKm,
    distributedShuntCompensationDegree: constants.distributedShuntCompensationDegree,
    warnings: lineDataWarnings(velocityToLightRatio(constants)),
    ...abcdToPlain(matrix),
  });
}

/** The same line cut to another length, e.g. halves around a mid-line series capacitor. */
export function resizedSection(section: LineSectionTwoPort, lengthKm: number, label: string): LineSectionTwoPort {
  const { z, y } = perKmToSi(section.perKm);
  return {
    ...section,
    label,
    lengthKm,
    ...abcdToPlain(lineAbcd(section.model, z, y, kmToM(lengthKm))),
  };
}

export interface LineCharacteristics {
  model: 'distributed';
  lengthKm: number;
  frequencyHz: number;
  propagationConstantPerKm: ComplexValue;
  attenuationNeperPerKm: number;
  phaseConstantRadPerKm: number;
  phaseConstantDegPerKm: number;
  surgeImpedanceOhm: ComplexValue;
  surgeImpedanceMagnitudeOhm: number;
  /** sqrt(x / b): the surge impedance with losses neglected, the basis of the surge impedance loading. */
  losslessSurgeImpedanceOhm: number;
  wavelengthKm: number;
  propagationVelocityKmPerS: number;
  /** Propagation velocity over the speed of light; above 1 the data are inconsistent (see warnings). */
  velocityToLightRatio: number;
  electricalLengthDeg: number;
  nominalVoltageKv: number;
  surgeImpedanceLoadingMw: number;
  /** V^2 / |Zc| with the lossy surge impedance, beside the usual lossless SIL. */
  surgeImpedanceLoadingLossyMw: number;
  seriesInductanceMhPerKm: number;
  shuntCapacitanceNfPerKm: number;
  distributedShuntCompensationDegree: number;
  /** Charging current drawn by the whole line's capacitance at nominal phase voltage. */
  chargingCurrentA: number;
  /** Three-phase charging reactive power V^2 * omega * C * length at nominal voltage. */
  chargingMvar: number;
  equivalentPi: { seriesImpedanceOhm: ComplexValue; shuntAdmittanceEachEndS: ComplexValue };
  nominalPi: { seriesImpedanceOhm: ComplexValue; shuntAdmittanceEachEndS: ComplexValue };
  warnings: string[];
}

/** Propagation constant, surge impedance, wavelength, electrical length, SIL, charging and the pi equivalents of a line. */
export function lineCharacteristics(options: LinePerKmInput & { lengthKm: number; nominalVoltageKv: number }): LineCharacteristics {
  const record = requireObject('options', options, PER_KM_HINT);
  const constants = resolveLineConstants(record);
  const lengthKm = requireNumber('lengthKm', record.lengthKm, LENGTH_RANGE_KM, 'Route length of the line.');
  const nominalVoltageKv = requireNumber('nominalVoltageKv', record.nominalVoltageKv, VOLTAGE_RANGE_KV, 'Line-to-line nominal voltage.');
  requirePositiveSusceptance('distributed', constants.perKm);
  const z = constants.seriesImpedanceOhmPerM;
  const y = constants.shuntAdmittanceSPerM;
  const lengthM = kmToM(lengthKm);
  const gammaPerM = z.mul(y).sqrt();
  const surgeImpedance = z.div(y).sqrt();
  const gammaLength = gammaPerM.mul(lengthM);
  const phaseRadPerKm = gammaPerM.im * 1e3;
  const losslessSurgeImpedanceOhm = Math.sqrt(constants.perKm.seriesReactanceOhmPerKm / (constants.perKm.shuntSusceptanceUsPerKm * 1e-6));
  const susceptanceTotalS = constants.perKm.shuntSusceptanceUsPerKm * 1e-6 * lengthKm;
  const voltageV = kvToV(nominalVoltageKv);
  const seriesTotal = z.mul(lengthM);
  const shuntTotal = y.mul(lengthM);
  const equivalentSeries = seriesTotal.mul(gammaLength.sinh().div(gammaLength));
  const equivalentShuntHalf = shuntTotal.div(2).mul(gammaLength.div(2).tanh().div(gammaLength.div(2)));
  const velocityRatio = angularFrequency(constants.frequencyHz) / (phaseRadPerKm / 1e3) / SPEED_OF_LIGHT_M_PER_S;
  return assertFiniteResult('lineCharacteristics', {
    model: 'distributed' as const,
    lengthKm,
    frequencyHz: constants.frequencyHz,
    propagationConstantPerKm: toPlain(gammaPerM.mul(1e3)),
    attenuationNeperPerKm: gammaPerM.re * 1e3,
    phaseConstantRadPerKm: phaseRadPerKm,
    phaseConstantDegPerKm: radToDeg(phaseRadPerKm),
    surgeImpedanceOhm: toPlain(surgeImpedance),
    surgeImpedanceMagnitudeOhm: surgeImpedance.abs(),
    losslessSurgeImpedanceOhm,
    wavelengthKm: (2 * Math.PI) / phaseRadPerKm,
    propagationVelocityKmPerS: angularFrequency(constants.frequencyHz) / phaseRadPerKm,
    velocityToLightRatio: velocityRatio,
    electricalLengthDeg: radToDeg(gammaLength.im),
    nominalVoltageKv,
    surgeImpedanceLoadingMw: wToMw((voltageV * voltageV) / losslessSurgeImpedanceOhm),
    surgeImpedanceLoadingLossyMw: wToMw((voltageV * voltageV) / surgeImpedance.abs()),
    seriesInductanceMhPerKm: (constants.perKm.seriesReactanceOhmPerKm / angularFrequency(constants.frequencyHz)) * 1e3,
    shuntCapacitanceNfPerKm: (constants.perKm.shuntSusceptanceUsPerKm / angularFrequency(constants.frequencyHz)) * 1e3,
    distributedShuntCompensationDegree: constants.distributedShuntCompensationDegree,
    chargingCurrentA: phaseVoltsFromLineKv(nominalVoltageKv) * susceptanceTotalS,
    chargingMvar: varToMvar(voltageV * voltageV * susceptanceTotalS),
    equivalentPi: { seriesImpedanceOhm: toPlain(equivalentSeries), shuntAdmittanceEachEndS: toPlain(equivalentShuntHalf) },
    nominalPi: { seriesImpedanceOhm: toPlain(seriesTotal), shuntAdmittanceEachEndS: toPlain(shuntTotal.div(2)) },
    warnings: lineDataWarnings(velocityRatio),
  });
}

export interface CompensatedLineCharacteristics {
  basis: 'lossless, uniformly distributed compensation';
  seriesCompensationDegree: number;
  shuntCompensationDegree: number;
  /** Zc' = Zc sqrt((1 - k_se) / (1 - k_sh)). */
  surgeImpedanceOhm: number;
  /** SIL' = SIL sqrt((1 - k_sh) / (1 - k_se)). */
  surgeImpedanceLoadingMw: number;
  /** theta' = theta sqrt((1 - k_se)(1 - k_sh)). */
  electricalLengthDeg: number;
  phaseConstantDegPerKm: number;
  uncompensated: { surgeImpedanceOhm: number; surgeImpedanceLoadingMw: number; electricalLengthDeg: number };
}

/**
 * Effective surge impedance, SIL and electrical length of a line with given degrees of series compensation (share of x cancelled)
 * and shunt compensation (share of the charging susceptance cancelled), treated as uniformly distributed on a lossless line: the
 * planning approximation for lumped banks spread along the route.
 */
export function compensatedLineCharacteristics(
  options: LinePerKmInput & { lengthKm: number; nominalVoltageKv: number; seriesCompensationDegree: number; shuntCompensationDegree: number },
): CompensatedLineCharacteristics {
  const record = requireObject('options', options, PER_KM_HINT);
  const constants = resolveLineConstants(record);
  const lengthKm = requireNumber('lengthKm', record.lengthKm, LENGTH_RANGE_KM, 'Route length of the line.');
  const nominalVoltageKv = requireNumber('nominalVoltageKv', record.nominalVoltageKv, VOLTAGE_RANGE_KV, 'Line-to-line nominal voltage.');
  const degreeRange = { min: 0, max: 1, maxInclusive: false } as const;
  const seriesCompensationDegree = requireNumber(
    'seriesCompensationDegree',
    record.seriesCompensationDegree,
    degreeRange,
    'Share of the series reactance cancelled by series capacitors, below 1.',
  );
  const shuntCompensationDegree = requireNumber(
    'shuntCompensationDegree',
    record.shuntCompensationDegree,
    degreeRange,
    'Share of the line charging cancelled by shunt reactors, below 1.',
  );
  requirePositiveSusceptance('distributed', constants.perKm);
  const x = constants.perKm.seriesReactanceOhmPerKm;
  const b = constants.perKm.shuntSusceptanceUsPerKm * 1e-6;
  const zc = Math.sqrt(x / b);
  const betaRadPerKm = Math.sqrt(x * b);
  const voltageV = kvToV(nominalVoltageKv);
  const impedanceFactor = Math.sqrt((1 - seriesCompensationDegree) / (1 - shuntCompensationDegree));
  const lengthFactor = Math.sqrt((1 - seriesCompensationDegree) * (1 - shuntCompensationDegree));
  return assertFiniteResult('compensatedLineCharacteristics', {
    basis: 'lossless, uniformly distributed compensation' as const,
    seriesCompensationDegree,
    shuntCompensationDegree,
    surgeImpedanceOhm: zc * impedanceFactor,
    surgeImpedanceLoadingMw: wToMw((voltageV * voltageV) / (zc * impedanceFactor)),
    electricalLengthDeg: radToDeg(betaRadPerKm * lengthKm * lengthFactor),
    phaseConstantDegPerKm: radToDeg(betaRadPerKm * lengthFactor),
    uncompensated: {
      surgeImpedanceOhm: zc,
      surgeImpedanceLoadingMw: wToMw((voltageV * voltageV) / zc),
      electricalLengthDeg: radToDeg(betaRadPerKm * lengthKm),
    },
  });
}
