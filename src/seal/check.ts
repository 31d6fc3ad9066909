// The checker's procedure on a sealed report: signature, unchanged body, matching source, re-run, verdict.
import { createHash } from 'node:crypto';
import type { ResultsDocument } from '../report/studyRun.ts';
import { compareResults, type ResultComparison } from './compare.ts';
import { checkRecordSchema, verifyCheckRecord, type CheckRecord, type CheckStep } from './checkRecord.ts';
import type { PublicIdentity } from './keys.ts';
import { verifyEnvelope, type SealEnvelope, type SealManifest } from './manifest.ts';
import { describeSigner } from './trust.ts';
import { readSealedHtml, reportBodySha256, sealedReportHtml } from './sealedReport.ts';

export interface CheckRequest {
  html: string;
  /** The study source: given by the checker, or the copy the report carries. */
  source: string | undefined;
  sourceOrigin: string;
  trusted: readonly PublicIdentity[];
  defaultRelativeTolerance: number;
  /** Runs the study again with the sealed input overrides; injected so this stage stays free of processes. */
  rerun: (source: string, overrides: { name: string; text: string }[]) => Promise<ResultsDocument>;
}

export interface CheckOutcome {
  verdict: 'verified' | 'failed';
  steps: CheckStep[];
  signer: PublicIdentity | null;
  envelope: SealEnvelope | null;
  checks: CheckRecord[];
  comparison: ResultComparison | null;
}

const sha256 = (text: string) => createHash('sha256').update(text, 'utf8').digest('hex');

export async function checkSealedReport(request: CheckRequest): Promise<CheckOutcome> {
  const steps: CheckStep[] = [];
  const reading = readSealedHtml(request.html);
  if (!reading.ok) {
    steps.push({ name: 'seal', passed: false, detail: reading.problem });
    return { verdict: 'failed', steps, signer: null, envelope: null, checks: [], comparison: null };
  }
  const { parts } = reading.contents;

  // 1. The signature, and whether the signer is one the checker trusts.
  const verification = verifyEnvelope(reading.contents.envelope, request.trusted);
  const manifest = verification.manifest;
  const envelope = manifest ? (reading.contents.envelope as SealEnvelope) : null;
  const signerText = verification.signer ? describeSigner(verification.signer) : 'an unknown signer';
  steps.push({
    name: 'signature',
    passed: verification.ok,
    detail: verification.signatureValid
      ? `valid signature of ${signerText}; ${verification.trusted ? 'the key is trusted' : 'the key is NOT in the trust folder'}${verification.problems.length ? `; ${verification.problems.join('; ')}` : ''}`
      : `the signature does not hold: ${verification.problems.join('; ') || 'the signed manifest was changed'}`,
  });

  // 2. The report body is the one that was sealed, and the seal section itself is untouched.
  const checks: CheckRecord[] = [];
  if (manifest && envelope) {
    const bodyMatches = reportBodySha256(parts) === manifest.reportBodySha256;
    for (const raw of reading.contents.checks) {
      const parsed = checkRecordSchema.safeParse(raw);
      if (parsed.success) checks.push(parsed.data);
    }
    const framingMatches = checks.length === reading.contents.checks.length && sealedReportHtml(parts, envelope, checks) === request.html;
    steps.push({
      name: 'report unchanged',
      passed: bodyMatches && framingMatches,
      detail: !bodyMatches
        ? 'the report body differs from the one that was sealed (its SHA-256 does not match the seal)'
        : framingMatches
          ? 'every byte of the report is as sealed'
          : 'the body is as sealed, but the seal section or its embedded data was edited',
    });
  } else {
    steps.push({ name: 'report unchanged', passed: false, detail: 'cannot be checked without a readable seal' });
  }

  // 3. The study source is the one that was sealed.
  const sourceMatches = manifest !== null && request.source !== undefined && sha256(request.source) === manifest.studySourceSha256;
  steps.push({
    name: 'study source',
    passed: sourceMatches,
    detail:
      request.source === undefined
        ? 'no study source: the report carries none and none was given'
        : sourceMatches
          ? `the source (${request.sourceOrigin}) is the one sealed`
          : `the source (${request.sourceOrigin}) differs from the one sealed`,
  });

  // 4. Re-run, and compare every named result and criterion.
  let comparison: ResultComparison | null = null;
  if (manifest && request.source !== undefined && sourceMatches) {
    try {
      const rerun = await request.rerun(request.source, overridesOf(manifest));
      comparison = compareResults(sealedFigures(manifest), rerunFigures(rerun), { defaultRelativeTolerance: request.defaultRelativeTolerance });
      const problems = comparison.mismatches.length + comparison.missing.length + comparison.extra.length;
      steps.push({
        name: 're-run',
        passed: problems === 0,
        detail:
          problems === 0
            ? `all ${comparison.matched} sealed figures reproduced`
            : `${comparison.mismatches.length} figures differ, ${comparison.missing.length} missing, ${comparison.extra.length} not sealed`,
      });
    } catch (error) {
      steps.push({ name: 're-run', passed: false, detail: `the study did not run: ${(error as Error).message}` });
    }
  } else {
    steps.push({ name: 're-run', passed: false, detail: 'not attempted: the sealed source is not available' });
  }

  // Counter-signatures already on the report, if any.
  if (envelope && checks.length > 0) {
    const verified = checks.map((check) => verifyCheckRecord(check, envelope, request.trusted));
    steps.push({
      name: 'counter-signatures',
      passed: verified.every((result) => result.ok),
      detail: verified.map((result) => `${result.signer ? describeSigner(result.signer) : 'unknown checker'}: ${result.ok ? 'valid' : result.problems.join('; ') || 'not trusted'}`).join('; '),
    });
  }

  // 5. The verdict.
  return { verdict: steps.every((step) => step.passed) ? 'verified' : 'failed', steps, signer: verification.signer, envelope, checks, comparison };
}

function overridesOf(manifest: SealManifest): { name: string; text: string }[] {
  return Object.entries(manifest.effectiveInputs)
    .filter(([, input]) => input.source === 'overridden')
    .map(([name, input]) => ({ name, text: `${input.value} ${input.unit}`.trim() }));
}

/** Criteria count as figures too: their values and their outcomes. */
function sealedFigures(manifest: SealManifest) {
  return [
    ...manifest.results,
    ...manifest.criteria.flatMap((criterion) => [
      { name: `criterion "${criterion.name}"`, value: criterion.value, ...(criterion.unit ? { unit: criterion.unit } : {}) },
      { name: `criterion "${criterion.name}" met`, value: criterion.passed },
    ]),
  ];
}

function rerunFigures(results: ResultsDocument) {
  return [
    ...results.results.map((result) => ({ name: result.name, value: result.value, ...(result.unit ? { unit: result.unit } : {}) })),
    ...results.criteria.flatMap((criterion) => [
      { name: `criterion "${criterion.name}"`, value: criterion.value, ...(criterion.unit ? { unit: criterion.unit } : {}) },
      { name: `criterion "${criterion.name}" met`, value: criterion.passed },
    ]),
  ];
}
