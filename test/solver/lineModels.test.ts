import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { compensatedLineCharacteristics, lineCharacteristics, lineModel, polarForm, solveNoLoad } from '../../src/solver/index.ts';
import type { ComplexValue } from '../../src/solver/index.ts';

const polar = (value: ComplexValue) => polarForm({ value });

// Glover, Sarma & Overbye, "Power System Analysis and Design", Example 5.2 (values from memory):
// 765 kV, 60 Hz, 300 km, z = 0.0165 + j0.3306 ohm/km, y = j4.674e-6 S/km.
const glover = { frequencyHz: 60, seriesResistanceOhmPerKm: 0.0165, seriesReactanceOhmPerKm: 0.3306, shuntSusceptanceUsPerKm: 4.674, lengthKm: 300 };
// Saadat, "Power System Analysis" (2nd ed.), Example 5.6 (values from memory): 500 kV, 60 Hz, 300 km, lossless,
// L = 0.97 mH/km, C = 0.0115 uF/km.
const saadat = { frequencyHz: 60, seriesResistanceOhmPerKm: 0, seriesInductanceMhPerKm: 0.97, shuntCapacitanceNfPerKm: 11.5, lengthKm: 300 };

describe('lineModel', () => {
  test('gives the exact ABCD parameters of the Glover example 765 kV line', () => {
    const line = lineModel(glover);
    expect(polar(line.A).magnitude).toBeCloseTo(0.9313, 4);
    expect(Math.abs(polar(line.A).angleDeg - 0.209)).toBeLessThanOrEqual(0.0005);
    expect(Math.abs(polar(line.B).magnitude - 97.0)).toBeLessThanOrEqual(0.05);
    expect(Math.abs(polar(line.B).angleDeg - 87.2)).toBeLessThanOrEqual(0.05);
    expect(Math.abs(polar(line.C).magnitude - 1.37e-3)).toBeLessThanOrEqual(0.005e-3);
    expect(line.A).toEqual(line.D);
  });

  test('gives the nominal-pi B parameter of the same example, 99.3 ohm at 87.14 deg', () => {
    const line = lineModel({ ...glover, model: 'nominal-pi' });
    expect(Math.abs(polar(line.B).magnitude - 99.3)).toBeLessThanOrEqual(0.05);
    expect(Math.abs(polar(line.B).angleDeg - 87.14)).toBeLessThanOrEqual(0.005);
  });

  test('states the model used on the two-port', () => {
    expect(lineModel({ ...glover, model: 'short' }).model).toBe('short');
    expect(lineModel(glover).model).toBe('distributed');
  });

  // Series expansions: exact A = cosh(gl) = 1 + (gl)^2/2 + (gl)^4/24 + ..., nominal-pi A = 1 + ZY/2, so they differ by about (gl)^4/24;
  // exact B = Z sinh(gl)/(gl) = Z (1 + (gl)^2/6 + ...), so B differs by a relative (gl)^2/6.
  test('differs from the nominal pi by the leading terms of the series expansion', () => {
    fc.assert(
      fc.property(fc.double({ min: 1, max: 100, noNaN: true }), (lengthKm) => {
        const exact = lineModel({ ...glover, lengthKm });
        const pi = lineModel({ ...glover, lengthKm, model: 'nominal-pi' });
        const gammaLengthSquared = Math.hypot(0.0165, 0.3306) * 4.674e-6 * lengthKm ** 2;
        expect(Math.hypot(exact.A.re - pi.A.re, exact.A.im - pi.A.im)).toBeLessThanOrEqual((gammaLengthSquared ** 2 / 24) * 1.05);
        expect(Math.hypot(exact.B.re - pi.B.re, exact.B.im - pi.B.im) / Math.hypot(pi.B.re, pi.B.im)).toBeLessThanOrEqual(
          (gammaLengthSquared / 6) * 1.05,
        );
      }),
    );
  });

  // Physical identity (lossless distributed line): an open line raises the voltage by 1 / cos(beta l) (Ferranti effect).
  test('raises the open-end voltage of a lossless line by 1/cos(beta l)', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 10, max: 1000, noNaN: true }),
        fc.double({ min: 0.2, max: 0.5, noNaN: true }),
        fc.double({ min: 2.5, max: 5, noNaN: true }),
        (lengthKm, x, b) => {
          const line = lineModel({ frequencyHz: 50, seriesResistanceOhmPerKm: 0, seriesReactanceOhmPerKm: x, shuntSusceptanceUsPerKm: b, lengthKm });
          const betaLength = Math.sqrt(x * b * 1e-6) * lengthKm;
          // The identity holds for lines shorter than a quarter wavelength; at a quarter wavelength the open end
          // is at resonance and the solver refuses (next test).
          fc.pre(betaLength < 0.95 * (Math.PI / 2));
          const noLoad = solveNoLoad({ network: line, sendingVoltageKv: 400 });
          // Compared as a relative error: near a quarter wavelength the ratio itself grows without bound.
          expect(Math.abs((noLoad.receivingEnd.voltageKv / 400) * Math.cos(betaLength) - 1)).toBeLessThan(1e-9);
        },
      ),
    );
  });
});

