import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { SolverDomainError, frequencyScan } from '../../src/solver/index.ts';

// IEEE First Benchmark Model (IEEE SSR Task Force, "First benchmark model for computer simulation of subsynchronous
// resonance", IEEE Trans. PAS-96, 1977), values from memory: 892.4 MVA, 26 kV unit, 60 Hz; per unit on 892.4 MVA:
// X''d = 0.135, transformer X_T = 0.14, line R_L = 0.02 + j X_L = 0.50 (lumped), system X_sys = 0.06, series capacitor
// Xc = 0.371 (the benchmark's compensation case, 74.2 % of X_L); torsional modes 15.71, 20.21, 25.55, 32.28, 47.46 Hz.
const BASE_MVA = 892.4;
const BASE_KV = 500; // the line-side base; the resonance does not depend on it
const baseOhm = BASE_KV ** 2 / BASE_MVA;
const firstBenchmarkModesHz = [15.71, 20.21, 25.55, 32.28, 47.46];
const firstBenchmark = [
  { kind: 'generator' as const, subtransientReactanceOhm: 0.135 * baseOhm },
  { kind: 'transformer' as const, reactanceOhm: 0.14 * baseOhm },
  { kind: 'series-impedance' as const, resistanceOhm: 0.02 * baseOhm, reactanceOhm: 0.5 * baseOhm },
  { kind: 'series-capacitor' as const, reactanceOhm: 0.371 * baseOhm },
  { kind: 'system' as const, reactanceOhm: 0.06 * baseOhm },
];

