import { createPrivateKey } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { checkSealedReport, type CheckRequest } from '../../src/seal/check.ts';
import { createSigningKey, unlockSigningKey, type PublicIdentity } from '../../src/seal/keys.ts';
import { buildManifest, signManifest } from '../../src/seal/manifest.ts';
import { reportBodySha256, sealSubject, sealedReportHtml } from '../../src/seal/sealedReport.ts';
import { embeddedStudySource } from '../../src/report/embed.ts';
import type { RunProduct } from '../../src/pipeline.ts';
import { runStudy } from '../../src/pipeline.ts';
import { TEST_ENVIRONMENT, TEST_STYLESHEET, runSource, studyText } from '../support/studies.ts';
import { TEST_KEY_SCRYPT } from './fixtures.ts';

const PASSPHRASE = 'a long test passphrase';
const source = studyText({
  inputs: '  lineLength: 320 km',
  body: '```ts\nconst lengthKm = inputs.lineLength.in("km");\nresult("Route length", lengthKm, { unit: "km" });\nresult("Charging", 0.4 * lengthKm, { unit: "Mvar" });\ncriterion("Length in range", lengthKm, { max: 800, unit: "km" });\n```\n',
});

async function sealedFixture() {
  // Sealing requires the type check, and check re-runs with it: the provenance records it.
  const product = await runSource(source, { typecheck: true });
  const engineer = createSigningKey({
    name: 'Test Engineer',
    licence: 'T-0',
    jurisdiction: 'Testland',
    passphrase: PASSPHRASE,
    scrypt: TEST_KEY_SCRYPT,
  });
  const privateKey = unlockSigningKey(engineer.encryptedPrivateKeyPem, PASSPHRASE);
  const envelope = signManifest(buildManifest(sealSubject(product.results, reportBodySha256(product.report))), privateKey, engineer.identity);
  return { product, engineer, envelope, html: sealedReportHtml(product.report, envelope) };
}

const fixture = await sealedFixture();

function request(overrides: Partial<CheckRequest> = {}, trusted: PublicIdentity[] = [fixture.engineer.identity]): CheckRequest {
  return {
    html: fixture.html,
    source: embeddedStudySource(fixture.html),
    sourceOrigin: 'carried in the report',
    trusted,
    defaultRelativeTolerance: 1e-9,
    environment: TEST_ENVIRONMENT,
    rerun: (rerun) =>
      runStudy({
        file: rerun.studyFile,
        source: rerun.source,
        overrides: rerun.overrides,
        typecheck: true,
        environment: rerun.environment,
        stylesheet: TEST_STYLESHEET,
      }),
    ...overrides,
  };
}

/** A re-run that returns the sealed run without running anything: for tests about the other steps. */
const sameFigures = async (): Promise<RunProduct> => fixture.product;