describe('line data implying propagation faster than light', () => {
  // Physical bound: v = 1 / sqrt(L C) cannot exceed c on an overhead line; x = 0.25 ohm/km and b = 3.0 uS/km at 50 Hz give
  // v = omega / sqrt(x b) = 314.16 / sqrt(0.25 * 3e-6) = 362,760 km/s, 1.21 c.
  const fast = { frequencyHz: 50, seriesResistanceOhmPerKm: 0, seriesReactanceOhmPerKm: 0.25, shuntSusceptanceUsPerKm: 3.0, lengthKm: 100 };
  test('is reported with the ratio v/c by lineCharacteristics', () => {
    const result = lineCharacteristics({ ...fast, nominalVoltageKv: 400 });
    expect(result.velocityToLightRatio).toBeCloseTo((2 * Math.PI * 50) / Math.sqrt(0.25 * 3e-6) / 299_792.458, 9);
    expect(result.warnings).toHaveLength(1);
    expect(result.warnings[0]).toMatch(/1\.210 times the speed of light/);
  });

  test('is reported on the line section built by lineModel', () => {
    expect(lineModel(fast).warnings[0]).toMatch(/faster than light/);
  });

  test('gives no warning for the Saadat example line', () => {
    expect(lineCharacteristics({ ...saadat, nominalVoltageKv: 500 }).warnings).toEqual([]);
    expect(lineModel(saadat).warnings).toEqual([]);
  });
});

describe('a line of a quarter wavelength', () => {
  // Lossless line: the open-end voltage is Vs / cos(beta l), unbounded at beta l = 90 degrees.
  test('is refused at no load as a resonance, not answered with an unbounded voltage', () => {
    const x = 0.3;
    const b = 4;
    const quarterWaveKm = Math.PI / 2 / Math.sqrt(x * b * 1e-6);
    const line = lineModel({
      frequencyHz: 50,
      seriesResistanceOhmPerKm: 0,
      seriesReactanceOhmPerKm: x,
      shuntSusceptanceUsPerKm: b,
      lengthKm: quarterWaveKm,
    });
    expect(() => solveNoLoad({ network: line, sendingVoltageKv: 400 })).toThrow(/resonance/);
  });
});

