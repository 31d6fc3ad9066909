import { mkdirSync, readFileSync, readdirSync, statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { chartCache } from '../../src/cli/chartCache.ts';
import { installationFacts } from '../../src/cli/environment.ts';
import { kvarbookInProcess, scratchFolder } from '../support/cli.ts';
import { studyText } from '../support/studies.ts';

const SPEC = JSON.stringify({ mark: 'line', data: { values: [{ x: 1, y: 2 }] } });
const SVG = '<svg xmlns="http://www.w3.org/2000/svg"></svg>';

describe('the chart cache', () => {
  it('gives back a kept chart for the same specification only', () => {
    const cache = chartCache({ KVARBOOK_CACHE: scratchFolder('kvarbook-chart-cache-') }, installationFacts());
    cache.write(SPEC, SVG);
    expect(cache.read(SPEC)).toBe(SVG);
    expect(cache.read(SPEC.replace('"y":2', '"y":3'))).toBeUndefined();
  });

  it('misses a chart that another installation (another lock file) drew', () => {
    const env = { KVARBOOK_CACHE: scratchFolder('kvarbook-chart-cache-') };
    chartCache(env, installationFacts()).write(SPEC, SVG);
    expect(chartCache(env, { ...installationFacts(), lockfileSha256: 'f'.repeat(64) }).read(SPEC)).toBeUndefined();
  });

  it('keeps its entries in a charts folder of the cache folder that only the user may open', () => {
    const folder = scratchFolder('kvarbook-chart-cache-');
    chartCache({ KVARBOOK_CACHE: folder }, installationFacts()).write(SPEC, SVG);
    expect(readdirSync(folder)).toEqual(['charts']);
    expect(readdirSync(join(folder, 'charts'))).toEqual([expect.stringMatching(/^[0-9a-f]{64}\.svg$/)]);
    expect(statSync(join(folder, 'charts')).mode & 0o777).toBe(0o700);
  });

  it('skips a write it cannot make, and the run goes on', () => {
    const folder = scratchFolder('kvarbook-chart-cache-');
    writeFileSync(join(folder, 'charts'), 'a file where the folder would be');
    const cache = chartCache({ KVARBOOK_CACHE: folder }, installationFacts());
    expect(() => cache.write(SPEC, SVG)).not.toThrow();
    expect(cache.read(SPEC)).toBeUndefined();
  });

  it('lets a re-run of an unchanged study write the same report, with one entry per chart', { timeout: 120_000 }, async () => {
    const scratch = scratchFolder('kvarbook-chart-cache-run-');
    const cache = join(scratch, 'cache');
    mkdirSync(join(scratch, 'study'));
    const study = join(scratch, 'study', 'charted.study.md');
    const chart = (caption: string, y: number) =>
      `chart({ data: { values: [{ x: 1, y: ${y} }, { x: 2, y: 3 }] }, mark: 'line', encoding: { x: { field: 'x', type: 'quantitative' }, y: { field: 'y', type: 'quantitative' } } }, { caption: '${caption}' });`;
    writeFileSync(study, studyText({ body: ['```ts', chart('First', 1), chart('Second', 2), '```'].join('\n') }));
    const run = async (out: string) => {
      expect(
        (await kvarbookInProcess(['run', study, '--no-typecheck', '--out', join(scratch, out)], scratch, { KVARBOOK_CACHE: cache })).status,
      ).toBe(0);
      return readFileSync(join(scratch, out, 'TEST-1-r1.html'), 'utf8');
    };
    const first = await run('first');
    expect(readdirSync(join(cache, 'charts'))).toHaveLength(2);
    const second = await run('second');
    expect(second).toBe(first);
    expect(readdirSync(join(cache, 'charts'))).toHaveLength(2);
  });
});
