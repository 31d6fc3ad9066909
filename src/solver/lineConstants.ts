// Per-km line constants from conductor data and tower geometry of a transposed line with regular-polygon bundles.
import { SolverDomainError, assertFiniteResult, optionalNumber, requireArray, requireNumber, requireObject } from './errors.ts';
import { FREQUENCY_RANGE_HZ, VOLTAGE_RANGE_KV } from './lineModels.ts';
import { angularFrequency, kvToV, phaseVoltsFromLineKv, VACUUM_PERMITTIVITY_F_PER_M, varToMvar } from './units.ts';

export interface ConductorData {
  /** AC resistance of one sub-conductor at operating temperature, from the conductor table. */
  acResistanceOhmPerKm: number;
  /** Geometric mean radius of one sub-conductor. */
  gmrMm: number;
  outsideDiameterMm: number;
}

export interface GeometryOptions {
  frequencyHz: number;
  conductor: ConductorData;
  /** Sub-conductors on a regular polygon with adjacent spacing spacingM; omit for a single conductor per phase. */
  bundle?: { subConductorCount: number; spacingM: number };
  /** Positions of the three phase bundles (centres) on the tower; the line is assumed transposed. */
  phasePositionsM: Array<{ xM: number; yM: number }>;
  /** Line-to-line voltage for the charging current and Mvar per km. */
  voltageKv?: number;
}

export interface LineConstantsFromGeometry {
  frequencyHz: number;
  /** Geometric mean distance between phases, (D12 D23 D31)^(1/3). */
  gmdM: number;
  /** Radius of the circle through the sub-conductor centres. */
  bundleCircumradiusM: number;
  /** Equivalent GMR of the bundle, (n r' R^(n-1))^(1/n), for inductance. */
  bundleGmrM: number;
  /** Equivalent radius of the bundle, (n r R^(n-1))^(1/n), for capacitance. */
  bundleCapacitanceRadiusM: number;
  seriesResistanceOhmPerKm: number;
  seriesInductanceMhPerKm: number;
  seriesReactanceOhmPerKm: number;
  shuntCapacitanceNfPerKm: number;
  shuntSusceptanceUsPerKm: number;
  /** Charging current and three-phase charging Mvar per km at voltageKv, or null when no voltage was given. */
  chargingCurrentAPerKm: number | null;
  chargingMvarPerKm: number | null;
}

const HINT =
  'Pass { frequencyHz, conductor: { acResistanceOhmPerKm, gmrMm, outsideDiameterMm }, bundle?: { subConductorCount, spacingM }, phasePositionsM: [{ xM, yM } x3], voltageKv? }.';

/**
 * Positive-sequence constants of a transposed three-phase line: L = 2e-7 ln(GMD / GMR_b) H/m, C = 2 pi eps0 / ln(GMD / r_b) F/m,
 * earth effect and shield wires neglected (as in the usual textbook treatment).
 */
