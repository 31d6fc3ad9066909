import { readFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { describe, expect, it } from 'vitest';
import { kvarbook, scratchFolder } from '../support/cli.ts';

const DEMO = resolve(import.meta.dirname, '../../studies/caldera-bay-400kv.study.md');

describe('the demo study, end to end', async () => {
  const first = scratchFolder('kvarbook-demo-');
  const second = scratchFolder('kvarbook-demo-');
  const runs = [kvarbook(['run', DEMO, '--out', first], first), kvarbook(['run', DEMO, '--out', second], second)];
  const results = JSON.parse(readFileSync(join(first, 'CBX-RC-001-r2.results.json'), 'utf8'));
  const figure = (name: string) => results.results.find((result: { name: string }) => result.name === name)?.value as number;

  it('runs with its blocks type-checked and meets every criterion', () => {
    expect(runs.map((run) => run.status)).toEqual([0, 0]);
    expect(results.provenance.typeChecked).toBe(true);
    expect(results.criteria.length).toBeGreaterThanOrEqual(8);
    expect(results.criteria.filter((criterion: { passed: boolean }) => !criterion.passed)).toEqual([]);
  });

  it('gives byte-identical report and results when run twice', () => {
    for (const name of ['CBX-RC-001-r2.html', 'CBX-RC-001-r2.results.json']) {
      expect(readFileSync(join(second, name)).equals(readFileSync(join(first, name)))).toBe(true);
    }
  });

  it('draws its five charts into the report as inline SVG', () => {
    const html = readFileSync(join(first, 'CBX-RC-001-r2.html'), 'utf8');
    expect(html.match(/<figure class="chart"><svg/g)).toHaveLength(5);
    expect(html).not.toMatch(/NaN|Infinity/);
  });

  it('finds the open-end rise of its nearly lossless line close to 1/cos(beta l)', () => {
    // Physical identity: the lossless open-end ratio is 1/cos(beta l); the demo line's resistance moves it by well under 0.1 %.
    expect(Math.abs(figure('Open-end voltage, no reactors') / figure('Lossless estimate 1/cos(beta l)') - 1)).toBeLessThan(1e-3);
  });
});
