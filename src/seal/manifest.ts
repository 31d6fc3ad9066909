// The seal: the manifest of a study report's figures, signed by its engineer, and its verification.
import type { KeyObject } from 'node:crypto';
import { z } from 'zod';
import { canonicalJson } from './canonical.ts';
import { canonicalSha256, SHA256_HEX_PATTERN } from './digest.ts';
import { SealError } from './errors.ts';
import { publicIdentitySchema, type PublicIdentity } from './keys.ts';
import { describeIssues, formatPath } from './shapes.ts';
import { checkSignedParts, signCanonical, signedDocumentSchema, type SignatureCheck } from './signature.ts';

const MANIFEST_FORMAT = 'kvarbook-seal-manifest/2';
const ENVELOPE_FORMAT = 'kvarbook-seal/1';

const sha256Hex = z.string().regex(SHA256_HEX_PATTERN, 'must be a SHA-256 digest in 64 lowercase hex digits');
// z.number() already refuses NaN and ±Infinity.
const finiteNumber = z.number();
const label = z.string().min(1, 'must not be empty');

const effectiveInputSchema = z.strictObject({
  value: finiteNumber,
  unit: z.string(),
  source: z.enum(['given', 'overridden', 'default']),
});

const sealedResultSchema = z.strictObject({
  name: label,
  value: z.union([finiteNumber, z.string(), z.boolean()]),
  unit: z.string().optional(),
  /** Relative tolerance a re-run may differ by; overrides the checker's default. */
  tolerance: finiteNumber.nonnegative('must not be negative').optional(),
});

const criterionSchema = z.strictObject({
  name: label,
  value: finiteNumber,
  unit: z.string().optional(),
  passed: z.boolean(),
  /** The limits in words, as printed in the report, e.g. `0.95 to 1.05 pu`. */
  limits: z.string(),
});

const subjectFields = {
  studyId: label,
  revision: label,
  studyDate: z.iso.date('must be a calendar date written YYYY-MM-DD'),
  title: label,
  /** The study file's name as the report shows it: a checker re-renders the report under this name. */
  studyFile: z
    .string()
    .min(1, 'must not be empty')
    .max(255, 'must be at most 255 characters')
    .regex(/^[^/\\\0]+$/, 'must be a file name without a folder')
    .refine((name) => name !== '.' && name !== '..', 'must be a file name without a folder'),
  studySourceSha256: sha256Hex,
  effectiveInputs: z.record(label, effectiveInputSchema),
  results: z.array(sealedResultSchema).superRefine(rejectDuplicateNames),
  criteria: z.array(criterionSchema).superRefine(rejectDuplicateNames),
  cautions: z.array(z.string()),
  /** The figures of the one-at-a-time runs, when the report was made with them; `check` then runs them again. */
  sensitivity: z.array(sealedResultSchema).superRefine(rejectDuplicateNames).optional(),
  kvarbookVersion: label,
  nodeVersion: label,
  lockfileSha256: sha256Hex,
  reportBodySha256: sha256Hex,
};

const sealSubjectSchema = z.strictObject(subjectFields);
const unsignedManifestSchema = z.strictObject({ format: z.literal(MANIFEST_FORMAT), ...subjectFields });
const sealManifestSchema = z.strictObject({
  format: z.literal(MANIFEST_FORMAT),
  ...subjectFields,
  signer: publicIdentitySchema,
});
const sealEnvelopeSchema = signedDocumentSchema(ENVELOPE_FORMAT, 'manifest', sealManifestSchema, 'signer');

export type SealSubject = z.infer<typeof sealSubjectSchema>;
export type SealedResult = z.infer<typeof sealedResultSchema>;
export type UnsignedSealManifest = z.infer<typeof unsignedManifestSchema>;
/** The signed part: the subject, its format, and the signer, so the name and licence are under the signature too. */
export type SealManifest = z.infer<typeof sealManifestSchema>;
export type SealEnvelope = z.infer<typeof sealEnvelopeSchema>;

/** Validates the subject and stamps the manifest format; the signer is added when signing. */
export function buildManifest(subject: SealSubject): UnsignedSealManifest {
  return validOrThrow(unsignedManifestSchema, { format: MANIFEST_FORMAT, ...subject }, 'subject');
}

