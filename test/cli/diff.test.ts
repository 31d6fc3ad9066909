import { copyFileSync, existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { kvarbookInProcess } from '../support/cli.ts';
import { studyText } from '../support/studies.ts';
import { sealWorkspace, type SealWorkspace } from '../security/sealWorkspace.ts';

function study(revision: number, lengthKm: number, cautionText: string): string {
  return studyText({
    inputs: `  lineLength: ${lengthKm} km`,
    body: [
      '# Charging',
      '',
      '```ts',
      'const chargingMvar = 0.4 * inputs.lineLength.in("km");',
      'result("Charging", chargingMvar, { unit: "Mvar" });',
      'result("Steady", 42, { unit: "kV" });',
      '```',
      '',
      '```ts',
      'criterion("Charging limit", chargingMvar, { max: 130, unit: "Mvar" });',
      `caution("${cautionText}");`,
      '```',
      '',
    ].join('\n'),
  }).replace('revision: 1', `revision: ${revision}`);
}

describe('kvarbook diff', () => {
  let space: SealWorkspace;
  const cli = (args: string[]) => kvarbookInProcess(args, space.folder, space.env);
  beforeAll(async () => {
    // Revision 1 sealed and printed to PDF; revision 2 a draft beside it.
    space = sealWorkspace('kvarbook-diff-');
    writeFileSync(join(space.folder, 'line.study.md'), study(1, 320, 'Old caution'));
    const sealed = await cli(['run', 'line.study.md', '--seal', '--pdf']);
    expect(sealed.stderr).toBe('');
    writeFileSync(join(space.folder, 'line.study.md'), study(2, 340, 'New caution <b>'));
    const draft = await cli(['run', 'line.study.md', '--no-typecheck']);
    expect(draft.stderr).toBe('');
  }, 120_000);

  it('finds no changes between a report and itself, and exits 0', async () => {
    const same = await cli(['diff', 'build/TEST-1-r1.html', 'build/TEST-1-r1.html']);
    expect(same.stderr).toBe('');
    expect(same.stdout).toContain('no changes');
    expect(same.status).toBe(0);
  });

  it('finds no changes between a sealed HTML report and its PDF', async () => {
    const same = await cli(['diff', 'build/TEST-1-r1.html', 'build/TEST-1-r1.pdf', '--json']);
    expect(JSON.parse(same.stdout).differences).toBe(0);
  });

  it('prints each change of the new revision once, and exits 0', async () => {
    const changed = await cli(['diff', 'build/TEST-1-r1.html', 'build/TEST-1-r2.html']);
    expect(changed.stderr).toBe('');
    expect(changed.status).toBe(0);
    const lines = changed.stdout.split('\n');
    const once = (text: string) =>
      expect(
        lines.filter((line) => line.includes(text)),
        text,
      ).toHaveLength(1);
    once('lineLength changed: 320 km → 340 km');
    once('Charging: 128 Mvar → 136 Mvar, +8 Mvar (5.88 %)');
    once('Charging limit flipped: meets: 128 Mvar against at most 130 Mvar → FAILS: 136 Mvar against at most 130 Mvar');
    once('changed block 2 (study line');
    once('-caution("Old caution");');
    once('+ New caution <b>');
    once('- Old caution');
    expect(lines.some((line) => line.startsWith('  Steady'))).toBe(false);
    expect(changed.stdout).toContain('sealed by Test Engineer, licence T-0 (Testland)');
  });

  it('gives the changes as JSON in a stable shape, reading the sealed PDF and the draft alike', async () => {
    const fromPdf = await cli(['diff', 'build/TEST-1-r1.pdf', 'build/TEST-1-r2.html', '--json']);
    expect(fromPdf.status).toBe(0);
    const diff = JSON.parse(fromPdf.stdout);
    expect(Object.keys(diff)).toEqual([
      'format',
      'old',
      'new',
      'differences',
      'frontMatter',
      'inputs',
      'results',
      'criteria',
      'cautions',
      'blocks',
      'environment',
    ]);
    expect(Object.keys(diff.old)).toEqual([
      'report',
      'studyId',
      'revision',
      'title',
      'studyFile',
      'figuresFrom',
      'sealedBy',
      'kvarbookVersion',
      'nodeVersion',
      'lockfileSha256',
    ]);
    expect(diff.old).toMatchObject({ report: 'build/TEST-1-r1.pdf', revision: '1', figuresFrom: 'seal' });
    expect(diff.new).toMatchObject({ report: 'build/TEST-1-r2.html', revision: '2', figuresFrom: 'results', sealedBy: null });
    expect(diff.results.map((change: { name: string }) => change.name)).toEqual(['Charging']);
    expect(Object.keys(diff.results[0])).toEqual(['name', 'change', 'reason', 'old', 'new', 'difference', 'relativeDifference', 'tolerance']);
    expect(diff.criteria.map((change: { name: string; change: string }) => [change.name, change.change])).toEqual([['Charging limit', 'flipped']]);
    expect(diff.cautions).toEqual({ added: ['New caution <b>'], removed: ['Old caution'] });
    expect(diff.differences).toBe(7);
  });

  it('writes a self-contained diff page, and refuses to write over it', async () => {
    const written = await cli(['diff', 'build/TEST-1-r1.html', 'build/TEST-1-r2.html', '--html', 'changes.html']);
    expect(written.status).toBe(0);
    expect(written.stdout).toContain('diff page: changes.html');
    const page = readFileSync(join(space.folder, 'changes.html'), 'utf8');
    expect(page).toContain('<meta http-equiv="Content-Security-Policy" content="default-src \'none\'');
    expect(page).toContain('New caution &lt;b&gt;');
    expect(page).not.toContain('<b>');
    expect(page).not.toMatch(/<script|<link|src=|https?:\/\//);
    const again = await cli(['diff', 'build/TEST-1-r1.html', 'build/TEST-1-r1.html', '--html', 'changes.html']);
    expect(again.status).toBe(1);
    expect(again.stderr).toContain('[diff-page-exists]');
    expect(again.stdout).toBe('');
    expect(readFileSync(join(space.folder, 'changes.html'), 'utf8')).toBe(page);
  });

  it('writes over an existing diff page only with --replace', async () => {
    writeFileSync(join(space.folder, 'old-page.html'), 'earlier page');
    const replaced = await cli(['diff', 'build/TEST-1-r1.html', 'build/TEST-1-r1.html', '--html', 'old-page.html', '--replace']);
    expect(replaced.status).toBe(0);
    expect(readFileSync(join(space.folder, 'old-page.html'), 'utf8')).toContain('Changes from TEST-1 revision 1 to TEST-1 revision 1');
  });

  it('refuses a file that is not a report, naming it', async () => {
    const refused = await cli(['diff', 'line.study.md', 'build/TEST-1-r2.html']);
    expect(refused.status).toBe(1);
    expect(refused.stderr).toContain('line.study.md is not a kvarbook report');
    expect(refused.stderr).toContain('[diff-not-report]');
  });

  it('refuses an unsealed HTML report that has lost the results beside it, saying what to keep', async () => {
    copyFileSync(join(space.folder, 'build/TEST-1-r2.html'), join(space.folder, 'alone.html'));
    expect(existsSync(join(space.folder, 'alone.results.json'))).toBe(false);
    const refused = await cli(['diff', 'build/TEST-1-r1.html', 'alone.html']);
    expect(refused.status).toBe(1);
    expect(refused.stderr).toContain('alone.html is an unsealed HTML report');
    expect(refused.stderr).toContain('[diff-no-figures]');
  });
});
