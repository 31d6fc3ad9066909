import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { lineCharacteristics, lineConstantsFromGeometry } from '../../src/solver/index.ts';

const FOOT_MM = 304.8;
const INCH_MM = 25.4;
// Pheasant ACSR (1,272,000 cmil): GMR 0.0466 ft, outside diameter 1.382 in, 0.0777 ohm/mi at 60 Hz, 50 degC.
// Source: Grainger & Stevenson, "Power System Analysis" (1994), Appendix Table A.3 (conductor data), values from memory.
const pheasant = { acResistanceOhmPerKm: 0.0777 / 1.609344, gmrMm: 0.0466 * FOOT_MM, outsideDiameterMm: 1.382 * INCH_MM };
// Two-conductor bundle, d = 45 cm, phases in a flat row 8 m apart (D = 8, 8, 16 m).
const bundledLine = {
  frequencyHz: 60,
  conductor: pheasant,
  bundle: { subConductorCount: 2, spacingM: 0.45 },
  phasePositionsM: [
    { xM: 0, yM: 20 },
    { xM: 8, yM: 20 },
    { xM: 16, yM: 20 },
  ],
};

describe('lineConstantsFromGeometry', () => {
  // Grainger & Stevenson (1994), ch. 4, worked example on the bundled Pheasant line (example number from memory: 4.6):
  // Deq = 10.08 m, Ds_b = sqrt(0.0142 * 0.45) = 0.0799 m, XL = 0.365 ohm/km per phase.
  test('reproduces the textbook GMD, bundle GMR and series reactance of the bundled Pheasant line', () => {
    const constants = lineConstantsFromGeometry(bundledLine);
    expect(constants.gmdM).toBeCloseTo(10.08, 2);
    expect(constants.bundleGmrM).toBeCloseTo(0.0799, 4);
    expect(Math.abs(constants.seriesReactanceOhmPerKm - 0.365)).toBeLessThanOrEqual(0.0005);
  });

  // Same worked example for capacitance (Grainger & Stevenson 1994, ch. 5): r = 1.382 * 0.0254 / 2 = 0.01755 m,
  // D_sC_b = sqrt(0.01755 * 0.45) = 0.0889 m.
  test('uses the outside radius, not the GMR, for the bundle radius in the capacitance', () => {
    expect(lineConstantsFromGeometry(bundledLine).bundleCapacitanceRadiusM).toBeCloseTo(0.0889, 4);
  });

  test('divides the sub-conductor resistance by the number of sub-conductors', () => {
    expect(lineConstantsFromGeometry(bundledLine).seriesResistanceOhmPerKm).toBeCloseTo(pheasant.acResistanceOhmPerKm / 2, 12);
  });

  // Four-conductor bundle: GMR = 1.09 (Ds d^3)^(1/4), Grainger & Stevenson (1994), ch. 4, bundled conductors (the exact factor is 2^(1/8) = 1.0905).
  test('gives the published factor 1.0905 for a square four-conductor bundle', () => {
    const gmrM = 0.0142;
    const spacingM = 0.45;
    const constants = lineConstantsFromGeometry({
      ...bundledLine,
      conductor: { ...pheasant, gmrMm: gmrM * 1e3 },
      bundle: { subConductorCount: 4, spacingM },
    });
    expect(constants.bundleGmrM / (gmrM * spacingM ** 3) ** (1 / 4)).toBeCloseTo(2 ** (1 / 8), 10);
  });

  // Physical identity: with GMR equal to the radius (no internal flux) L C = mu0 eps0, so waves travel at the speed of light.
  test('gives propagation at the speed of light when the GMR equals the radius', () => {
    fc.assert(
      fc.property(fc.double({ min: 5, max: 60, noNaN: true }), fc.double({ min: 10, max: 50, noNaN: true }), (diameterMm, spacingM) => {
        const constants = lineConstantsFromGeometry({
          frequencyHz: 50,
          conductor: { acResistanceOhmPerKm: 0.05, gmrMm: diameterMm / 2, outsideDiameterMm: diameterMm },
          phasePositionsM: [
            { xM: 0, yM: 30 },
            { xM: spacingM, yM: 30 },
            { xM: 2 * spacingM, yM: 30 },
          ],
        });
        const speedKmPerS = 1 / Math.sqrt(constants.seriesInductanceMhPerKm * 1e-3 * constants.shuntCapacitanceNfPerKm * 1e-9);
        expect(speedKmPerS).toBeCloseTo(299_792.458, 0);
      }),
    );
  });

  // Physical identity: charging Mvar per km = V^2 omega C.
  test('reports charging Mvar per km as V squared times omega C', () => {
    const constants = lineConstantsFromGeometry({ ...bundledLine, voltageKv: 345 });
    const expected = (345e3 ** 2 * 2 * Math.PI * 60 * constants.shuntCapacitanceNfPerKm * 1e-9) / 1e6;
    expect(constants.chargingMvarPerKm).toBeCloseTo(expected, 10);
  });

  test('feeds its output straight into lineCharacteristics', () => {
    const constants = lineConstantsFromGeometry(bundledLine);
    const characteristics = lineCharacteristics({ ...constants, lengthKm: 160, nominalVoltageKv: 345 });
    expect(characteristics.losslessSurgeImpedanceOhm).toBeGreaterThan(200);
    expect(characteristics.losslessSurgeImpedanceOhm).toBeLessThan(350);
  });

  test('rejects a GMR larger than the conductor radius', () => {
    expect(() => lineConstantsFromGeometry({ ...bundledLine, conductor: { ...pheasant, gmrMm: 30 } })).toThrow(/conductor.gmrMm = 30 is outside/);
  });
});
