import { readFileSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { type CliOutcome, kvarbookInProcess, scratchFolder } from '../support/cli.ts';
import { lineOf, studyText } from '../support/studies.ts';
import { newSigner, reseal, sealWorkspace, type SealWorkspace } from './sealWorkspace.ts';

// The charging is hidden in a hide-code block; the criterion fails (128 Mvar is above 100 Mvar).
const study = studyText({
  inputs: '  lineLength: 320 km',
  body: [
    '# Charging',
    '',
    '```ts hide-code',
    'const chargingMvar = 0.4 * inputs.lineLength.in("km");',
    '```',
    '',
    '```ts',
    'result("Charging", chargingMvar, { unit: "Mvar" });',
    'criterion("Charging within the reactor rating", chargingMvar, { unit: "Mvar", max: 100 });',
    '```',
    '',
  ].join('\n'),
});

// The command line in this process: what is tested is what the check finds and says, not the process.
describe('attacks on what a sealed report says', () => {
  let space: SealWorkspace;
  let sealedHtml: string;
  /** The check of the report as sealed, which two tests read. */
  let asSealed: CliOutcome;
  beforeAll(async () => {
    space = sealWorkspace('kvarbook-body-attack-');
    writeFileSync(join(space.folder, 'line.study.md'), study);
    const sealed = await kvarbookInProcess(['run', 'line.study.md', '--seal'], space.folder, space.env);
    expect(sealed.status, sealed.stderr).toBe(0);
    sealedHtml = readFileSync(join(space.folder, 'build/TEST-1-r1.html'), 'utf8');
    asSealed = await kvarbookInProcess(['check', 'build/TEST-1-r1.html'], space.folder, space.env);
  });

  it('fails the check of a body the engineer edited (a failing criterion shown as met) and sealed', async () => {
    const edited = reseal(sealedHtml, space.engineer, (parts) => {
      const meets = (text: string) =>
        text
          .replaceAll('<span class="verdict fail">fails</span>', '<span class="verdict pass">meets</span>')
          .replaceAll('<tr class="fail">', '<tr class="pass">')
          .replace('<dd class="fail">1 of 1 criterion not met</dd>', '<dd class="pass">the one criterion is met</dd>');
      const changed = { head: meets(parts.head), body: meets(parts.body) };
      expect(changed).not.toEqual(parts);
      return changed;
    });
    writeFileSync(join(space.folder, 'edited.html'), edited);
    const check = await kvarbookInProcess(['check', 'edited.html'], space.folder, space.env);
    expect(check.stdout).toMatch(/report body\s+FAIL/);
    expect(check.stdout).toContain('verdict: NOT VERIFIED');
    expect(check.status).toBe(1);
  });

  it('fails the check of a seal made by a trusted engineer other than the one the study names, and says who', async () => {
    const other = newSigner('Other Engineer', 'O-9', 'Testland', space.trustFolder);
    try {
      writeFileSync(join(space.folder, 'other.html'), reseal(sealedHtml, other));
      const check = await kvarbookInProcess(['check', 'other.html'], space.folder, space.env);
      expect(check.stdout).toMatch(
        /engineer\s+FAIL\s+the seal is by Other Engineer, licence O-9 \(Testland\), but the study names Test Engineer, licence T-0 \(Testland\)/,
      );
      expect(check.stdout).toContain('verdict: NOT VERIFIED');
      expect(check.status).toBe(1);
    } finally {
      rmSync(join(space.trustFolder, 'O-9.json'));
    }
  });

  it('says next to the verdict how many blocks hide their code and on which study lines it is', () => {
    const check = asSealed;
    expect(check.status, check.stdout).toBe(0);
    const from = lineOf(study, '```ts hide-code');
    const lines = check.stdout.trimEnd().split('\n');
    const verdictAt = lines.findIndex((line) => line.startsWith('verdict:'));
    expect(lines[verdictAt - 1]).toBe(
      `hidden code: 1 of 2 blocks runs with its code left out of the report; read it in the study source, lines ${from}–${from + 2}`,
    );
  });

  it('names the study, revision and engineer whose report it verified', () => {
    const check = asSealed;
    expect(check.stdout).toContain('verdict: VERIFIED: study TEST-1, revision 1, sealed by Test Engineer, licence T-0 (Testland)');
  });

  it('says in its own words when the trust folder is missing, and when it is empty', async () => {
    const missing = await kvarbookInProcess(
      ['check', 'build/TEST-1-r1.html', '--trust', join(space.folder, 'no-such-folder')],
      space.folder,
      space.env,
    );
    expect(missing.stdout).toContain(`trust folder: ${join(space.folder, 'no-such-folder')} does not exist, so no signer can be trusted`);
    const empty = await kvarbookInProcess(['check', 'build/TEST-1-r1.html', '--trust', scratchFolder()], space.folder, space.env);
    expect(empty.stdout).toMatch(/trust folder: \S+ holds no identities, so no signer can be trusted/);
    expect(empty.status).toBe(1);
  });
});
