// `kvarbook run --sensitivity --seal` and `kvarbook check`: the sensitivity figures are sealed, and the check runs them again.
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { kvarbookInProcess, scratchFolder } from '../support/cli.ts';
import { sealWorkspace, type SealWorkspace } from '../security/sealWorkspace.ts';
import { DEFAULT_SENSITIVITY, lineStudy } from '../sensitivity/lineStudy.ts';
import { readSealedHtml, sealedReportHtml } from '../../src/seal/sealedReport.ts';
import { buildManifest, signManifest, type SealEnvelope } from '../../src/seal/manifest.ts';

describe('a study sealed with its sensitivity runs', () => {
  let space: SealWorkspace;
  let runOutput: string;
  beforeAll(async () => {
    space = sealWorkspace('kvarbook-sensitivity-');
    writeFileSync(join(space.folder, 'line.study.md'), lineStudy(`${DEFAULT_SENSITIVITY}\n  samples: 6\n  seed: 11`));
    const sealed = await kvarbookInProcess(['run', 'line.study.md', '--sensitivity', '--seal'], space.folder, space.env);
    expect(sealed.stderr).toBe('');
    expect(sealed.status).toBe(0);
    runOutput = sealed.stdout;
  });

  it('says on the terminal how many runs were made and which criterion flips', () => {
    expect(runOutput).toContain(
      'sensitivity: 4 runs at the ends of 2 ranges and 6 samples (seed 11); outcome flips within the ranges: "Open-end voltage limit"',
    );
  });

  it('seals every sensitivity figure, and writes them to the results document', () => {
    const seal = JSON.parse(readFileSync(join(space.folder, 'build/TEST-1-r1.seal.json'), 'utf8'));
    const names = seal.manifest.sensitivity.map((figure: { name: string }) => figure.name);
    expect(names).toContain('sensitivity: "Open-end voltage" with lineLength at its high end');
    expect(names).toContain('sensitivity: criterion "Open-end voltage limit" met with seriesReactance at its high end');
    expect(names).toContain('sampled: "Open-end voltage" percentile95');
    expect(names).toContain('sampled: criterion "Open-end voltage limit" probability met');
    expect(readFileSync(join(space.folder, 'build/TEST-1-r1.html'), 'utf8')).toContain(`${names.length} sensitivity figures, the cautions`);
    const results = JSON.parse(readFileSync(join(space.folder, 'build/TEST-1-r1.results.json'), 'utf8'));
    expect(results.sensitivity.runs).toBe(4);
  });

  it('verifies on check, which runs the ends and the samples again and reproduces every sensitivity figure', async () => {
    const check = await kvarbookInProcess(['check', 'build/TEST-1-r1.html', '--json'], space.folder, space.env);
    const outcome = JSON.parse(check.stdout);
    expect(outcome.verdict).toBe('verified');
    const seal = JSON.parse(readFileSync(join(space.folder, 'build/TEST-1-r1.seal.json'), 'utf8'));
    const sealedCount = seal.manifest.results.length + 2 * seal.manifest.criteria.length + seal.manifest.sensitivity.length;
    expect(outcome.comparison.matched).toBe(sealedCount);
    expect(outcome.steps.find((step: { name: string }) => step.name === 're-run').detail).toBe(
      `all ${sealedCount} sealed figures reproduced, ${seal.manifest.sensitivity.length} of them from the sensitivity runs, run again`,
    );
    expect(check.status).toBe(0);
  });

  it('fails the check when a sealed sensitivity figure is not what the study gives, though the signature holds', async () => {
    const html = readFileSync(join(space.folder, 'build/TEST-1-r1.html'), 'utf8');
    const reading = readSealedHtml(html);
    if (!reading.ok) throw new Error(reading.problem);
    const { manifest } = reading.contents.envelope as SealEnvelope;
    const { format: _format, signer: _signer, ...subject } = manifest;
    const moved = subject.sensitivity!.map((figure) =>
      figure.name === 'sensitivity: "Open-end voltage" with lineLength at its high end'
        ? { ...figure, value: (figure.value as number) + 0.01 }
        : figure,
    );
    const envelope = signManifest(buildManifest({ ...subject, sensitivity: moved }), space.engineer.privateKey, space.engineer.identity);
    const folder = scratchFolder();
    writeFileSync(join(folder, 'moved.html'), sealedReportHtml(reading.contents.parts, envelope));
    const check = await kvarbookInProcess(['check', join(folder, 'moved.html'), '--json'], space.folder, space.env);
    const outcome = JSON.parse(check.stdout);
    expect(outcome.verdict).toBe('failed');
    expect(outcome.comparison.mismatches.map((mismatch: { name: string }) => mismatch.name)).toEqual([
      'sensitivity: "Open-end voltage" with lineLength at its high end',
    ]);
    expect(check.status).toBe(1);
  });
});