describe('lineCharacteristics', () => {
  test('gives the surge impedance of the Glover example, 266.1 ohm at -1.43 deg', () => {
    const result = lineCharacteristics({ ...glover, nominalVoltageKv: 765 });
    expect(Math.abs(result.surgeImpedanceMagnitudeOhm - 266.1)).toBeLessThanOrEqual(0.05);
    expect(Math.abs(polar(result.surgeImpedanceOhm).angleDeg - -1.43)).toBeLessThanOrEqual(0.005);
  });

  test('gives the phase constant, surge impedance, velocity and wavelength of the Saadat example', () => {
    const result = lineCharacteristics({ ...saadat, nominalVoltageKv: 500 });
    expect(Math.abs(result.phaseConstantRadPerKm - 0.001259)).toBeLessThanOrEqual(0.0000005);
    expect(Math.abs(result.losslessSurgeImpedanceOhm - 290.43)).toBeLessThanOrEqual(0.005);
    expect(Math.abs(result.propagationVelocityKmPerS - 2.994e5)).toBeLessThanOrEqual(50);
    expect(Math.abs(result.wavelengthKm - 4990)).toBeLessThanOrEqual(0.5);
  });

  // Definition: SIL = V^2 / Zc with the lossless Zc = sqrt(L / C), here from the Saadat example's L and C (not from the result).
  test('computes the surge impedance loading as V squared over the lossless surge impedance', () => {
    const result = lineCharacteristics({ ...saadat, nominalVoltageKv: 500 });
    const losslessSurgeImpedanceOhm = Math.sqrt(0.97e-3 / 11.5e-9);
    expect(result.surgeImpedanceLoadingMw).toBeCloseTo(500 ** 2 / losslessSurgeImpedanceOhm, 9);
  });

  // Physical check: an overhead line's phase constant is close to that of light, about 0.06 deg/km at 50 Hz and 0.072 at 60 Hz (common practice).
  test('gives a phase constant near 0.06 deg/km at 50 Hz and 0.072 deg/km at 60 Hz for overhead-line constants', () => {
    fc.assert(
      fc.property(fc.double({ min: 0.95, max: 1.0, noNaN: true }), fc.constantFrom(50, 60), (velocityShare, frequencyHz) => {
        // Overhead lines propagate at 95-100 % of the speed of light; pick L and C accordingly.
        const inductanceMhPerKm = 1.0;
        const speedKmPerS = 299_792.458 * velocityShare;
        const capacitanceNfPerKm = (1 / (speedKmPerS ** 2 * inductanceMhPerKm * 1e-3)) * 1e9;
        const result = lineCharacteristics({
          frequencyHz,
          seriesResistanceOhmPerKm: 0.02,
          seriesInductanceMhPerKm: inductanceMhPerKm,
          shuntCapacitanceNfPerKm: capacitanceNfPerKm,
          lengthKm: 100,
          nominalVoltageKv: 400,
        });
        const lightDegPerKm = (360 * frequencyHz) / 299_792.458;
        expect(result.phaseConstantDegPerKm).toBeGreaterThanOrEqual(lightDegPerKm * 0.999);
        expect(result.phaseConstantDegPerKm).toBeLessThanOrEqual((lightDegPerKm / 0.95) * 1.001);
        expect(Math.abs(result.phaseConstantDegPerKm - (frequencyHz === 50 ? 0.06 : 0.072))).toBeLessThan(0.004);
      }),
    );
  });

  // Physical identity: charging Mvar = V^2 omega C length.
  test('reports total charging Mvar as V squared times omega C times length', () => {
    const result = lineCharacteristics({ ...saadat, nominalVoltageKv: 500 });
    expect(result.chargingMvar).toBeCloseTo((500e3 ** 2 * 2 * Math.PI * 60 * 11.5e-9 * 300) / 1e6, 9);
  });

  test('gives the equivalent-pi series impedance equal to the exact B parameter', () => {
    const result = lineCharacteristics({ ...glover, nominalVoltageKv: 765 });
    const exact = lineModel(glover);
    expect(result.equivalentPi.seriesImpedanceOhm.re).toBeCloseTo(exact.B.re, 9);
    expect(result.equivalentPi.seriesImpedanceOhm.im).toBeCloseTo(exact.B.im, 9);
  });
});