describe('frequencyScan', () => {
  test('finds the First Benchmark Model resonance near 40 Hz, whose complement excites torsional mode 2 (20.21 Hz)', () => {
    const scan = frequencyScan({ frequencyHz: 60, elements: firstBenchmark, torsionalModesHz: firstBenchmarkModesHz, marginHz: 1 });
    expect(scan.seriesResonances).toHaveLength(1);
    const [resonance] = scan.seriesResonances;
    // 60 sqrt(0.371 / 0.835) = 39.99 Hz; the benchmark set Xc so the network mode sits at the complement of mode 2 (39.79 Hz), from memory.
    expect(resonance!.frequencyHz).toBeCloseTo(60 * Math.sqrt(0.371 / 0.835), 6);
    expect(Math.abs(resonance!.complementHz - 20.21)).toBeLessThan(0.5);
    expect(resonance!.modes.filter((mode) => mode.withinMargin).map((mode) => mode.modeHz)).toEqual([20.21]);
    expect(scan.warnings.some((warning) => warning.includes('20.21 Hz'))).toBe(true);
  });

  test('gives the line resistance as the network damping at the First Benchmark Model resonance', () => {
    const scan = frequencyScan({ frequencyHz: 60, elements: firstBenchmark });
    expect(scan.seriesResonances[0]!.resistanceOhm).toBeCloseTo(0.02 * baseOhm, 9);
  });

  test('puts the one-line f0 sqrt(Xc / X) screen beside the scan as its hand check', () => {
    const scan = frequencyScan({ frequencyHz: 60, elements: firstBenchmark, torsionalModesHz: firstBenchmarkModesHz, marginHz: 1 });
    expect(scan.handCheck?.electricalResonanceHz).toBeCloseTo(scan.seriesResonances[0]!.frequencyHz, 6);
  });

  test('agrees with f0 sqrt(Xc / X) for any lumped lossless chain (identity)', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 5, max: 100, noNaN: true }),
        fc.double({ min: 5, max: 100, noNaN: true }),
        fc.double({ min: 10, max: 300, noNaN: true }),
        fc.double({ min: 2, max: 60, noNaN: true }),
        fc.double({ min: 0.05, max: 0.8, noNaN: true }),
        fc.constantFrom(50, 60),
        (generatorOhm, transformerOhm, lineOhm, systemOhm, share, f0) => {
          const totalOhm = generatorOhm + transformerOhm + lineOhm + systemOhm;
          const capacitorOhm = share * totalOhm;
          const expectedHz = f0 * Math.sqrt(share);
          fc.pre(expectedHz > 1.5 && expectedHz < 0.97 * f0);
          const scan = frequencyScan({
            frequencyHz: f0,
            elements: [
              { kind: 'generator', subtransientReactanceOhm: generatorOhm },
              { kind: 'transformer', reactanceOhm: transformerOhm },
              { kind: 'series-impedance', reactanceOhm: lineOhm },
              { kind: 'series-capacitor', reactanceOhm: capacitorOhm },
              { kind: 'system', reactanceOhm: systemOhm },
            ],
          });
          expect(scan.seriesResonances).toHaveLength(1);
          expect(Math.abs(scan.seriesResonances[0]!.frequencyHz - expectedHz)).toBeLessThan(1e-6);
        },
      ),
      { numRuns: 60 },
    );
  });

  test('converges on the lumped result as a distributed line loses its capacitance', () => {
    const line = { kind: 'line-section' as const, lengthKm: 300, seriesResistanceOhmPerKm: 0, seriesReactanceOhmPerKm: 0.33 };
    const lumped = frequencyScan({
      frequencyHz: 60,
      elements: [
        { kind: 'generator', subtransientReactanceOhm: 40 },
        { ...line, kind: 'series-impedance', reactanceOhm: 99 },
        { kind: 'series-capacitor', reactanceOhm: 60 },
        { kind: 'system', reactanceOhm: 20 },
      ],
    });
    const separations = [5, 0.05].map((shuntSusceptanceUsPerKm) => {
      const scan = frequencyScan({
        frequencyHz: 60,
        elements: [
          { kind: 'generator', subtransientReactanceOhm: 40 },
          { ...line, shuntSusceptanceUsPerKm },
          { kind: 'series-capacitor', reactanceOhm: 60 },
          { kind: 'system', reactanceOhm: 20 },
        ],
      });
      return Math.abs(scan.seriesResonances[0]!.frequencyHz - lumped.seriesResonances[0]!.frequencyHz);
    });
    expect(separations[1]).toBeLessThan(separations[0]! / 50);
    expect(separations[1]).toBeLessThan(0.01);
  });

  test('moves the resonance up when a shunt reactor is added beside the system (it lowers the inductance to ground)', () => {
    const base = frequencyScan({
      frequencyHz: 50,
      elements: [
        { kind: 'generator', subtransientReactanceOhm: 40 },
        { kind: 'series-impedance', reactanceOhm: 100 },
        { kind: 'series-capacitor', reactanceOhm: 50 },
        { kind: 'system', reactanceOhm: 30 },
      ],
    });
    const withReactor = frequencyScan({
      frequencyHz: 50,
      elements: [
        { kind: 'generator', subtransientReactanceOhm: 40 },
        { kind: 'series-impedance', reactanceOhm: 100 },
        { kind: 'series-capacitor', reactanceOhm: 50 },
        { kind: 'shunt-reactor', qMvar: 150, ratedVoltageKv: 400 },
        { kind: 'system', reactanceOhm: 30 },
      ],
    });
    // Reactor 400^2/150 = 1067 ohm in parallel with 30 ohm gives 29.18 ohm: f_er = 50 sqrt(50 / 169.18).
    expect(withReactor.seriesResonances[0]!.frequencyHz).toBeCloseTo(50 * Math.sqrt(50 / (140 + (30 * 1066.667) / 1096.667)), 3);
    expect(withReactor.seriesResonances[0]!.frequencyHz).toBeGreaterThan(base.seriesResonances[0]!.frequencyHz);
  });

  test('lists the pole where a shunt reactor resonates with the capacitor-system branch behind it: f0 sqrt(Xc / (Xr + Xs))', () => {
    const scan = frequencyScan({
      frequencyHz: 60,
      elements: [
        { kind: 'generator', subtransientReactanceOhm: 40 },
        { kind: 'shunt-reactor', reactanceOhm: 200 },
        { kind: 'series-capacitor', reactanceOhm: 60 },
        { kind: 'system', reactanceOhm: 40 },
      ],
    });
    expect(scan.parallelResonancesHz).toHaveLength(1);
    expect(scan.parallelResonancesHz[0]).toBeCloseTo(60 * Math.sqrt(60 / 240), 6);
    // Foster's reactance theorem: poles and zeros alternate; the reactor makes the chain inductive at low frequency, so the pole
    // comes first and the zero follows at (f/f0)^2 = Xc (Xg + Xr) / (Xg (Xr + Xs) + Xr Xs), from setting the reactance to zero.
    expect(scan.seriesResonances).toHaveLength(1);
    expect(scan.seriesResonances[0]!.frequencyHz).toBeCloseTo(60 * Math.sqrt((60 * 240) / (40 * 240 + 200 * 40)), 6);
    expect(scan.seriesResonances[0]!.frequencyHz).toBeGreaterThan(scan.parallelResonancesHz[0]!);
  });

  test('returns chart columns of equal length from startHz to stopHz', () => {
    const scan = frequencyScan({ frequencyHz: 60, elements: firstBenchmark, startHz: 5, stopHz: 58, stepHz: 0.5 });
    expect(scan.points.frequencyHz[0]).toBe(5);
    expect(scan.points.frequencyHz.at(-1)).toBe(58);
    expect(scan.points.reactanceOhm).toHaveLength(scan.points.frequencyHz.length);
    expect(scan.points.magnitudeOhm).toHaveLength(scan.points.frequencyHz.length);
  });

  test('refuses a chain with no path to ground, naming the fix', () => {
    const call = () =>
      frequencyScan({
        frequencyHz: 60,
        elements: [
          { kind: 'generator', subtransientReactanceOhm: 40 },
          { kind: 'series-capacitor', reactanceOhm: 20 },
        ],
      });
    expect(call).toThrow(SolverDomainError);
    expect(call).toThrow(/end the chain with a system/);
  });

  test('resonates a generator against a shunt capacitor at f0 sqrt(Xc / Xg), the capacitor admittance rising with frequency (series LC identity)', () => {
    const scan = frequencyScan({
      frequencyHz: 50,
      elements: [
        { kind: 'generator', subtransientReactanceOhm: 40 },
        { kind: 'shunt-capacitor', reactanceOhm: 10 },
      ],
      stepHz: 0.01,
    });
    expect(scan.seriesResonances).toHaveLength(1);
    expect(scan.seriesResonances[0]!.frequencyHz).toBeCloseTo(50 * Math.sqrt(10 / 40), 6);
  });
});
