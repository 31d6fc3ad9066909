// Problems at the command line: every problem located in the study prints its lines once, whichever stage found it.
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { kvarbook, kvarbookInProcess, scratchFolder } from '../support/cli.ts';
import { lineOf, studyText } from '../support/studies.ts';

function runFailing(source: string): string {
  const folder = scratchFolder();
  writeFileSync(join(folder, 'line.study.md'), source);
  const { status, stderr } = kvarbook(['run', 'line.study.md', '--no-typecheck'], folder);
  expect(status).toBe(1);
  return stderr;
}

/** The excerpt's line for study line `line`, marked as the problem's line (numbers are padded to one width). */
function markedLine(source: string, line: number): RegExp {
  const text = source.split('\n')[line - 1]!.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');
  return new RegExp(`^  > +${line} \\| ${text}$`, 'm');
}

describe('diagnostics at the command line', () => {
  it('prints the study lines and a caret under a solver error raised inside a block', () => {
    const source = studyText({
      body: '```ts\nconst perKm = { frequencyHz: 50, seriesResistanceOhmPerKm: 0.03, seriesReactanceOhmPerKm: 0.3, shuntSusceptanceUsPerKm: 4 };\nconst line = solver.lineModel({ ...perKm, lengthKm: -5, model: "distributed" });\n```\n',
    });
    const line = lineOf(source, 'lengthKm: -5');
    const stderr = runFailing(source);
    expect(stderr).toMatch(
      new RegExp(`^line\\.study\\.md:${line}:\\d+: error: .*lengthKm = -5 is outside the allowed range .*\\[out-of-range\\]$`, 'm'),
    );
    expect(stderr).toMatch(markedLine(source, line));
    expect(stderr).toMatch(/^\s+\| +\^$/m);
  });

  it('prints the study lines of a front-matter error found while reading the study meta data', () => {
    const source = studyText({ body: 'Text.\n' }).replace('date: 2026-11-20', 'date: 2026-13-45');
    const line = lineOf(source, 'date: 2026-13-45');
    const stderr = runFailing(source);
    expect(stderr).toMatch(new RegExp(`^line\\.study\\.md:${line}:7: error: .*\\[front-matter-date\\]$`, 'm'));
    expect(stderr).toMatch(markedLine(source, line));
    // The caret spans the date, from its first character to its last.
    expect(stderr).toContain(`| ${' '.repeat('date: '.length)}${'^'.repeat('2026-13-45'.length)}\n`);
  });

  it('prints a YAML mistake in the front matter once, with its study lines and the cause in the hint', async () => {
    const source = studyText({ inputs: '  peakLoad: { value: 1,200 MW, quantity: active power, description: Winter peak }', body: 'Text.\n' });
    const folder = scratchFolder();
    writeFileSync(join(folder, 'line.study.md'), source);
    const { status, stderr } = await kvarbookInProcess(['run', 'line.study.md', '--no-typecheck'], folder);
    expect(status).toBe(1);
    const line = lineOf(source, 'value: 1,200 MW');
    expect(stderr.match(/ error: /g)).toHaveLength(1);
    expect(stderr).toMatch(new RegExp(`^line\\.study\\.md:${line}:\\d+: error: .*\\[front-matter-flow-comma\\]$`, 'm'));
    expect(stderr).toMatch(markedLine(source, line));
    expect(stderr).toContain(`| ${' '.repeat('  peakLoad: { value: '.length)}${'^'.repeat('1,200 MW'.length)}\n`);
    expect(stderr).toContain('hint: inside { } a comma separates keys; put a value that holds a comma in quotes: value: "1,200 MW"');
  });

  it('prints the study lines of an input outside its declared range', () => {
    const source = studyText({ inputs: '  lineLength: { value: 9000 km, min: 1 km, max: 2000 km }', body: 'Text.\n' });
    const line = lineOf(source, 'value: 9000 km');
    const stderr = runFailing(source);
    expect(stderr).toMatch(new RegExp(`^line\\.study\\.md:${line}:\\d+: error: .*\\[input-out-of-range\\]$`, 'm'));
    expect(stderr).toMatch(markedLine(source, line));
  });
});
