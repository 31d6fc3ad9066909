import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { lineConstantsFromGeometry, sequenceCapacitanceFromGeometry } from '../../src/solver/index.ts';
import { VACUUM_PERMITTIVITY_F_PER_M } from '../../src/solver/units.ts';

const FOOT_MM = 304.8;
const INCH_MM = 25.4;
// Pheasant ACSR, Grainger & Stevenson, "Power System Analysis" (1994), Appendix Table A.3 (values from memory).
const pheasant = { acResistanceOhmPerKm: 0.0777 / 1.609344, gmrMm: 0.0466 * FOOT_MM, outsideDiameterMm: 1.382 * INCH_MM };
const flatLine = {
  frequencyHz: 60,
  conductor: pheasant,
  bundle: { subConductorCount: 2, spacingM: 0.45 },
  phasePositionsM: [
    { xM: 0, yM: 20 },
    { xM: 8, yM: 20 },
    { xM: 16, yM: 20 },
  ],
};

/** Inverse of a small dense matrix by Gauss-Jordan elimination (test-side, independent of the Kron reduction in the solver). */
function inverse(matrix: number[][]): number[][] {
  const n = matrix.length;
  const work = matrix.map((row, i) => [...row, ...row.map((_, j) => (i === j ? 1 : 0))]);
  for (let column = 0; column < n; column += 1) {
    const pivot = work[column]![column]!;
    work[column] = work[column]!.map((value) => value / pivot);
    for (let row = 0; row < n; row += 1) {
      if (row === column) continue;
      const factor = work[row]![column]!;
      work[row] = work[row]!.map((value, j) => value - factor * work[column]![j]!);
    }
  }
  return work.map((row) => row.slice(n));
}

describe('sequenceCapacitanceFromGeometry', () => {
  // Grainger & Stevenson (1994), ch. 5, "effect of earth on the capacitance" (equation number from memory):
  // Cn = 2 pi eps0 / [ln(Deq / r) - ln((H12 H23 H31)^(1/3) / (H1 H2 H3)^(1/3))] for a transposed line, H the image distances.
  test('gives the textbook positive-sequence capacitance with the earth effect for a transposed flat line', () => {
    const result = sequenceCapacitanceFromGeometry(flatLine);
    const radiusM = result.bundleCapacitanceRadiusM;
    const deq = Math.cbrt(8 * 8 * 16);
    const hMutual = Math.cbrt(Math.hypot(8, 40) * Math.hypot(8, 40) * Math.hypot(16, 40));
    const hSelf = 40;
    const expectedNfPerKm = ((2 * Math.PI * VACUUM_PERMITTIVITY_F_PER_M) / (Math.log(deq / radiusM) - Math.log(hMutual / hSelf))) * 1e12;
    expect(result.positiveSequenceNfPerKm).toBeCloseTo(expectedNfPerKm, 9);
  });

  test('tends to the earth-free capacitance 2 pi eps0 / ln(GMD / r) when the line is far above ground', () => {
    const high = sequenceCapacitanceFromGeometry({ ...flatLine, phasePositionsM: flatLine.phasePositionsM.map((p) => ({ ...p, yM: 1000 })) });
    const earthFree = lineConstantsFromGeometry(flatLine).shuntCapacitanceNfPerKm;
    expect(Math.abs(high.positiveSequenceNfPerKm / earthFree - 1)).toBeLessThan(1e-4);
  });

  test('eliminates an earth wire exactly as the phase block of the inverted full potential matrix (Kron reduction)', () => {
    const earthWire = { xM: 8, yM: 30, diameterMm: 11 };
    const result = sequenceCapacitanceFromGeometry({ ...flatLine, earthWires: [earthWire] });
    const k = 1 / (2 * Math.PI * VACUUM_PERMITTIVITY_F_PER_M);
    const wires = [
      ...flatLine.phasePositionsM.map((p) => ({ x: p.xM, y: p.yM, r: result.bundleCapacitanceRadiusM })),
      { x: earthWire.xM, y: earthWire.yM, r: earthWire.diameterMm / 2e3 },
    ];
    const full = wires.map((a, i) =>
      wires.map((b, j) =>
        i === j ? k * Math.log((2 * a.y) / a.r) : k * Math.log(Math.hypot(a.x - b.x, a.y + b.y) / Math.hypot(a.x - b.x, a.y - b.y)),
      ),
    );
    const phaseBlock = inverse(full)
      .slice(0, 3)
      .map((row) => row.slice(0, 3));
    const reduced = inverse(phaseBlock);
    expect(result.selfPotentialCoefficientMPerF / ((reduced[0]![0]! + reduced[1]![1]! + reduced[2]![2]!) / 3)).toBeCloseTo(1, 10);
    expect(result.mutualPotentialCoefficientMPerF / ((reduced[0]![1]! + reduced[1]![2]! + reduced[2]![0]!) / 3)).toBeCloseTo(1, 10);
  });

  test('raises the zero-sequence capacitance with an earth wire far more than the positive-sequence one', () => {
    const bare = sequenceCapacitanceFromGeometry(flatLine);
    const shielded = sequenceCapacitanceFromGeometry({
      ...flatLine,
      earthWires: [
        { xM: 4, yM: 30, diameterMm: 11 },
        { xM: 12, yM: 30, diameterMm: 11 },
      ],
    });
    expect(shielded.zeroSequenceNfPerKm / bare.zeroSequenceNfPerKm - 1).toBeGreaterThan(
      5 * (shielded.positiveSequenceNfPerKm / bare.positiveSequenceNfPerKm - 1),
    );
    expect(shielded.earthWireCount).toBe(2);
  });

  test('keeps C0 below C1 and splits them into C0 to ground and (C1 - C0) / 3 between phases (identity)', () => {
    fc.assert(
      fc.property(fc.double({ min: 10, max: 60, noNaN: true }), fc.double({ min: 5, max: 15, noNaN: true }), (heightM, spacingM) => {
        const result = sequenceCapacitanceFromGeometry({ ...flatLine, phasePositionsM: [0, 1, 2].map((i) => ({ xM: i * spacingM, yM: heightM })) });
        expect(result.zeroSequenceNfPerKm).toBeLessThan(result.positiveSequenceNfPerKm);
        expect(result.phaseToGroundNfPerKm + 3 * result.interphaseNfPerKm).toBeCloseTo(result.positiveSequenceNfPerKm, 9);
      }),
      { numRuns: 50 },
    );
  });
});
