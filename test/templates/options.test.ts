import { readFileSync } from 'node:fs';
import { resolve } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runSource } from '../support/studies.ts';

const TEMPLATE = resolve(import.meta.dirname, '../../templates/options.study.md');

/** Complex numbers as [re, im], enough for the hyperbolic ABCD of one line written out here, apart from the solver. */
type C = [number, number];
const mul = (a: C, b: C): C => [a[0] * b[0] - a[1] * b[1], a[0] * b[1] + a[1] * b[0]];
const div = (a: C, b: C): C => {
  const d = b[0] ** 2 + b[1] ** 2;
  return [(a[0] * b[0] + a[1] * b[1]) / d, (a[1] * b[0] - a[0] * b[1]) / d];
};
const sqrt = (a: C): C => {
  const r = Math.hypot(a[0], a[1]);
  return [Math.sqrt((r + a[0]) / 2), Math.sign(a[1]) * Math.sqrt((r - a[0]) / 2)];
};
const cosh = (a: C): C => [Math.cosh(a[0]) * Math.cos(a[1]), Math.sinh(a[0]) * Math.sin(a[1])];
const sinh = (a: C): C => [Math.sinh(a[0]) * Math.cos(a[1]), Math.cosh(a[0]) * Math.sin(a[1])];
const abs = (a: C) => Math.hypot(a[0], a[1]);
const arg = (a: C) => Math.atan2(a[1], a[0]);

describe('the options template', async () => {
  const product = await runSource(readFileSync(TEMPLATE, 'utf8'), { file: 'options.study.md', typecheck: true });
  const figure = (name: string) => product.results.results.find((entry) => entry.name === name)?.value as number;

  it('runs as it stands and meets its criterion', () => {
    expect(product.results.criteria.map((entry) => entry.passed)).toEqual([true]);
  });

  it('gives the bare line the maximum transfer of the exact lossy line between held buses, computed here by hand', () => {
    // Glover, Sarma & Overbye, Power System Analysis and Design (5th ed.), sec. 5.2 and 5.5 (from memory): A = cosh(gamma l),
    // B = Zc sinh(gamma l), P_R,max = V^2 / |B| - |A| V^2 cos(beta - alpha) / |B| at delta = beta. The template's example line.
    const z: C = [0.021e-3, 0.33e-3];
    const y: C = [0, 5.0e-9];
    const gammaL = mul(sqrt(mul(z, y)), [320e3, 0]);
    const zc = sqrt(div(z, y));
    const a = cosh(gammaL);
    const b = mul(zc, sinh(gammaL));
    const v2 = 500e3 ** 2;
    const pMaxMw = (v2 / abs(b) - (abs(a) * v2 * Math.cos(arg(b) - arg(a))) / abs(b)) / 1e6;
    expect(figure('Maximum transfer, none') / pMaxMw).toBeCloseTo(1, 9);
    // SIL = V^2 / Zc of the lossless line (same source, sec. 5.4).
    expect(figure('Surge impedance loading') / (v2 / Math.sqrt(0.33 / 5.0e-6) / 1e6)).toBeCloseTo(1, 9);
  });

  it('orders the alternatives by maximum transfer as theory says', () => {
    // Shunt units at the held end buses, or switched out at the peak, change nothing between the held buses; capacitors at the
    // mid bus raise the limit, and the var compensator there at its larger capacitive ceiling raises it more; series capacitors
    // remove k X and raise it most, the more the higher the degree (Miller, Reactive Power Control in Electric Systems, 1982, ch. 2,
    // from memory).
    const limit = (label: string) => figure(`Maximum transfer, ${label}`);
    expect(limit('shunt reactors')).toBe(limit('none'));
    expect(limit('reactors + capacitors')).toBeGreaterThan(limit('shunt reactors'));
    expect(limit('reactors + SVC')).toBeGreaterThan(limit('reactors + capacitors'));
    expect(limit('reactors + series 25 %')).toBeGreaterThan(limit('reactors + SVC'));
    expect(limit('reactors + SVC + series 30 %')).toBeGreaterThan(limit('reactors + series 25 %'));
    expect(limit('reactors + series 40 %')).toBeGreaterThan(limit('reactors + SVC + series 30 %'));
  });

  it('splices the recommendation from the calculation: the cheapest alternative that meets every criterion', () => {
    // From the example data, reactors + series 40 % is the one alternative that meets every criterion (see the comparison table).
    const body = product.report.body;
    expect(/The recommendation is <strong>(<span[^>]*>)?reactors \+ series 40 %/.test(body)).toBe(true);
    expect(/NaN|Infinity/.test(body)).toBe(false);
  });

  it('recommends none of the alternatives, and quotes no cost for one, when none meets every criterion', async () => {
    // A peak transfer beyond every alternative's limit within the angle limit (the largest here is near 2.9 GW).
    const none = await runSource(readFileSync(TEMPLATE, 'utf8'), {
      file: 'options.study.md',
      overrides: [{ name: 'peakTransfer', text: '5000 MW' }],
    });
    expect(none.results.criteria.map((entry) => entry.passed)).toEqual([false]);
    const start = none.report.body.indexOf('<h2 id="recommendation">');
    const section = none.report.body.slice(start, none.report.body.indexOf('<h2', start + 1));
    expect(section).not.toContain('the cheapest of them');
    expect(section).toMatch(/The recommendation is <strong>(<span[^>]*>)?none of the alternatives/);
    expect(section).toMatch(/no alternative meets every criterion/);
    expect(none.results.results.map((entry) => entry.name)).not.toContain('Capitalised cost of the recommendation');
  });
});