describe('checking a sealed report', () => {
  it('verifies an untouched report with a trusted signer, re-running every figure', async () => {
    const outcome = await checkSealedReport(request());
    expect(outcome.steps.map((step) => [step.name, step.passed])).toEqual([
      ['signature', true],
      ['report unchanged', true],
      ['study source', true],
      ['re-run', true],
      ['report body', true],
      ['engineer', true],
    ]);
    expect(outcome.verdict).toBe('verified');
  });

  it('fails when the signer is not in the trust folder, saying the signature itself is valid', async () => {
    const stranger = createSigningKey({
      name: 'Someone Else',
      licence: 'X-1',
      jurisdiction: 'Elsewhere',
      passphrase: PASSPHRASE,
      scrypt: TEST_KEY_SCRYPT,
    });
    const outcome = await checkSealedReport(request({ rerun: sameFigures }, [stranger.identity]));
    expect(outcome.verdict).toBe('failed');
    expect(outcome.steps[0]?.detail).toContain('valid signature');
    expect(outcome.steps[0]?.detail).toContain('NOT in the trust folder');
  });

  it('detects a figure edited in the HTML', async () => {
    const edited = fixture.html.replace('<dd>320.0 km</dd>', '<dd>310.0 km</dd>');
    expect(edited).not.toBe(fixture.html);
    const outcome = await checkSealedReport(request({ html: edited, rerun: sameFigures }));
    expect(outcome.verdict).toBe('failed');
    expect(outcome.steps.find((step) => step.name === 'report unchanged')?.passed).toBe(false);
  });

  it('detects every one of 200 single-byte changes at random places', async () => {
    const bytes = Buffer.from(fixture.html, 'utf8');
    await fc.assert(
      fc.asyncProperty(fc.nat({ max: bytes.length - 1 }), fc.integer({ min: 1, max: 255 }), async (position, delta) => {
        const changed = Buffer.from(bytes);
        changed[position] = (changed[position]! + delta) % 256;
        const outcome = await checkSealedReport(request({ html: changed.toString('utf8'), rerun: sameFigures }));
        return outcome.verdict === 'failed';
      }),
      { numRuns: 200, seed: 20261201 },
    );
  });

  it('detects a study source that differs from the sealed one', async () => {
    const outcome = await checkSealedReport(
      request({ source: source.replace('0.4 *', '0.41 *'), sourceOrigin: 'edited.study.md', rerun: sameFigures }),
    );
    expect(outcome.steps.find((step) => step.name === 'study source')).toMatchObject({ passed: false });
    expect(outcome.verdict).toBe('failed');
  });

  it('reports by name a figure that a changed calculation moves, with both values', async () => {
    const moved: RunProduct = {
      ...fixture.product,
      results: {
        ...fixture.product.results,
        results: fixture.product.results.results.map((result) => (result.name === 'Charging' ? { ...result, value: 128.5 } : result)),
      },
    };
    const outcome = await checkSealedReport(request({ rerun: async () => moved }));
    expect(outcome.verdict).toBe('failed');
    expect(outcome.comparison?.mismatches).toEqual([expect.objectContaining({ name: 'Charging', sealed: 128, rerun: 128.5, difference: 0.5 })]);
  });

  it('re-runs with the input overrides that were sealed', async () => {
    const product = await runSource(source, { overrides: [{ name: 'lineLength', text: '280 km' }], typecheck: true });
    const key = unlockSigningKey(fixture.engineer.encryptedPrivateKeyPem, PASSPHRASE);
    const envelope = signManifest(buildManifest(sealSubject(product.results, reportBodySha256(product.report))), key, fixture.engineer.identity);
    const outcome = await checkSealedReport(request({ html: sealedReportHtml(product.report, envelope) }));
    expect(outcome.verdict).toBe('verified');
  });

  it('fails, saying where, when the re-run renders another report body than the sealed one', async () => {
    const otherBody: RunProduct = {
      ...fixture.product,
      report: { ...fixture.product.report, body: fixture.product.report.body.replace('Route length', 'Route lenght') },
    };
    const outcome = await checkSealedReport(request({ rerun: async () => otherBody }));
    expect(outcome.steps.find((step) => step.name === 'report body')).toMatchObject({ passed: false });
    expect(outcome.bodyDifference?.sealed).toContain('Route length');
    expect(outcome.bodyDifference?.rerun).toContain('Route lenght');
    expect(outcome.verdict).toBe('failed');
  });

  it("fails when a trusted key other than the named engineer's sealed the report", async () => {
    const other = createSigningKey({
      name: 'Other Engineer',
      licence: 'O-9',
      jurisdiction: 'Testland',
      passphrase: PASSPHRASE,
      scrypt: TEST_KEY_SCRYPT,
    });
    const envelope = signManifest(
      buildManifest(sealSubject(fixture.product.results, reportBodySha256(fixture.product.report))),
      unlockSigningKey(other.encryptedPrivateKeyPem, PASSPHRASE),
      other.identity,
    );
    const outcome = await checkSealedReport(
      request({ html: sealedReportHtml(fixture.product.report, envelope), rerun: sameFigures }, [fixture.engineer.identity, other.identity]),
    );
    expect(outcome.steps.find((step) => step.name === 'signature')).toMatchObject({ passed: true });
    expect(outcome.steps.find((step) => step.name === 'engineer')).toEqual({
      name: 'engineer',
      passed: false,
      detail: 'the seal is by Other Engineer, licence O-9 (Testland), but the study names Test Engineer, licence T-0 (Testland)',
    });
    expect(outcome.verdict).toBe('failed');
  });

  it('names the study and revision it checked, and counts the blocks', async () => {
    const outcome = await checkSealedReport(request({ rerun: sameFigures }));
    expect(outcome.study).toEqual({ id: 'TEST-1', revision: '1', title: 'Test study' });
    expect(outcome.blocks).toEqual({ total: 1, hidden: [] });
  });

  it('puts no private key material in the sealed report', () => {
    const pemBody = fixture.engineer.encryptedPrivateKeyPem
      .split('\n')
      .filter((line) => line && !line.startsWith('-----'))
      .join('');
    const privateKey = unlockSigningKey(fixture.engineer.encryptedPrivateKeyPem, PASSPHRASE);
    const raw = createPrivateKey(privateKey.export({ format: 'pem', type: 'pkcs8' })).export({ format: 'jwk' }).d as string;
    expect(fixture.html).not.toContain(pemBody.slice(0, 40));
    expect(fixture.html).not.toContain(raw);
    expect(fixture.html).not.toContain(Buffer.from(raw, 'base64url').toString('hex'));
    expect(fixture.html).not.toMatch(/PRIVATE KEY/);
  });
});

describe('the seal subject', () => {
  it("signs a criterion's limits in the words the report shows", async () => {
    const product = await runSource(studyText({ body: '```ts\ncriterion("Span", 1200, { min: 1000.125, unit: "m", digits: 3 });\n```\n' }));
    const [criterion] = sealSubject(product.results, reportBodySha256(product.report)).criteria;
    expect(criterion?.limits).toBe('at least 1000 m');
    expect(product.report.body).toContain(`<td>${criterion?.limits}</td>`);
  });
});
