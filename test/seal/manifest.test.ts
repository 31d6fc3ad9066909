// Specification of sealing: building the manifest, signing it, and what verification catches.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { sha256Hex } from '../../src/seal/digest.ts';
import {
  buildManifest,
  envelopeSha256,
  serializeEnvelope,
  signManifest,
  verifyEnvelope,
  verifyEnvelopeText,
  type SealEnvelope,
} from '../../src/seal/manifest.ts';
import { makeSigner, privateKeySpellings, sampleSubject, sealErrorOf } from './fixtures.ts';

const engineer = makeSigner('Ilse Marrow', 'PE-40217');
const stranger = makeSigner('Tomas Reede', 'PE-51130');

function sealSample(): SealEnvelope {
  return signManifest(buildManifest(sampleSubject()), engineer.privateKey, engineer.identity);
}

/** A deep copy to tamper with, so the original seal stays intact. */
function copyOf(envelope: SealEnvelope): SealEnvelope {
  return structuredClone(envelope);
}

describe('signManifest and verifyEnvelope', () => {
  it('verifies a seal signed by a trusted engineer', () => {
    const verification = verifyEnvelope(sealSample(), [engineer.identity]);
    expect(verification).toMatchObject({ ok: true, signatureValid: true, trusted: true, problems: [] });
    expect(verification.signer).toEqual(engineer.identity);
  });

  it('still verifies after a round trip through its serialized text', () => {
    const text = serializeEnvelope(sealSample());
    expect(verifyEnvelopeText(text, [engineer.identity]).ok).toBe(true);
  });

  it('puts the signer inside the signed manifest', () => {
    expect(sealSample().manifest.signer).toEqual(engineer.identity);
  });

  it('finds the signature valid but the signer untrusted when the key is not on the list', () => {
    const verification = verifyEnvelope(sealSample(), [stranger.identity]);
    expect(verification.signatureValid).toBe(true);
    expect(verification.trusted).toBe(false);
    expect(verification.ok).toBe(false);
    expect(verification.problems.join(' ')).toMatch(/not on the trust list/);
  });

  it.each<[string, (envelope: SealEnvelope) => void]>([
    ['a result value', (envelope) => (envelope.manifest.results[2]!.value = 2 * 80)],
    ['a result unit', (envelope) => (envelope.manifest.results[2]!.unit = 'MVA')],
    ['a result tolerance', (envelope) => (envelope.manifest.results[1]!.tolerance = 0.05)],
    ['a text result', (envelope) => (envelope.manifest.results[3]!.value = 'one bus reactor')],
    ['a pass/fail flag', (envelope) => (envelope.manifest.criteria[0]!.passed = false)],
    ['a caution', (envelope) => (envelope.manifest.cautions[0] = 'Line charging taken at 75 °C conductor temperature.')],
    ['a removed caution', (envelope) => envelope.manifest.cautions.pop()],
    ['the report body hash', (envelope) => (envelope.manifest.reportBodySha256 = sha256Hex('another report'))],
    ['the study source hash', (envelope) => (envelope.manifest.studySourceSha256 = sha256Hex('another study'))],
    ['an effective input', (envelope) => (envelope.manifest.effectiveInputs.lineLengthKm!.value = 311)],
    ['an input source', (envelope) => (envelope.manifest.effectiveInputs.lineLengthKm!.source = 'default')],
    ['the study date', (envelope) => (envelope.manifest.studyDate = '2025-03-15')],
    [
      'the signer name in both places',
      (envelope) => {
        envelope.manifest.signer.name = 'Someone Else';
        envelope.signer.name = 'Someone Else';
      },
    ],
  ])('detects a changed %s as an invalid signature', (_field, tamper) => {
    const tampered = copyOf(sealSample());
    tamper(tampered);
    const verification = verifyEnvelope(tampered, [engineer.identity]);
    expect(verification.signatureValid).toBe(false);
    expect(verification.ok).toBe(false);
  });

  it('reports a signer shown outside the manifest that differs from the one signed', () => {
    const tampered = copyOf(sealSample());
    tampered.signer.licence = 'PE-99999';
    const verification = verifyEnvelope(tampered, [engineer.identity]);
    expect(verification.ok).toBe(false);
    expect(verification.problems.join(' ')).toMatch(/differs from the signer inside the signed part/);
  });

  it('reports an envelope whose signer fingerprint is not that of its key', () => {
    const tampered = copyOf(sealSample());
    tampered.signer.fingerprint = stranger.identity.fingerprint;
    const verification = verifyEnvelope(tampered, [engineer.identity, stranger.identity]);
    expect(verification.signatureValid).toBe(false);
    expect(verification.problems.join(' ')).toMatch(/envelope\.signer\.fingerprint/);
  });

  it('reports a re-signed manifest that claims a trusted key under other details', () => {
    const renamed = { ...engineer.identity, name: 'Ilse Marrow-Dane' };
    const envelope = signManifest(buildManifest(sampleSubject()), engineer.privateKey, renamed);
    const verification = verifyEnvelope(envelope, [engineer.identity]);
    expect(verification.signatureValid).toBe(true);
    expect(verification.ok).toBe(false);
    expect(verification.problems.join(' ')).toMatch(/trusted as Ilse Marrow, .* but the document names Ilse Marrow-Dane/);
  });

  it('refuses to sign with a key that is not the identity’s', () => {
    const error = sealErrorOf(() => signManifest(buildManifest(sampleSubject()), stranger.privateKey, engineer.identity));
    expect(error.code).toBe('seal-key-identity-mismatch');
  });

  it.each<[string, unknown]>([
    ['null', null],
    ['a string', 'sealed!'],
    ['an empty object', {}],
    [
      'an envelope without its signature',
      (() => {
        const { signatureBase64: _dropped, ...rest } = sealSample();
        return rest;
      })(),
    ],
    ['an envelope of another format', { ...sealSample(), format: 'kvarbook-seal/2' }],
    ['an envelope with an extra member', { ...sealSample(), note: 'approved' }],
  ])('reports %s as a problem instead of throwing', (_label, envelope) => {
    const verification = verifyEnvelope(envelope, [engineer.identity]);
    expect(verification.ok).toBe(false);
    expect(verification.signatureValid).toBe(false);
    expect(verification.problems.length).toBeGreaterThan(0);
  });

  it('refuses a signature whose last base64 character was changed in bits a decoder ignores', () => {
    const envelope = copyOf(sealSample());
    // 64 bytes leave 4 unused bits in the 86th character; flipping one keeps the decoded bytes.
    const characters = envelope.signatureBase64.split('');
    const alphabet = 'ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/';
    characters[85] = alphabet[alphabet.indexOf(characters[85]!) ^ 1]!;
    envelope.signatureBase64 = characters.join('');
    expect(Buffer.from(envelope.signatureBase64, 'base64')).toEqual(Buffer.from(sealSample().signatureBase64, 'base64'));
    expect(verifyEnvelope(envelope, [engineer.identity]).ok).toBe(false);
  });

  it('flags a seal file that was reformatted, even though its content still verifies', () => {
    const prettyText = JSON.stringify(sealSample(), null, 2);
    const verification = verifyEnvelopeText(prettyText, [engineer.identity]);
    expect(verification.signatureValid).toBe(true);
    expect(verification.ok).toBe(false);
    expect(verification.problems.join(' ')).toMatch(/not in canonical form/);
  });

  it('detects every one of 200 random single-byte changes to the serialized seal', () => {
    const original = Buffer.from(serializeEnvelope(sealSample()), 'utf8');
    expect(verifyEnvelopeText(original.toString('utf8'), [engineer.identity]).ok).toBe(true);
    fc.assert(
      fc.property(fc.nat({ max: original.length - 1 }), fc.integer({ min: 1, max: 255 }), (position, delta) => {
        const changed = Buffer.from(original);
        changed[position] = (changed[position]! + delta) % 256;
        return !verifyEnvelopeText(changed.toString('utf8'), [engineer.identity]).ok;
      }),
      { numRuns: 200, seed: 8785 },
    );
  });

  it('puts no private key material in the serialized seal', () => {
    const text = serializeEnvelope(sealSample());
    for (const spelling of privateKeySpellings(engineer)) expect(text).not.toContain(spelling);
    expect(text).not.toMatch(/PRIVATE KEY/);
  });

  it('gives the seal a digest equal to the SHA-256 of its serialized text', () => {
    const envelope = sealSample();
    expect(envelopeSha256(envelope)).toBe(sha256Hex(serializeEnvelope(envelope)));
  });
});