describe('line characteristics with compensation', () => {
  test('gives inductance and capacitance per km beside reactance and susceptance (Saadat Example 5.6 data)', () => {
    const result = lineCharacteristics({ ...saadat, nominalVoltageKv: 500 });
    expect(result.seriesInductanceMhPerKm).toBeCloseTo(0.97, 12);
    expect(result.shuntCapacitanceNfPerKm).toBeCloseTo(11.5, 12);
  });

  // Definition: SIL on the lossy surge impedance is V^2 / |Zc|, beside the usual lossless V^2 / sqrt(L/C) (Glover Example 5.2 line).
  test('gives the SIL on the lossy |Zc| beside the lossless one', () => {
    const result = lineCharacteristics({ ...glover, nominalVoltageKv: 765 });
    // |Zc| = sqrt(|z| / |y|) from the example's per-km data, not from the result.
    const surgeImpedanceMagnitudeOhm = Math.sqrt(Math.hypot(0.0165, 0.3306) / 4.674e-6);
    expect(result.surgeImpedanceLoadingLossyMw).toBeCloseTo(765 ** 2 / surgeImpedanceMagnitudeOhm, 9);
    expect(result.surgeImpedanceLoadingLossyMw).toBeLessThan(result.surgeImpedanceLoadingMw);
  });

  // Gönen, "Electric Power Transmission System Engineering", 2nd ed., Example 3.2 (values as transcribed in a public worked-solution
  // set, page not in hand): a 345 kV line of SIL 325 MW; with 50 % series compensation 460 MW; with 50 % series and 20 % shunt
  // compensation 411 MW; SIL' = SIL sqrt((1 - k_sh) / (1 - k_se)). The per-km data only need Zc = 345^2 / 325 ohm.
  test('gives the compensated SIL of the Gönen example', () => {
    const zc = 345 ** 2 / 325;
    const gonen = {
      frequencyHz: 60,
      seriesResistanceOhmPerKm: 0,
      seriesReactanceOhmPerKm: 0.5,
      shuntSusceptanceUsPerKm: (0.5 / zc ** 2) * 1e6,
      lengthKm: 200,
      nominalVoltageKv: 345,
    };
    expect(
      compensatedLineCharacteristics({ ...gonen, seriesCompensationDegree: 0.5, shuntCompensationDegree: 0 }).surgeImpedanceLoadingMw,
    ).toBeCloseTo(459.6, 1);
    expect(
      compensatedLineCharacteristics({ ...gonen, seriesCompensationDegree: 0.5, shuntCompensationDegree: 0.2 }).surgeImpedanceLoadingMw,
    ).toBeCloseTo(411.1, 1);
  });

  // Identity (Miller, "Reactive Power Control in Electric Systems", 1982, ch. 2; from memory): uniformly distributed compensation
  // scales Zc by sqrt((1 - k_se) / (1 - k_sh)) and beta by sqrt((1 - k_se)(1 - k_sh)); the distributed-shunt line option must agree.
  test('agrees with a line built with uniformly distributed shunt compensation', () => {
    fc.assert(
      fc.property(fc.double({ min: 0, max: 0.9, noNaN: true }), fc.double({ min: 50, max: 800, noNaN: true }), (degree, lengthKm) => {
        const lossless = {
          frequencyHz: 50,
          seriesResistanceOhmPerKm: 0,
          seriesReactanceOhmPerKm: 0.3,
          shuntSusceptanceUsPerKm: 3.8,
          lengthKm,
          nominalVoltageKv: 400,
        };
        const formula = compensatedLineCharacteristics({ ...lossless, seriesCompensationDegree: 0, shuntCompensationDegree: degree });
        const distributed = lineCharacteristics({ ...lossless, distributedShuntCompensationDegree: degree });
        expect(distributed.losslessSurgeImpedanceOhm).toBeCloseTo(formula.surgeImpedanceOhm, 9);
        expect(distributed.electricalLengthDeg).toBeCloseTo(formula.electricalLengthDeg, 9);
        expect(distributed.surgeImpedanceLoadingMw).toBeCloseTo(formula.surgeImpedanceLoadingMw, 9);
      }),
    );
  });

  // Physical identity: the open-end rise of a lossless line with distributed shunt compensation k is 1 / cos(beta l sqrt(1 - k)).
  test('raises the open end of a distributed-compensated line by 1/cos(beta l sqrt(1 - k))', () => {
    const line = lineModel({
      frequencyHz: 50,
      seriesResistanceOhmPerKm: 0,
      seriesReactanceOhmPerKm: 0.3,
      shuntSusceptanceUsPerKm: 3.8,
      lengthKm: 500,
      distributedShuntCompensationDegree: 0.6,
    });
    const theta = Math.sqrt(0.3 * 3.8e-6) * 500 * Math.sqrt(0.4);
    expect(solveNoLoad({ network: line, sendingVoltageKv: 400 }).receivingEnd.voltageKv).toBeCloseTo(400 / Math.cos(theta), 9);
    expect(line.distributedShuntCompensationDegree).toBe(0.6);
  });
});
