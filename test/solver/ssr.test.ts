import { describe, expect, test } from 'vitest';
import { SolverDomainError, ssrScreening } from '../../src/solver/index.ts';

// Torsional modes of the IEEE First Benchmark Model (IEEE SSR Task Force, IEEE Trans. PAS-96, 1977), values from memory.
const firstBenchmarkModesHz = [15.71, 20.21, 25.55, 32.28, 47.46];

describe('ssrScreening', () => {
  test('computes f_er = f0 sqrt(Xc / X_total) and its complement', () => {
    const result = ssrScreening({ frequencyHz: 60, capacitorReactanceOhm: 25, totalReactanceOhm: 100, torsionalModesHz: [], marginHz: 2 });
    expect(result.electricalResonanceHz).toBeCloseTo(30, 12);
    expect(result.complementHz).toBeCloseTo(30, 12);
  });

  test('warns, with the numbers, when a torsional mode lies within the margin of the complement', () => {
    // Xc / X = ((60 - 32.28) / 60)^2 puts the complement exactly on the 32.28 Hz mode.
    const ratio = ((60 - 32.28) / 60) ** 2;
    const result = ssrScreening({
      frequencyHz: 60,
      capacitorReactanceOhm: 100 * ratio,
      totalReactanceOhm: 100,
      torsionalModesHz: firstBenchmarkModesHz,
      marginHz: 1.5,
    });
    expect(result.warnings).toHaveLength(1);
    expect(result.warnings[0]).toMatch(/32\.28 Hz/);
    expect(result.modes.find((mode) => mode.modeHz === 32.28)?.withinMargin).toBe(true);
  });

  test('gives no warning when every mode is outside the margin', () => {
    const result = ssrScreening({
      frequencyHz: 60,
      capacitorReactanceOhm: 100 * ((60 - 29) / 60) ** 2,
      totalReactanceOhm: 100,
      torsionalModesHz: firstBenchmarkModesHz,
      marginHz: 1,
    });
    expect(result.warnings).toEqual([]);
  });

  test('rejects a capacitor that cancels all of the series reactance', () => {
    expect(() => ssrScreening({ frequencyHz: 60, capacitorReactanceOhm: 100, totalReactanceOhm: 100, torsionalModesHz: [], marginHz: 1 })).toThrow(
      SolverDomainError,
    );
  });
});
