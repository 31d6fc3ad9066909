// Variants: a run with overridden inputs writes files of its own, so that it never replaces the base case's report.
import { readFileSync, readdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { kvarbookInProcess, scratchFolder } from '../support/cli.ts';
import { studyText } from '../support/studies.ts';

const study = studyText({
  inputs: '  lineLength: 320 km\n  peakLoad: 480 MW\n  powerFactor: { value: 0.95, quantity: ratio }',
  body: '```ts\nresult("length", inputs.lineLength.in("km"), { unit: "km" });\n```\n',
});

function studyFolder(): string {
  const folder = scratchFolder();
  writeFileSync(join(folder, 'line.study.md'), study);
  return folder;
}

const reportFiles = (folder: string) =>
  readdirSync(join(folder, 'build'))
    .filter((name) => !name.startsWith('.'))
    .sort();

describe('variants', () => {
  it('names the files of a run with --set by its overrides, and leaves the base report as it was', async () => {
    const folder = studyFolder();
    expect((await kvarbookInProcess(['run', 'line.study.md', '--no-typecheck'], folder)).status).toBe(0);
    const base = readFileSync(join(folder, 'build/TEST-1-r1.html'));
    const variant = await kvarbookInProcess(
      ['run', 'line.study.md', '--no-typecheck', '--set', 'powerFactor=0.9', '--set', 'lineLength=280 km'],
      folder,
    );
    expect(variant.status).toBe(0);
    expect(variant.stdout).toContain('report: build/TEST-1-r1.lineLength-280km_powerFactor-0p9.html');
    expect(reportFiles(folder)).toEqual([
      'TEST-1-r1.html',
      'TEST-1-r1.lineLength-280km_powerFactor-0p9.html',
      'TEST-1-r1.lineLength-280km_powerFactor-0p9.results.json',
      'TEST-1-r1.results.json',
    ]);
    expect(readFileSync(join(folder, 'build/TEST-1-r1.html')).equals(base)).toBe(true);
    const html = readFileSync(join(folder, 'build/TEST-1-r1.lineLength-280km_powerFactor-0p9.html'), 'utf8');
    expect(html).toContain('<dt>Variant</dt><dd class="overridden">inputs overridden: lineLength = 280 km, powerFactor = 0.9</dd>');
  });

  it('names the files of a variant by --variant when given', async () => {
    const folder = studyFolder();
    const run = await kvarbookInProcess(['run', 'line.study.md', '--no-typecheck', '--set', 'lineLength=280km', '--variant', 'short-route'], folder);
    expect(run.status).toBe(0);
    expect(reportFiles(folder)).toEqual(['TEST-1-r1.short-route.html', 'TEST-1-r1.short-route.results.json']);
  });

  it('keeps a long list of overrides to a bounded name that still tells the variants apart', async () => {
    const folder = studyFolder();
    // The two differ only in the last digit of the last override, past where a long name is cut.
    const many = (last: number) => [
      '--set',
      'lineLength=281.5 km',
      '--set',
      'peakLoad=1234.567890123 MW',
      '--set',
      `powerFactor=0.9876543210${last}`,
    ];
    expect((await kvarbookInProcess(['run', 'line.study.md', '--no-typecheck', ...many(1)], folder)).status).toBe(0);
    expect((await kvarbookInProcess(['run', 'line.study.md', '--no-typecheck', ...many(2)], folder)).status).toBe(0);
    const names = reportFiles(folder).filter((name) => name.endsWith('.html'));
    expect(names).toHaveLength(2);
    for (const name of names) expect(name.length).toBeLessThanOrEqual('TEST-1-r1.'.length + 64 + '.html'.length);
  });

  it('refuses a --variant name that is not a plain file-name word, before running anything', async () => {
    const folder = studyFolder();
    const run = await kvarbookInProcess(['run', 'line.study.md', '--no-typecheck', '--variant', '../elsewhere'], folder);
    expect(run.status).toBe(1);
    expect(run.stderr).toContain('[variant-name]');
    expect(readdirSync(folder)).toEqual(['line.study.md']);
  });
});
