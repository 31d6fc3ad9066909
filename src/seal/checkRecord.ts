// A checker's counter-signature: what was checked on a seal, with what outcome, signed by the checker.
import type { KeyObject } from 'node:crypto';
import { z } from 'zod';
import { canonicalJson } from './canonical.ts';
import { SHA256_HEX_PATTERN } from './digest.ts';
import { SealError } from './errors.ts';
import { publicIdentitySchema, type PublicIdentity } from './keys.ts';
import { envelopeSha256, type SealEnvelope } from './manifest.ts';
import { describeIssues, formatPath } from './shapes.ts';
import { checkSignedParts, signCanonical, signedDocumentSchema, type SignatureCheck } from './signature.ts';

const CHECK_STATEMENT_FORMAT = 'kvarbook-check-statement/1';
const CHECK_RECORD_FORMAT = 'kvarbook-check-record/1';

const checkStepSchema = z.strictObject({
  name: z.string().min(1, 'must not be empty'),
  passed: z.boolean(),
  detail: z.string(),
});

const checkContentFields = {
  /** SHA-256 of the canonical JSON of the seal envelope that was checked. */
  envelopeSha256: z.string().regex(SHA256_HEX_PATTERN, 'must be a SHA-256 digest in 64 lowercase hex digits'),
  verdict: z.enum(['verified', 'failed']),
  steps: z.array(checkStepSchema).min(1, 'must list at least one step'),
  /** Given by the caller, never read from the clock here, so a record can be reproduced exactly. */
  checkedOn: z.union([z.iso.date(), z.iso.datetime({ offset: true })], 'must be an ISO 8601 date (YYYY-MM-DD) or date-time with zone'),
};

/** A record may not say "verified" over a failed step, whether signing or verifying. */
function verdictMatchesSteps(
  content: { verdict: 'verified' | 'failed'; steps: { name: string; passed: boolean }[] },
  context: z.RefinementCtx,
): void {
  const failedStep = content.steps.find((step) => !step.passed);
  if (content.verdict === 'verified' && failedStep !== undefined) {
    context.addIssue({ code: 'custom', path: ['verdict'], message: `cannot be "verified" while step "${failedStep.name}" failed` });
  }
}

const checkContentSchema = z.strictObject(checkContentFields).superRefine(verdictMatchesSteps);

const checkStatementSchema = z
  .strictObject({ format: z.literal(CHECK_STATEMENT_FORMAT), ...checkContentFields, checker: publicIdentitySchema })
  .superRefine(verdictMatchesSteps);

export const checkRecordSchema = signedDocumentSchema(CHECK_RECORD_FORMAT, 'statement', checkStatementSchema, 'checker');

export type CheckContent = z.infer<typeof checkContentSchema>;
export type CheckStep = z.infer<typeof checkStepSchema>;
/** The signed part: the content, its format, and the checker. */
export type CheckStatement = z.infer<typeof checkStatementSchema>;
export type CheckRecord = z.infer<typeof checkRecordSchema>;

export function signCheckRecord(content: CheckContent, privateKey: KeyObject, identity: PublicIdentity): CheckRecord {
  const parsed = checkContentSchema.safeParse(content);
  if (!parsed.success) {
    const problems = describeIssues(parsed.error, 'check');
    throw new SealError({
      code: 'seal-invalid-check-record',
      message: `Cannot sign the check record: ${problems.join('; ')}.`,
      quantity: formatPath('check', parsed.error.issues[0]!.path),
      allowed: 'see the check record format in docs/seal.md',
      hint: 'A "verified" verdict needs every step passed; the date comes from the caller as an ISO 8601 string.',
    });
  }
  // Built member by member so no undefined or stray field reaches the canonical form.
  const statement: CheckStatement = {
    format: CHECK_STATEMENT_FORMAT,
    envelopeSha256: parsed.data.envelopeSha256,
    verdict: parsed.data.verdict,
    steps: parsed.data.steps.map((step) => ({ name: step.name, passed: step.passed, detail: step.detail })),
    checkedOn: parsed.data.checkedOn,
    checker: structuredClone(identity),
  };
  const signatureBase64 = signCanonical(statement, privateKey, identity);
  // A separate copy outside: sharing one object would let an edit to either silently change both.
  return { format: CHECK_RECORD_FORMAT, statement, checker: structuredClone(identity), signatureBase64 };
}

export interface CheckRecordVerification extends SignatureCheck {
  /** The record is about exactly this envelope. */
  matchesEnvelope: boolean;
  /** Signature valid, checker trusted, about this envelope, nothing else wrong. */
  ok: boolean;
  statement: CheckStatement | null;
}

export function verifyCheckRecord(record: unknown, envelope: SealEnvelope, trusted: readonly PublicIdentity[]): CheckRecordVerification {
  const parsed = checkRecordSchema.safeParse(record);
  if (!parsed.success) {
    return {
      ok: false,
      signatureValid: false,
      trusted: false,
      signer: null,
      matchesEnvelope: false,
      statement: null,
      problems: describeIssues(parsed.error, 'checkRecord'),
    };
  }
  const { statement, checker, signatureBase64 } = parsed.data;
  const check = checkSignedParts(
    { signedPart: statement, signedSigner: statement.checker, outerSigner: checker, signatureBase64, where: 'checkRecord' },
    trusted,
  );
  const actualEnvelopeSha256 = envelopeSha256(envelope);
  const matchesEnvelope = statement.envelopeSha256 === actualEnvelopeSha256;
  if (!matchesEnvelope) {
    check.problems.push(`checkRecord.statement.envelopeSha256: ${statement.envelopeSha256} is not the digest of this seal (${actualEnvelopeSha256})`);
  }
  return {
    ...check,
    matchesEnvelope,
    ok: check.signatureValid && check.trusted && matchesEnvelope && check.problems.length === 0,
    statement,
  };
}

/** The canonical text of a check record, as stored beside the seal. */
export function serializeCheckRecord(record: CheckRecord): string {
  return canonicalJson(record);
}
