// Specification of a checker's counter-signature on a seal.
import { describe, expect, it } from 'vitest';
import { signCheckRecord, verifyCheckRecord, type CheckContent, type CheckRecord } from '../../src/seal/checkRecord.ts';
import { buildManifest, envelopeSha256, signManifest, type SealEnvelope } from '../../src/seal/manifest.ts';
import { CHECKER_PASSPHRASE, makeSigner, sampleSubject, sealErrorOf } from './fixtures.ts';

const engineer = makeSigner('Ilse Marrow', 'PE-40217');
const checker = makeSigner('Tomas Reede', 'PE-51130', CHECKER_PASSPHRASE);
const seal: SealEnvelope = signManifest(buildManifest(sampleSubject()), engineer.privateKey, engineer.identity);

function verifiedContent(envelope: SealEnvelope = seal): CheckContent {
  return {
    envelopeSha256: envelopeSha256(envelope),
    verdict: 'verified',
    steps: [
      { name: 'signature', passed: true, detail: 'valid, signer trusted' },
      { name: 'report body', passed: true, detail: 'unchanged' },
      { name: 're-run', passed: true, detail: '5 of 5 results matched' },
    ],
    checkedOn: '2025-04-02',
  };
}

describe('signCheckRecord and verifyCheckRecord', () => {
  it('verifies a check record signed by a trusted checker about this seal', () => {
    const record = signCheckRecord(verifiedContent(), checker.privateKey, checker.identity);
    expect(verifyCheckRecord(record, seal, [checker.identity])).toMatchObject({
      ok: true,
      signatureValid: true,
      trusted: true,
      matchesEnvelope: true,
      problems: [],
    });
  });

  it('keeps the date it was given rather than reading the clock', () => {
    const record = signCheckRecord({ ...verifiedContent(), checkedOn: '2031-11-05T09:30:00+01:00' }, checker.privateKey, checker.identity);
    expect(record.statement.checkedOn).toBe('2031-11-05T09:30:00+01:00');
  });

  it('signs a failed verdict with its failed step', () => {
    const content: CheckContent = {
      ...verifiedContent(),
      verdict: 'failed',
      steps: [{ name: 're-run', passed: false, detail: 'reactorRatingMvar moved from 150 to 151.5 Mvar' }],
    };
    const record = signCheckRecord(content, checker.privateKey, checker.identity);
    expect(verifyCheckRecord(record, seal, [checker.identity]).ok).toBe(true);
  });

  it('reports a record about another seal as not matching this one', () => {
    const otherSeal = signManifest(buildManifest({ ...sampleSubject(), revision: 'C' }), engineer.privateKey, engineer.identity);
    const record = signCheckRecord(verifiedContent(otherSeal), checker.privateKey, checker.identity);
    const verification = verifyCheckRecord(record, seal, [checker.identity]);
    expect(verification.signatureValid).toBe(true);
    expect(verification.matchesEnvelope).toBe(false);
    expect(verification.ok).toBe(false);
  });

  it.each<[string, (record: CheckRecord) => void]>([
    ['the verdict', (record) => (record.statement.verdict = 'failed')],
    ['a step detail', (record) => (record.statement.steps[2]!.detail = '4 of 5 results matched')],
    ['the date', (record) => (record.statement.checkedOn = '2025-04-03')],
  ])('detects a changed %s as an invalid signature', (_field, tamper) => {
    const record = structuredClone(signCheckRecord(verifiedContent(), checker.privateKey, checker.identity));
    tamper(record);
    expect(verifyCheckRecord(record, seal, [checker.identity]).signatureValid).toBe(false);
  });

  it('finds the signature valid but the checker untrusted when the key is not on the list', () => {
    const record = signCheckRecord(verifiedContent(), checker.privateKey, checker.identity);
    const verification = verifyCheckRecord(record, seal, [engineer.identity]);
    expect(verification).toMatchObject({ signatureValid: true, trusted: false, ok: false });
  });

  it('reports a malformed record as a problem instead of throwing', () => {
    const verification = verifyCheckRecord({ format: 'kvarbook-check-record/1' }, seal, [checker.identity]);
    expect(verification.ok).toBe(false);
    expect(verification.problems.length).toBeGreaterThan(0);
  });

  it('refuses to sign "verified" over a failed step', () => {
    const content = verifiedContent();
    content.steps[1]!.passed = false;
    const error = sealErrorOf(() => signCheckRecord(content, checker.privateKey, checker.identity));
    expect(error.code).toBe('seal-invalid-check-record');
    expect(error.message).toMatch(/report body/);
  });

  it('refuses a check date that is not ISO 8601', () => {
    const error = sealErrorOf(() => signCheckRecord({ ...verifiedContent(), checkedOn: '2 April 2025' }, checker.privateKey, checker.identity));
    expect(error.quantity).toBe('check.checkedOn');
  });
});
