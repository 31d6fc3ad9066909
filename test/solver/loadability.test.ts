import { describe, expect, test } from 'vitest';
import { lineLoadability } from '../../src/solver/index.ts';

// 765 kV line constants of Glover, Sarma & Overbye, Example 5.2 (from memory).
const line765 = { frequencyHz: 60, seriesResistanceOhmPerKm: 0.0165, seriesReactanceOhmPerKm: 0.3306, shuntSusceptanceUsPerKm: 4.674, nominalVoltageKv: 765, thermalLimitA: 4000 };

describe('lineLoadability', () => {
  // Dunlop, Gutman & Marchenko (IEEE Trans. PAS-98, 1979): a 30 % stability margin corresponds to an angle of about 44 deg across
  // the system, since 1 - sin(delta) = 0.3 for a lossless system (from memory).
  test('puts the stability limit of a lossless system at asin(0.7) = 44.4 degrees between the EMFs', () => {
    const curve = lineLoadability({ ...line765, seriesResistanceOhmPerKm: 0, lengthsKm: [200, 500, 800] });
    for (const point of curve.points) expect(point.stabilityLimitAngleDeg).toBeCloseTo((Math.asin(0.7) * 180) / Math.PI, 6);
  });

  // The St. Clair curve and its analytical extension (same paper): about 1.0 SIL at 300 miles (480 km), from memory;
  // read off a published curve, so within 10 %.
  test('gives about one SIL at 300 miles', () => {
    const [point] = lineLoadability({ ...line765, lengthsKm: [480] }).points;
    expect(Math.abs((point?.loadabilitySil ?? 0) - 1)).toBeLessThanOrEqual(0.1);
  });

  // Same paper: short lines are limited thermally, medium lines by voltage drop, long lines by stability.
  test('passes from thermal to voltage-drop to stability limits as the line gets longer', () => {
    const curve = lineLoadability({ ...line765, lengthsKm: [50, 250, 800] });
    expect(curve.points.map((point) => point.limitedBy)).toEqual(['thermal', 'voltage-drop', 'stability']);
  });

  test('decreases with length over the voltage-drop region', () => {
    const curve = lineLoadability({ ...line765, lengthsKm: [100, 200, 300, 400] });
    const values = curve.points.map((point) => point.loadabilityMw);
    for (let index = 1; index < values.length; index += 1) expect(values[index]).toBeLessThan(values[index - 1] as number);
  });

  test('expresses the thermal limit from amperes as sqrt(3) V I', () => {
    const curve = lineLoadability({ ...line765, lengthsKm: [10] });
    expect(curve.points[0]?.thermalLimitMw).toBeCloseTo((Math.sqrt(3) * 765 * 4000) / 1e3, 9);
  });
});
