import { execFileSync } from 'node:child_process';
import { existsSync, readFileSync, readdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { kvarbook, kvarbookInProcess, scratchFolder } from '../support/cli.ts';
import { studyText } from '../support/studies.ts';
import { readPdfAttachments } from '../../src/report/pdf/index.ts';
import { PASSPHRASE, newSigner, sealWorkspace, type SealWorkspace } from '../security/sealWorkspace.ts';

const study = studyText({
  inputs: '  lineLength: 320 km',
  body: '# Charging\n\n```ts\nconst chargingMvar = 0.4 * inputs.lineLength.in("km");\nresult("Charging", chargingMvar, { unit: "Mvar" });\n```\n\nThe line charges {{ chargingMvar }} Mvar.\n',
});

/**
 * The command line in this process (src/cli's main, as the executable calls it). The sealing run and the first check
 * below are whole processes, so the passphrase and home folder are read from the environment the executable keeps.
 */
const cli = kvarbookInProcess;

/** One engineer with a key (made cheaply: `key new` itself is run in the counter-signing test), a trust folder with the engineer's identity, and the study. */
function workspace(): SealWorkspace {
  const space = sealWorkspace('kvarbook-seal-');
  writeFileSync(join(space.folder, 'line.study.md'), study);
  return space;
}

describe('sealing and checking from the command line', () => {
  let space: SealWorkspace;
  beforeAll(async () => {
    space = workspace();
    const sealed = kvarbook(['run', 'line.study.md', '--seal', '--pdf'], space.folder, space.env);
    expect(sealed.stderr).toBe('');
    expect(sealed.status).toBe(0);
  });

  it('writes the sealed report, its seal file and a PDF, and the check verifies them', async () => {
    expect(readdirSync(join(space.folder, 'build')).sort()).toEqual([
      '.kvarbook',
      'TEST-1-r1.html',
      'TEST-1-r1.pdf',
      'TEST-1-r1.results.json',
      'TEST-1-r1.seal.json',
    ]);
    const check = kvarbook(['check', 'build/TEST-1-r1.html'], space.folder, space.env);
    expect(check.stdout).toContain('verdict: VERIFIED');
    expect(check.status).toBe(0);
  });

  it('verifies from the PDF alone', async () => {
    const check = await cli(['check', 'build/TEST-1-r1.pdf', '--json'], space.folder, space.env);
    expect(JSON.parse(check.stdout).verdict).toBe('verified');
    expect(check.status).toBe(0);
  });

  it('prints the title and the spliced value in the PDF, and carries the results JSON as an attachment', async () => {
    const text = execFileSync('pdftotext', [join(space.folder, 'build/TEST-1-r1.pdf'), '-'], { encoding: 'utf8' });
    expect(text).toContain('Test study');
    expect(text).toContain('128.0');
    const attachments = await readPdfAttachments(readFileSync(join(space.folder, 'build/TEST-1-r1.pdf')));
    const results = attachments.find((attachment) => attachment.fileName === 'TEST-1-r1.results.json');
    expect(Buffer.from(results!.content).equals(readFileSync(join(space.folder, 'build/TEST-1-r1.results.json')))).toBe(true);
    const seal = attachments.find((attachment) => attachment.fileName === 'TEST-1-r1.seal.json');
    expect(Buffer.from(seal!.content).equals(readFileSync(join(space.folder, 'build/TEST-1-r1.seal.json')))).toBe(true);
  });

  it('writes a draft beside the sealed report, and leaves the sealed one as it was', async () => {
    const before = readFileSync(join(space.folder, 'build/TEST-1-r1.html'));
    const draft = await cli(['run', 'line.study.md'], space.folder, space.env);
    expect(draft.status).toBe(0);
    expect(draft.stdout).toContain('the sealed report build/TEST-1-r1.html is kept; this draft is written beside it');
    expect(draft.stdout).toContain('report: build/TEST-1-r1.draft.html');
    expect(readFileSync(join(space.folder, 'build/TEST-1-r1.html')).equals(before)).toBe(true);
    expect(readFileSync(join(space.folder, 'build/TEST-1-r1.draft.html'), 'utf8')).toContain('<strong>Not sealed.</strong>');
  });

  it('refuses to seal over the sealed report, and leaves it as it was', async () => {
    const before = readFileSync(join(space.folder, 'build/TEST-1-r1.html'));
    const again = await cli(['run', 'line.study.md', '--seal'], space.folder, space.env);
    expect(again.status).toBe(1);
    expect(again.stderr).toContain('sealed-report-exists');
    expect(readFileSync(join(space.folder, 'build/TEST-1-r1.html')).equals(before)).toBe(true);
  });

  it('fails the check, exit 1, when a figure in the report is edited', async () => {
    const html = readFileSync(join(space.folder, 'build/TEST-1-r1.html'), 'utf8');
    writeFileSync(join(space.folder, 'edited.html'), html.replace('<dd>128.0 Mvar</dd>', '<dd>118.0 Mvar</dd>'));
    const check = await cli(['check', 'edited.html'], space.folder, space.env);
    expect(check.status).toBe(1);
    expect(check.stdout).toContain('report unchanged   FAIL');
  });

  it('fails the check against an edited copy of the study source', async () => {
    writeFileSync(join(space.folder, 'edited.study.md'), study.replace('0.4 *', '0.41 *'));
    const check = await cli(['check', 'build/TEST-1-r1.html', '--source', 'edited.study.md'], space.folder, space.env);
    expect(check.status).toBe(1);
    expect(check.stdout).toContain('study source       FAIL');
  });

  it('shows which lines of an edited copy of the study source differ from the sealed source', async () => {
    const edited = study.replace('0.4 *', '0.41 *').replace('# Charging', '# Charging of the line');
    writeFileSync(join(space.folder, 'edited.study.md'), edited);
    const check = await cli(['check', 'build/TEST-1-r1.html', '--source', 'edited.study.md'], space.folder, space.env);
    const sealedLines = study.split('\n');
    const lineOfSealed = (needle: string) => sealedLines.findIndex((line) => line.includes(needle)) + 1;
    expect(check.stdout).toContain(
      `   study source, line ${lineOfSealed('# Charging')} as sealed, line ${lineOfSealed('# Charging')} in edited.study.md:`,
    );
    expect(check.stdout).toContain('     - # Charging\n     + # Charging of the line\n');
    expect(check.stdout).toContain(
      '     - const chargingMvar = 0.4 * inputs.lineLength.in("km");\n     + const chargingMvar = 0.41 * inputs.lineLength.in("km");\n',
    );
    const json = await cli(['check', 'build/TEST-1-r1.html', '--source', 'edited.study.md', '--json'], space.folder, space.env);
    expect(JSON.parse(json.stdout).sourceDifference).toHaveLength(2);
  });

  it('fails the check when the signer is not trusted', async () => {
    const check = await cli(['check', 'build/TEST-1-r1.html', '--trust', scratchFolder()], space.folder, space.env);
    expect(check.status).toBe(1);
    expect(check.stdout).toContain('NOT in the trust folder');
  });

  it("gives the command that makes the checker's key when counter-signing without one", async () => {
    const signed = await cli(['check', 'build/TEST-1-r1.html', '--sign', '--keys', join(space.folder, 'no-keys')], space.folder, space.env);
    expect(signed.status).toBe(1);
    expect(signed.stderr).toContain('seal-no-default-key');
    expect(signed.stderr).toContain(
      `kvarbook key new --name <name> --licence <licence> --jurisdiction <jurisdiction> --keys ${join(space.folder, 'no-keys')}`,
    );
  });

  it('refuses to counter-sign with the key that sealed the report', async () => {
    const signed = await cli(['check', 'build/TEST-1-r1.html', '--sign'], space.folder, space.env);
    expect(signed.status).toBe(1);
    expect(signed.stderr).toContain('check-own-seal');
    expect(existsSync(join(space.folder, 'build/TEST-1-r1.check.json'))).toBe(false);
  });

  it("counter-signs a verified report with the checker's key: a check record and a report showing both signatures", async () => {
    const checkerKeys = join(space.folder, 'checker-keys');
    expect(
      (
        await cli(
          ['key', 'new', '--name', 'Second Checker', '--licence', 'C-2', '--jurisdiction', 'Testland', '--keys', checkerKeys],
          space.folder,
          space.env,
        )
      ).status,
    ).toBe(0);
    expect(
      (await cli(['key', 'show', '--keys', checkerKeys, '--out', join(space.folder, 'home', 'trusted', 'checker.json')], space.folder, space.env))
        .status,
    ).toBe(0);
    const signed = await cli(['check', 'build/TEST-1-r1.html', '--sign', '--keys', checkerKeys], space.folder, space.env);
    expect(signed.status).toBe(0);
    const checked = readFileSync(join(space.folder, 'build/TEST-1-r1.checked.html'), 'utf8');
    expect(checked).toContain('<strong>Sealed</strong> by Test Engineer');
    expect(checked).toContain('<strong>Checked</strong> by Second Checker');
    const recheck = await cli(['check', 'build/TEST-1-r1.checked.html'], space.folder, space.env);
    expect(recheck.stdout).toContain('counter-signatures');
    expect(recheck.status).toBe(0);
  });

  it('moves the sealed set aside, never deleting it, when asked to replace it', async () => {
    const replaced = await cli(['run', 'line.study.md', '--seal', '--replace-sealed'], space.folder, space.env);
    expect(replaced.status).toBe(0);
    const superseded = readdirSync(join(space.folder, 'build', 'superseded'));
    expect(superseded).toHaveLength(1);
    expect(readdirSync(join(space.folder, 'build', 'superseded', superseded[0]!))).toContain('TEST-1-r1.seal.json');
  });

  it('never writes private key material into any output file', async () => {
    const keysFolder = join(space.folder, 'home', 'keys');
    const keyFile = readdirSync(keysFolder).find((name) => name.endsWith('.key.pem'))!;
    const pemLines = readFileSync(join(keysFolder, keyFile), 'utf8')
      .split('\n')
      .filter((line) => line && !line.startsWith('-----'));
    const outputs = readdirSync(join(space.folder, 'build')).filter(
      (name) => name.startsWith('TEST-1-r1.') && existsSync(join(space.folder, 'build', name)),
    );
    for (const name of outputs) {
      const content = readFileSync(join(space.folder, 'build', name)).toString('latin1');
      expect(content).not.toMatch(/PRIVATE KEY/);
      for (const line of pemLines) expect(content).not.toContain(line);
    }
  });
});

describe('a sealed variant', () => {
  it('has files of its own, and its seal says it is a variant and which inputs are overridden', async () => {
    const space = workspace();
    const sealed = await cli(['run', 'line.study.md', '--seal', '--set', 'lineLength=280km'], space.folder, space.env);
    expect(sealed.status).toBe(0);
    const html = readFileSync(join(space.folder, 'build/TEST-1-r1.lineLength-280km.html'), 'utf8');
    expect(html).toMatch(
      /<section class="seal sealed" id="seal">[\s\S]*<strong>This is a variant of the study<\/strong>: sealed with lineLength = 280 km in place/,
    );
    expect(existsSync(join(space.folder, 'build/TEST-1-r1.lineLength-280km.seal.json'))).toBe(true);
    const check = await cli(['check', 'build/TEST-1-r1.lineLength-280km.html'], space.folder, space.env);
    expect(check.stdout).toContain('verdict: VERIFIED');
  });
});

describe('a sealed study with a criterion not met', () => {
  const failing = studyText({
    body: '```ts\ncriterion("Receiving-end voltage", 1.09, { max: 1.05, unit: "pu" });\ncriterion("Angle across the line", 21, { max: 30, unit: "deg" });\ncriterion("Sending-end voltage", 0.93, { min: 0.95, unit: "pu" });\n```\n',
  });
  let space: SealWorkspace;
  let sealing: Awaited<ReturnType<typeof cli>>;
  beforeAll(async () => {
    space = sealWorkspace('kvarbook-seal-');
    writeFileSync(join(space.folder, 'line.study.md'), failing);
    sealing = await cli(['run', 'line.study.md', '--seal'], space.folder, space.env);
  });

  it('is sealed, with a warning on the terminal naming the criteria not met', () => {
    expect(sealing.status).toBe(0);
    expect(existsSync(join(space.folder, 'build', 'TEST-1-r1.seal.json'))).toBe(true);
    expect(sealing.stderr).toBe('kvarbook: warning: sealed with 2 of 3 criteria not met: Receiving-end voltage, Sending-end voltage\n');
  });

  it("says in the check's verdict how many criteria the seal records as not met", async () => {
    const check = await cli(['check', 'build/TEST-1-r1.html'], space.folder, space.env);
    expect(check.status).toBe(0);
    expect(check.stdout).toMatch(/^verdict: VERIFIED: .*; figures verified; 2 of 3 criteria not met, as sealed$/m);
    const json = await cli(['check', 'build/TEST-1-r1.html', '--json'], space.folder, space.env);
    expect(JSON.parse(json.stdout).criteria).toEqual({ total: 3, notMet: ['Receiving-end voltage', 'Sending-end voltage'] });
  });

  it('says in the title block how many criteria are not met', () => {
    const html = readFileSync(join(space.folder, 'build', 'TEST-1-r1.html'), 'utf8');
    expect(html).toContain('<dt>Status</dt><dd class="fail">2 of 3 criteria not met</dd>');
  });
});

describe('keys', () => {
  it('gives the command that makes the engineer a signing key when there is none', async () => {
    const folder = scratchFolder('kvarbook-seal-');
    writeFileSync(join(folder, 'line.study.md'), study.replace('name: Test Engineer', "name: Test O'Engineer"));
    const run = await cli(['run', 'line.study.md', '--seal'], folder, { KVARBOOK_HOME: join(folder, 'home'), KVARBOOK_PASSPHRASE: PASSPHRASE });
    expect(run.status).toBe(1);
    expect(run.stderr).toContain('seal-no-default-key');
    expect(run.stderr).toContain(`kvarbook key new --name 'Test O'\\''Engineer' --licence T-0 --jurisdiction Testland`);
    expect(existsSync(join(folder, 'build'))).toBe(false);
  });

  it('names the keys folder in the command when it is not the default one', async () => {
    const folder = scratchFolder('kvarbook-seal-');
    writeFileSync(join(folder, 'line.study.md'), study);
    const keys = join(folder, 'elsewhere keys');
    const run = await cli(['run', 'line.study.md', '--seal', '--keys', keys], folder, { KVARBOOK_HOME: join(folder, 'home') });
    expect(run.stderr).toContain(`kvarbook key new --name 'Test Engineer' --licence T-0 --jurisdiction Testland --keys '${keys}'`);
  });

  it('refuses to seal with a wrong passphrase, and writes nothing', async () => {
    const { folder, env } = workspace();
    const run = await cli(['run', 'line.study.md', '--seal'], folder, { ...env, KVARBOOK_PASSPHRASE: 'not the right passphrase' });
    expect(run.status).toBe(1);
    expect(run.stderr).toContain('wrong-passphrase');
    expect(existsSync(join(folder, 'build'))).toBe(false);
  });

  it('refuses to seal with the key of someone other than the engineer the study names', async () => {
    const folder = scratchFolder('kvarbook-seal-');
    const env = { KVARBOOK_HOME: join(folder, 'home'), KVARBOOK_PASSPHRASE: PASSPHRASE };
    writeFileSync(join(folder, 'line.study.md'), study);
    newSigner('Other Person', 'O-9', 'Testland', undefined, join(folder, 'home', 'keys'));
    const run = await cli(['run', 'line.study.md', '--seal'], folder, env);
    expect(run.status).toBe(1);
    expect(run.stderr).toContain('seal-not-the-engineer');
  });
});
