// `kvarbook new --list`: one line per template, its summary taken from the template itself.
import { readFileSync } from 'node:fs';
import { resolve } from 'node:path';
import { describe, expect, it } from 'vitest';
import { kvarbookInProcess, scratchFolder } from '../support/cli.ts';
import { templateNames } from '../../src/cli/templateFiles.ts';

const templateSource = (name: string) => readFileSync(resolve(import.meta.dirname, '../../templates', `${name}.study.md`), 'utf8');

describe('kvarbook new --list', () => {
  it('prints one line per template: its name, then the first sentence under its Purpose heading', async () => {
    const { status, stdout, stderr } = await kvarbookInProcess(['new', '--list'], scratchFolder());
    expect(stderr).toBe('');
    expect(status).toBe(0);
    const lines = stdout.trimEnd().split('\n');
    expect(lines.map((line) => line.split(/\s+/)[0])).toEqual(templateNames());
    for (const [index, name] of templateNames().entries()) {
      const purpose = templateSource(name)
        .split(/^# Purpose\b.*$/m)[1]!
        .trim()
        .split(/\n\s*\n/)[0]!
        .replace(/\s+/g, ' ');
      const firstSentence = /^.*?\.(?=\s|$)/.exec(purpose)![0];
      expect(lines[index]!.slice(name.length).trim()).toBe(firstSentence);
    }
  });

  it('names the light-load and peak-load templates by what they are for', async () => {
    const { stdout } = await kvarbookInProcess(['new', '--list'], scratchFolder());
    expect(stdout).toMatch(/^light-load +Light-load voltage control of a long line: /m);
    expect(stdout).toMatch(/^peak-load +Peak-load voltage support at the receiving end of a line: /m);
  });

  it('refuses a template name beside --list as wrong usage (exit 2)', async () => {
    const { status, stderr } = await kvarbookInProcess(['new', '--list', 'blank'], scratchFolder());
    expect(status).toBe(2);
    expect(stderr).toContain('--list takes no template or file');
  });

  it('refuses new without a file as wrong usage (exit 2)', async () => {
    const { status, stderr } = await kvarbookInProcess(['new', 'blank'], scratchFolder());
    expect(status).toBe(2);
    expect(stderr).toContain("missing required argument 'file'");
  });
});
