// Positive- and zero-sequence capacitance of a transposed line from tower geometry: method of images, earth wires removed by Kron reduction.
import { SolverDomainError, assertFiniteResult, requireArray, requireNumber, requireObject } from './errors.ts';
import { lineConstantsFromGeometry, type ConductorData } from './lineConstants.ts';
import { FREQUENCY_RANGE_HZ } from './lineModels.ts';
import { VACUUM_PERMITTIVITY_F_PER_M, angularFrequency } from './units.ts';

export interface SequenceCapacitanceOptions {
  frequencyHz: number;
  conductor: ConductorData;
  bundle?: { subConductorCount: number; spacingM: number };
  /** Phase bundle centres; yM is the mean height above ground (tower attachment height less about two thirds of the sag). */
  phasePositionsM: Array<{ xM: number; yM: number }>;
  /** Grounded earth (shield) wires, continuous and bonded at every tower. */
  earthWires?: Array<{ xM: number; yM: number; diameterMm: number }>;
}

export interface SequenceCapacitance {
  frequencyHz: number;
  positiveSequenceNfPerKm: number;
  zeroSequenceNfPerKm: number;
  /** Equivalent network of the transposed line: C0 from each phase to ground and (C1 - C0) / 3 between each pair of phases. */
  phaseToGroundNfPerKm: number;
  interphaseNfPerKm: number;
  positiveSequenceSusceptanceUsPerKm: number;
  zeroSequenceSusceptanceUsPerKm: number;
  bundleCapacitanceRadiusM: number;
  earthWireCount: number;
  /** Transposition-averaged potential coefficients after Kron reduction (m/F, per metre of line): self and mutual. */
  selfPotentialCoefficientMPerF: number;
  mutualPotentialCoefficientMPerF: number;
}

const HINT =
  'Pass { frequencyHz, conductor: { acResistanceOhmPerKm, gmrMm, outsideDiameterMm }, bundle?: { subConductorCount, spacingM }, phasePositionsM: [{ xM, yM } x3] (yM above ground), earthWires?: [{ xM, yM, diameterMm }] }.';
const ELASTANCE_FACTOR = 1 / (2 * Math.PI * VACUUM_PERMITTIVITY_F_PER_M);

interface Wire {
  x: number;
  y: number;
  radiusM: number;
}

/** Maxwell potential coefficient between two wires above a perfectly conducting earth (images at -y). */
function potentialCoefficient(first: Wire, second: Wire, same: boolean): number {
  if (same) return ELASTANCE_FACTOR * Math.log((2 * first.y) / first.radiusM);
  const direct = Math.hypot(first.x - second.x, first.y - second.y);
  const image = Math.hypot(first.x - second.x, first.y + second.y);
  return ELASTANCE_FACTOR * Math.log(image / direct);
}

/**
 * C1 and C0 of a transposed three-phase line: the potential-coefficient matrix by the method of images, grounded earth wires
 * eliminated by Kron reduction (they are at zero potential), transposition by averaging the reduced coefficients, then
 * C1 = 1 / (Ps - Pm) and C0 = 1 / (Ps + 2 Pm).
 */