describe('buildManifest', () => {
  it('stamps the manifest format and keeps the subject as given', () => {
    expect(buildManifest(sampleSubject())).toEqual({ format: 'kvarbook-seal-manifest/2', ...sampleSubject() });
  });

  it('drops optional members given as undefined, so the manifest stays signable', () => {
    const subject = sampleSubject();
    subject.results[0] = { name: 'surgeImpedanceOhm', value: 277.94, unit: undefined, tolerance: undefined };
    expect(buildManifest(subject).results[0]).toEqual({ name: 'surgeImpedanceOhm', value: 277.94 });
  });

  it('refuses a result that is not a finite number, naming it', () => {
    const subject = sampleSubject();
    subject.results[0]!.value = Number.NaN;
    const error = sealErrorOf(() => buildManifest(subject));
    expect(error.code).toBe('seal-invalid-seal-subject');
    expect(error.quantity).toBe('subject.results[0].value');
  });

  it('refuses two results with the same name', () => {
    const subject = sampleSubject();
    subject.results.push({ name: 'reactorRatingMvar', value: 140, unit: 'Mvar' });
    expect(sealErrorOf(() => buildManifest(subject)).message).toMatch(/repeats the name "reactorRatingMvar"/);
  });

  it('refuses a report body hash that is not a SHA-256 digest', () => {
    const error = sealErrorOf(() => buildManifest({ ...sampleSubject(), reportBodySha256: 'abc' }));
    expect(error.quantity).toBe('subject.reportBodySha256');
    expect(error.value).toBe('abc');
  });

  it('refuses a negative tolerance', () => {
    const subject = sampleSubject();
    subject.results[1]!.tolerance = -1e-6;
    expect(sealErrorOf(() => buildManifest(subject)).quantity).toBe('subject.results[1].tolerance');
  });

  it('refuses a study date that is not a calendar date', () => {
    expect(sealErrorOf(() => buildManifest({ ...sampleSubject(), studyDate: '2025-02-30' })).quantity).toBe('subject.studyDate');
  });
});
