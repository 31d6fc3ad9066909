import { readFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { describe, expect, it } from 'vitest';
import { kvarbook, scratchFolder } from '../support/cli.ts';

const DEMO = resolve(import.meta.dirname, '../../studies/caldera-bay-400kv.study.md');

describe('the demo study, end to end', async () => {
  const first = scratchFolder('kvarbook-demo-');
  const second = scratchFolder('kvarbook-demo-');
  const runs = [kvarbook(['run', DEMO, '--out', first], first), kvarbook(['run', DEMO, '--out', second], second)];
  const results = JSON.parse(readFileSync(join(first, 'CBX-RC-001-r4.results.json'), 'utf8'));
  const figure = (name: string) => results.results.find((result: { name: string }) => result.name === name)?.value as number;

  it('runs with its blocks type-checked and meets every criterion', () => {
    expect(runs.map((run) => run.status)).toEqual([0, 0]);
    expect(results.provenance.typeChecked).toBe(true);
    expect(results.criteria.length).toBeGreaterThanOrEqual(8);
    expect(results.criteria.filter((criterion: { passed: boolean }) => !criterion.passed)).toEqual([]);
  });

  it('gives byte-identical report and results when run twice', () => {
    for (const name of ['CBX-RC-001-r4.html', 'CBX-RC-001-r4.results.json']) {
      expect(readFileSync(join(second, name)).equals(readFileSync(join(first, name)))).toBe(true);
    }
  });

  it('draws its seven charts into the report as inline SVG', () => {
    const html = readFileSync(join(first, 'CBX-RC-001-r4.html'), 'utf8');
    expect(html.match(/<figure class="chart"><svg/g)).toHaveLength(7);
    expect(html).not.toMatch(/NaN|Infinity/);
  });

  it('finds an electrical length that puts the wave speed on its line just below the speed of light', () => {
    // Physical check: on an overhead line the wave travels at 0.97 to 1.0 times the speed of light (common practice), so the
    // electrical length of 380 km at 50 Hz lies between 360 deg x 50 Hz x 380 km / c and that divided by 0.97.
    const atLightSpeedDeg = (360 * 50 * 380e3) / 299_792_458;
    expect(figure('Electrical length')).toBeGreaterThan(atLightSpeedDeg);
    expect(figure('Electrical length')).toBeLessThan(atLightSpeedDeg / 0.97);
  });

  it('carries the export within the angle limit only with the series capacitor in, and names the reduced export without it', () => {
    // Independent of the solver: a line of 380 km x 0.269 ohm/km carries P = V^2 sin(delta) / X at most; at 30 deg without the bank
    // that is about 780 MW, well short of the 1100 MW export.
    const lineOnlyMw = (400 ** 2 * Math.sin(Math.PI / 6)) / (380 * 0.2691);
    expect(figure('Export with the series capacitor bypassed')).toBeLessThan(1100);
    expect(Math.abs(figure('Export with the series capacitor bypassed') / lineOnlyMw - 1)).toBeLessThan(0.1);
    expect(figure('Angle across the corridor during the export')).toBeLessThanOrEqual(30);
  });

  it('orders the alternatives by maximum transfer as theory says', () => {
    // Between end buses held at 400 kV, shunt units at those buses (the reactors, the Caldera Bay capacitors and var compensator)
    // or switched out leave the steady-state limit unchanged; series capacitors remove k X and raise it, the more the higher the
    // degree (Glover, Sarma & Overbye, 5th ed., sec. 5.4-5.7; Miller, 1982, ch. 2; from memory).
    const limits = results.results.filter((result: { name: string }) => result.name.startsWith('Maximum transfer, '));
    const limit = (label: string) => limits.find((result: { name: string }) => result.name.startsWith(`Maximum transfer, ${label}`))!.value as number;
    for (const shunt of ['shunt reactors', 'reactors + capacitors', 'reactors + SVC']) expect(limit(shunt) / limit('none')).toBeCloseTo(1, 9);
    expect(limit('reactors + series 30 %')).toBeGreaterThan(1.2 * limit('none'));
    expect(limit('combination')).toBeGreaterThan(limit('reactors + series 30 %'));
    expect(limit('reactors + series 50 %')).toBeGreaterThan(limit('combination'));
  });

  it('recommends the combination it designs in detail', () => {
    expect(
      results.criteria.find((criterion: { name: string }) => criterion.name === 'The alternative designed in detail below is the recommended one')
        .passed,
    ).toBe(true);
  });
});
