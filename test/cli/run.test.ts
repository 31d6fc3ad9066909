import { existsSync, readFileSync, readdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { kvarbook, kvarbookInProcess, scratchFolder } from '../support/cli.ts';
import { lineOf, studyText } from '../support/studies.ts';
import { templateNames } from '../../src/cli/templateFiles.ts';

const goodStudy = studyText({ inputs: '  lineLength: 320 km', body: '```ts\nresult("length", inputs.lineLength.in("km"), { unit: "km" });\n```\n' });

describe('kvarbook on the command line', () => {
  it('prints help with the commands and exits 0', () => {
    const { status, stdout } = kvarbook(['--help'], scratchFolder());
    expect(status).toBe(0);
    expect(stdout).toContain('run [options] <study>');
    expect(stdout).toContain('new [options] [template] [file]');
  });

  it('exits 2 on wrong usage', () => {
    const { status, stderr } = kvarbook(['run', '--no-such-option', 'x.study.md'], scratchFolder());
    expect(status).toBe(2);
    expect(stderr).toContain('unknown option');
  });

  it('runs a study, writes the report and results, and is quiet when not on a terminal', () => {
    const folder = scratchFolder();
    writeFileSync(join(folder, 'line.study.md'), goodStudy);
    const { status, stdout, stderr } = kvarbook(['run', 'line.study.md', '--set', 'lineLength=280km'], folder);
    expect(stderr).toBe('');
    expect(status).toBe(0);
    expect(stdout).toContain('build/TEST-1-r1.lineLength-280km.html');
    const results = JSON.parse(readFileSync(join(folder, 'build/TEST-1-r1.lineLength-280km.results.json'), 'utf8'));
    expect(results.results[0]).toMatchObject({ name: 'length', value: 280, unit: 'km' });
    expect(results.inputs[0]).toMatchObject({ name: 'lineLength', source: 'overridden' });
  });

  it('exits 1 with a located message and no internal stack when a block fails, leaving the earlier report intact', async () => {
    const folder = scratchFolder();
    writeFileSync(join(folder, 'line.study.md'), goodStudy);
    // The earlier report, by the command line in this process; the failing run is a process of its own.
    expect((await kvarbookInProcess(['run', 'line.study.md', '--no-typecheck'], folder)).status).toBe(0);
    const before = readFileSync(join(folder, 'build/TEST-1-r1.html'));
    const broken = goodStudy.replace('result("length"', 'throw new Error("deliberate"); result("length"');
    writeFileSync(join(folder, 'line.study.md'), broken);
    const { status, stderr } = kvarbook(['run', 'line.study.md', '--no-typecheck'], folder);
    expect(status).toBe(1);
    expect(stderr).toContain(`line.study.md:${lineOf(broken, 'deliberate')}:`);
    expect(stderr).toContain('deliberate');
    expect(stderr).not.toMatch(/\n\s+at /);
    expect(readFileSync(join(folder, 'build/TEST-1-r1.html')).equals(before)).toBe(true);
    expect(readdirSync(join(folder, 'build')).sort()).toEqual(['.kvarbook', 'TEST-1-r1.html', 'TEST-1-r1.results.json']);
  });

  it('says in one line how to install Chromium when --pdf cannot find it, and still writes the HTML', () => {
    const folder = scratchFolder();
    writeFileSync(join(folder, 'line.study.md'), goodStudy);
    const { status, stderr } = kvarbook(['run', 'line.study.md', '--pdf', '--no-typecheck'], folder, {
      KVARBOOK_CHROMIUM: join(folder, 'no-such-chromium'),
    });
    expect(status).toBe(1);
    expect(stderr.trim().split('\n')[0]).toMatch(/apt-get install -y chromium/);
    expect(existsSync(join(folder, 'build/TEST-1-r1.html'))).toBe(true);
    expect(existsSync(join(folder, 'build/TEST-1-r1.pdf'))).toBe(false);
  });

  it('exits 1 naming the file when the study does not exist', () => {
    const { status, stderr } = kvarbook(['run', 'missing.study.md'], scratchFolder());
    expect(status).toBe(1);
    expect(stderr).toContain('missing.study.md does not exist');
  });

  it('starts a study from the blank template and never overwrites one', () => {
    const folder = scratchFolder();
    expect(kvarbook(['new', 'blank', 'mine.study.md'], folder).status).toBe(0);
    expect(existsSync(join(folder, 'mine.study.md'))).toBe(true);
    writeFileSync(join(folder, 'mine.study.md'), 'my work');
    const again = kvarbook(['new', 'blank', 'mine.study.md'], folder);
    expect(again.status).toBe(1);
    expect(readFileSync(join(folder, 'mine.study.md'), 'utf8')).toBe('my work');
  });

  // The template is the subject here, not the process: the command line in this process.
  it.each(templateNames())('runs the study the %s template makes, type-checked', async (template) => {
    const folder = scratchFolder();
    expect((await kvarbookInProcess(['new', template, 'mine.study.md'], folder)).status).toBe(0);
    const run = await kvarbookInProcess(['run', 'mine.study.md'], folder);
    expect(run.stderr).toBe('');
    expect(run.status).toBe(0);
  });
});