export function lineConstantsFromGeometry(options: GeometryOptions): LineConstantsFromGeometry {
  const record = requireObject('options', options, HINT);
  const frequencyHz = requireNumber('frequencyHz', record.frequencyHz, FREQUENCY_RANGE_HZ, HINT);
  const conductor = requireObject('conductor', record.conductor, HINT);
  const acResistanceOhmPerKm = requireNumber(
    'conductor.acResistanceOhmPerKm',
    conductor.acResistanceOhmPerKm,
    { min: 0, max: 100, unit: 'ohm/km' },
    HINT,
  );
  const outsideDiameterMm = requireNumber(
    'conductor.outsideDiameterMm',
    conductor.outsideDiameterMm,
    { min: 0, max: 200, minInclusive: false, unit: 'mm' },
    HINT,
  );
  const gmrMm = requireNumber(
    'conductor.gmrMm',
    conductor.gmrMm,
    { min: 0, max: outsideDiameterMm / 2, minInclusive: false, unit: 'mm' },
    'The GMR of a conductor is smaller than its outside radius (about 0.78 r for a solid round conductor).',
  );
  const bundle = record.bundle === undefined ? null : requireObject('bundle', record.bundle, HINT);
  const count = bundle === null ? 1 : requireNumber('bundle.subConductorCount', bundle.subConductorCount, { min: 1, max: 16 }, HINT);
  if (!Number.isInteger(count)) {
    throw new SolverDomainError({
      code: 'out-of-range',
      quantity: 'bundle.subConductorCount',
      value: count,
      allowedRange: 'an integer in [1, 16]',
      hint: HINT,
    });
  }
  const spacingM =
    bundle === null || count === 1
      ? 0
      : requireNumber(
          'bundle.spacingM',
          bundle.spacingM,
          { min: outsideDiameterMm / 1e3, max: 5, unit: 'm' },
          'Spacing between adjacent sub-conductors, larger than their diameter.',
        );
  const positions = requireArray('phasePositionsM', record.phasePositionsM, 3, HINT).map((position, index) => {
    const point = requireObject(`phasePositionsM[${index}]`, position, HINT);
    return {
      x: requireNumber(`phasePositionsM[${index}].xM`, point.xM, { min: -1000, max: 1000, unit: 'm' }, HINT),
      y: requireNumber(`phasePositionsM[${index}].yM`, point.yM, { min: -1000, max: 1000, unit: 'm' }, HINT),
    };
  });
  if (positions.length !== 3) {
    throw new SolverDomainError({
      code: 'out-of-range',
      quantity: 'phasePositionsM.length',
      value: positions.length,
      allowedRange: 'exactly 3',
      hint: HINT,
    });
  }
  const [first, second, third] = positions as [{ x: number; y: number }, { x: number; y: number }, { x: number; y: number }];
  const distances = [
    Math.hypot(first.x - second.x, first.y - second.y),
    Math.hypot(second.x - third.x, second.y - third.y),
    Math.hypot(third.x - first.x, third.y - first.y),
  ];
  const gmdM = Math.cbrt(distances[0]! * distances[1]! * distances[2]!);
  const circumradiusM = count === 1 ? 0 : spacingM / (2 * Math.sin(Math.PI / count));
  const bundleRadius = (subRadiusM: number) => (count === 1 ? subRadiusM : (count * subRadiusM * circumradiusM ** (count - 1)) ** (1 / count));
  const bundleGmrM = bundleRadius(gmrMm / 1e3);
  const bundleCapacitanceRadiusM = bundleRadius(outsideDiameterMm / 2e3);
  if (!(gmdM > circumradiusM + outsideDiameterMm / 2e3) || !(gmdM > bundleCapacitanceRadiusM)) {
    throw new SolverDomainError({
      code: 'out-of-range',
      quantity: 'geometric mean distance between phases (m)',
      value: gmdM,
      allowedRange: `(${circumradiusM + outsideDiameterMm / 2e3}, ∞) m, larger than the bundle size`,
      hint: 'Phase positions must be distinct and farther apart than the bundle dimensions.',
    });
  }
  const omega = angularFrequency(frequencyHz);
  const inductanceHPerM = 2e-7 * Math.log(gmdM / bundleGmrM);
  const capacitanceFPerM = (2 * Math.PI * VACUUM_PERMITTIVITY_F_PER_M) / Math.log(gmdM / bundleCapacitanceRadiusM);
  const susceptanceSPerKm = omega * capacitanceFPerM * 1e3;
  const voltageKv = record.voltageKv === undefined ? null : optionalNumber('voltageKv', record.voltageKv, 0, VOLTAGE_RANGE_KV, HINT);
  return assertFiniteResult('lineConstantsFromGeometry', {
    frequencyHz,
    gmdM,
    bundleCircumradiusM: circumradiusM,
    bundleGmrM,
    bundleCapacitanceRadiusM,
    seriesResistanceOhmPerKm: acResistanceOhmPerKm / count,
    seriesInductanceMhPerKm: inductanceHPerM * 1e6,
    seriesReactanceOhmPerKm: omega * inductanceHPerM * 1e3,
    shuntCapacitanceNfPerKm: capacitanceFPerM * 1e12,
    shuntSusceptanceUsPerKm: susceptanceSPerKm * 1e6,
    chargingCurrentAPerKm: voltageKv === null ? null : phaseVoltsFromLineKv(voltageKv) * susceptanceSPerKm,
    chargingMvarPerKm: voltageKv === null ? null : varToMvar(kvToV(voltageKv) ** 2 * susceptanceSPerKm),
  });
}