export function signManifest(manifest: UnsignedSealManifest, privateKey: KeyObject, identity: PublicIdentity): SealEnvelope {
  const signedManifest: SealManifest = { ...validOrThrow(unsignedManifestSchema, manifest, 'manifest'), signer: structuredClone(identity) };
  const signatureBase64 = signCanonical(signedManifest, privateKey, identity);
  // A separate copy outside: sharing one object would let an edit to either silently change both.
  return { format: ENVELOPE_FORMAT, manifest: signedManifest, signer: structuredClone(identity), signatureBase64 };
}

/** The seal as stored and embedded: its canonical JSON, so every byte of the file is significant. */
export function serializeEnvelope(envelope: SealEnvelope): string {
  return canonicalJson(envelope);
}

/** SHA-256 of the envelope's canonical JSON, which is also the SHA-256 of the serialized file. */
export function envelopeSha256(envelope: SealEnvelope): string {
  return canonicalSha256(envelope);
}

export interface EnvelopeVerification extends SignatureCheck {
  /** Signature valid, signer trusted, and nothing else wrong. */
  ok: boolean;
  /** The manifest, when the envelope had the right shape (whether or not its signature holds). */
  manifest: SealManifest | null;
}

export function verifyEnvelope(envelope: unknown, trusted: readonly PublicIdentity[]): EnvelopeVerification {
  const parsed = sealEnvelopeSchema.safeParse(envelope);
  if (!parsed.success) {
    return { ok: false, signatureValid: false, trusted: false, signer: null, manifest: null, problems: describeIssues(parsed.error, 'envelope') };
  }
  const { manifest, signer, signatureBase64 } = parsed.data;
  const check = checkSignedParts(
    { signedPart: manifest, signedSigner: manifest.signer, outerSigner: signer, signatureBase64, where: 'envelope' },
    trusted,
  );
  return { ...check, ok: check.signatureValid && check.trusted && check.problems.length === 0, manifest };
}

/** Reads a serialized seal; a file that is not byte-for-byte canonical is reported, since only editing makes it so. */
export function verifyEnvelopeText(text: string, trusted: readonly PublicIdentity[]): EnvelopeVerification {
  let envelope: unknown;
  try {
    envelope = JSON.parse(text);
  } catch (cause) {
    const reason = cause instanceof Error ? cause.message : String(cause);
    return { ok: false, signatureValid: false, trusted: false, signer: null, manifest: null, problems: [`envelope: not readable JSON (${reason})`] };
  }
  const verification = verifyEnvelope(envelope, trusted);
  if (verification.manifest !== null && canonicalJson(envelope) !== text) {
    verification.problems.push('envelope: the text is not in canonical form, so the seal file was edited or reformatted after sealing');
    verification.ok = false;
  }
  return verification;
}

function rejectDuplicateNames(items: { name: string }[], context: z.RefinementCtx): void {
  const seen = new Set<string>();
  items.forEach((item, index) => {
    if (seen.has(item.name)) {
      context.addIssue({ code: 'custom', path: [index, 'name'], message: `repeats the name "${item.name}"; names must be unique` });
    }
    seen.add(item.name);
  });
}

function validOrThrow<T>(schema: z.ZodType<T>, value: unknown, root: string): T {
  const parsed = schema.safeParse(value);
  if (parsed.success) {
    // A JSON round trip drops optional members given as `undefined`, which canonical JSON refuses.
    return JSON.parse(JSON.stringify(parsed.data)) as T;
  }
  const problems = describeIssues(parsed.error, root);
  const first = parsed.error.issues[0]!;
  throw new SealError({
    code: 'seal-invalid-seal-subject',
    message: `Cannot seal: ${problems.join('; ')}.`,
    quantity: formatPath(root, first.path),
    value: valueAtPath(value, first.path),
    allowed: 'see the seal manifest format in docs/seal.md',
    hint: 'The study runner builds this from the study; a problem here usually means a result came out missing, non-finite or named twice.',
  });
}

function valueAtPath(value: unknown, path: readonly PropertyKey[]): unknown {
  let current: unknown = value;
  for (const step of path) {
    if (current === null || typeof current !== 'object') return undefined;
    current = (current as Record<PropertyKey, unknown>)[step];
  }
  return current;
}