export function sequenceCapacitanceFromGeometry(options: SequenceCapacitanceOptions): SequenceCapacitance {
  const record = requireObject('options', options, HINT);
  const frequencyHz = requireNumber('frequencyHz', record.frequencyHz, FREQUENCY_RANGE_HZ, HINT);
  // The bundle's equivalent radius and the phase-spacing checks come from the positive-sequence constants of the same geometry.
  const constants = lineConstantsFromGeometry({
    frequencyHz,
    conductor: record.conductor as ConductorData,
    ...(record.bundle === undefined ? {} : { bundle: record.bundle as SequenceCapacitanceOptions['bundle'] }),
    phasePositionsM: record.phasePositionsM as SequenceCapacitanceOptions['phasePositionsM'],
  });
  const radiusM = constants.bundleCapacitanceRadiusM;
  const phases: Wire[] = (record.phasePositionsM as Array<{ xM: number; yM: number }>).map((position, index) => ({
    x: position.xM,
    y: requireNumber(
      `phasePositionsM[${index}].yM`,
      position.yM,
      { min: radiusM, max: 1000, minInclusive: false, unit: 'm' },
      'Mean height of the phase above ground, larger than the bundle radius.',
    ),
    radiusM,
  }));
  const earthWires: Wire[] =
    record.earthWires === undefined
      ? []
      : requireArray('earthWires', record.earthWires, 0, HINT).map((value, index) => {
          const wire = requireObject(`earthWires[${index}]`, value, HINT);
          const diameterMm = requireNumber(
            `earthWires[${index}].diameterMm`,
            wire.diameterMm,
            { min: 0, max: 100, minInclusive: false, unit: 'mm' },
            HINT,
          );
          return {
            x: requireNumber(`earthWires[${index}].xM`, wire.xM, { min: -1000, max: 1000, unit: 'm' }, HINT),
            y: requireNumber(
              `earthWires[${index}].yM`,
              wire.yM,
              { min: diameterMm / 2e3, max: 1000, minInclusive: false, unit: 'm' },
              'Mean height of the earth wire above ground.',
            ),
            radiusM: diameterMm / 2e3,
          };
        });
  const wires = [...phases, ...earthWires];
  for (let i = 0; i < wires.length; i += 1) {
    for (let j = i + 1; j < wires.length; j += 1) {
      const distance = Math.hypot(wires[i]!.x - wires[j]!.x, wires[i]!.y - wires[j]!.y);
      if (!(distance > wires[i]!.radiusM + wires[j]!.radiusM)) {
        throw new SolverDomainError({
          code: 'out-of-range',
          quantity: `distance between wire ${i + 1} and wire ${j + 1} (m)`,
          value: distance,
          allowedRange: `(${wires[i]!.radiusM + wires[j]!.radiusM}, ∞) m`,
          hint: 'Phases and earth wires must be distinct and must not touch.',
        });
      }
    }
  }
  const matrix = wires.map((row, i) => wires.map((column, j) => potentialCoefficient(row, column, i === j)));
  // Kron reduction, one earth wire at a time (last row first): P_ij <- P_ij - P_ie P_ej / P_ee.
  for (let eliminated = wires.length - 1; eliminated >= 3; eliminated -= 1) {
    const pivot = matrix[eliminated]![eliminated]!;
    for (let i = 0; i < eliminated; i += 1) {
      for (let j = 0; j < eliminated; j += 1) {
        matrix[i]![j]! -= (matrix[i]![eliminated]! * matrix[eliminated]![j]!) / pivot;
      }
    }
  }
  const selfCoefficient = (matrix[0]![0]! + matrix[1]![1]! + matrix[2]![2]!) / 3;
  const mutualCoefficient = (matrix[0]![1]! + matrix[1]![2]! + matrix[2]![0]!) / 3;
  const positiveFPerM = 1 / (selfCoefficient - mutualCoefficient);
  const zeroFPerM = 1 / (selfCoefficient + 2 * mutualCoefficient);
  const omega = angularFrequency(frequencyHz);
  return assertFiniteResult('sequenceCapacitanceFromGeometry', {
    frequencyHz,
    positiveSequenceNfPerKm: positiveFPerM * 1e12,
    zeroSequenceNfPerKm: zeroFPerM * 1e12,
    phaseToGroundNfPerKm: zeroFPerM * 1e12,
    interphaseNfPerKm: ((positiveFPerM - zeroFPerM) / 3) * 1e12,
    positiveSequenceSusceptanceUsPerKm: omega * positiveFPerM * 1e9,
    zeroSequenceSusceptanceUsPerKm: omega * zeroFPerM * 1e9,
    bundleCapacitanceRadiusM: radiusM,
    earthWireCount: earthWires.length,
    selfPotentialCoefficientMPerF: selfCoefficient,
    mutualPotentialCoefficientMPerF: mutualCoefficient,
  });
}
