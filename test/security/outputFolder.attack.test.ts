import { existsSync, readFileSync, readdirSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { kvarbook, kvarbookInProcess, scratchFolder } from '../support/cli.ts';
import { studyText } from '../support/studies.ts';
import { PASSPHRASE, newSigner, sealWorkspace } from './sealWorkspace.ts';

const study = studyText({
  inputs: '  lineLength: 320 km',
  body: '```ts\nconst chargingMvar = 0.4 * inputs.lineLength.in("km");\nresult("Charging", chargingMvar, { unit: "Mvar" });\n```\n',
});

// The runs that set a folder up use the command line in this process; the run whose effect on the folder is tested is a
// process of its own, as a user starts it.

function studyFolder(prefix: string): string {
  const folder = scratchFolder(prefix);
  writeFileSync(join(folder, 'line.study.md'), study);
  return folder;
}

/** Every file below `folder`, as paths relative to it. */
function filesBelow(folder: string): string[] {
  return existsSync(folder)
    ? (readdirSync(folder, { recursive: true, withFileTypes: true }) as import('node:fs').Dirent[])
        .filter((entry) => entry.isFile())
        .map((entry) => join(entry.parentPath, entry.name).slice(folder.length + 1))
        .sort()
    : [];
}

describe('writes through symbolic links', () => {
  it('refuses a build folder that is a link to a folder elsewhere, and writes nothing there', () => {
    const folder = studyFolder('kvarbook-link-build-');
    const elsewhere = scratchFolder('kvarbook-link-target-');
    symlinkSync(elsewhere, join(folder, 'build'));
    const run = kvarbook(['run', 'line.study.md', '--no-typecheck'], folder);
    expect(run.status).toBe(1);
    expect(run.stderr).toContain('output-folder-link');
    expect(run.stderr).toContain('build is a symbolic link');
    expect(readdirSync(elsewhere)).toEqual([]);
  });

  it('refuses a superseded folder that is a link out of the output folder, and moves no sealed set through it', async () => {
    const space = sealWorkspace('kvarbook-link-superseded-');
    writeFileSync(join(space.folder, 'line.study.md'), study);
    expect((await kvarbookInProcess(['run', 'line.study.md', '--seal'], space.folder, space.env)).status).toBe(0);
    const elsewhere = scratchFolder('kvarbook-link-target-');
    symlinkSync(elsewhere, join(space.folder, 'build', 'superseded'));
    const replaced = kvarbook(['run', 'line.study.md', '--seal', '--replace-sealed'], space.folder, space.env);
    expect(replaced.status).toBe(1);
    expect(replaced.stderr).toContain('output-folder-link');
    expect(filesBelow(elsewhere)).toEqual([]);
  });
});

describe('nothing lost', () => {
  it('keeps the counter-signature of every superseded set, also when a second replacement supersedes an identical seal', async () => {
    const space = sealWorkspace('kvarbook-two-replacements-');
    writeFileSync(join(space.folder, 'line.study.md'), study);
    const records: string[] = [];
    for (const checker of ['First Checker', 'Second Checker']) {
      const keys = join(space.folder, `${checker.split(' ')[0]}-keys`);
      newSigner(checker, checker === 'First Checker' ? 'C-1' : 'C-2', 'Testland', space.trustFolder, keys);
      const sealed = await kvarbookInProcess(['run', 'line.study.md', '--seal', '--replace-sealed'], space.folder, space.env);
      expect(sealed.status, sealed.stderr).toBe(0);
      const signed = await kvarbookInProcess(['check', 'build/TEST-1-r1.html', '--sign', '--keys', keys], space.folder, {
        ...space.env,
        KVARBOOK_PASSPHRASE: PASSPHRASE,
      });
      expect(signed.status, signed.stdout + signed.stderr).toBe(0);
      records.push(readFileSync(join(space.folder, 'build', 'TEST-1-r1.check.json'), 'utf8'));
    }
    expect(kvarbook(['run', 'line.study.md', '--seal', '--replace-sealed'], space.folder, space.env).status).toBe(0);
    const superseded = join(space.folder, 'build', 'superseded');
    const kept = readdirSync(superseded).map((set) => readFileSync(join(superseded, set, 'TEST-1-r1.check.json'), 'utf8'));
    expect(kept.sort()).toEqual([...records].sort());
    expect(records[0]).not.toBe(records[1]);
  }, 180_000);

  it('never leaves the PDF of an earlier run beside the HTML of a later one', async () => {
    const folder = studyFolder('kvarbook-stale-pdf-');
    expect((await kvarbookInProcess(['run', 'line.study.md', '--no-typecheck', '--pdf'], folder)).status).toBe(0);
    writeFileSync(join(folder, 'line.study.md'), study.replace('lineLength: 320 km', 'lineLength: 100 km'));
    expect(kvarbook(['run', 'line.study.md', '--no-typecheck'], folder).status).toBe(0);
    expect(readFileSync(join(folder, 'build', 'TEST-1-r1.html'), 'utf8')).toContain('40.00 Mvar');
    expect(existsSync(join(folder, 'build', 'TEST-1-r1.pdf'))).toBe(false);
  });

  it('never overwrites a sealed PDF, even when the HTML and the seal file beside it were deleted: a draft goes beside it', async () => {
    const space = sealWorkspace('kvarbook-sealed-pdf-');
    writeFileSync(join(space.folder, 'line.study.md'), study);
    expect((await kvarbookInProcess(['run', 'line.study.md', '--seal', '--pdf'], space.folder, space.env)).status).toBe(0);
    const sealedPdf = readFileSync(join(space.folder, 'build', 'TEST-1-r1.pdf'));
    for (const name of ['TEST-1-r1.html', 'TEST-1-r1.seal.json']) rmSync(join(space.folder, 'build', name));
    const again = kvarbook(['run', 'line.study.md', '--no-typecheck', '--pdf'], space.folder, space.env);
    expect(again.status).toBe(0);
    expect(again.stdout).toContain('report: build/TEST-1-r1.draft.html');
    expect(existsSync(join(space.folder, 'build', 'TEST-1-r1.draft.pdf'))).toBe(true);
    expect(readFileSync(join(space.folder, 'build', 'TEST-1-r1.pdf')).equals(sealedPdf)).toBe(true);
  });
});
