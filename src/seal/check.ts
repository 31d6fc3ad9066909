// The checker's procedure on a sealed report: signature, unchanged report, source, re-run, re-rendered body, engineer, verdict.
import type { RunProduct } from '../pipeline.ts';
import type { ReportParts } from '../report/html.ts';
import type { ResultsDocument } from '../report/studyRun.ts';
import type { CalcBlock, Person } from '../study/model.ts';
import { compareResults, type ResultComparison } from './compare.ts';
import { sensitivityFigures } from '../sensitivity/outcome.ts';
import { checkRecordSchema, verifyCheckRecord, type CheckRecord, type CheckStep } from './checkRecord.ts';
import { sha256Hex } from './digest.ts';
import type { PublicIdentity } from './keys.ts';
import { verifyEnvelope, type SealEnvelope, type SealManifest } from './manifest.ts';
import { describeSigner } from './trust.ts';
import { readSealedHtml, reportBody, sealedReportHtml } from './sealedReport.ts';

/** The versions and lock-file digest a report records: the sealed ones, or this machine's. */
export interface RunEnvironment {
  kvarbookVersion: string;
  nodeVersion: string;
  lockfileSha256: string;
}

export interface RerunRequest {
  source: string;
  /** The file name the sealed report shows; the re-run renders under the same name. */
  studyFile: string;
  overrides: { name: string; text: string }[];
  /** The seal holds sensitivity figures: the re-run makes the one-at-a-time runs too. */
  sensitivity: boolean;
  /**
   * The sealed environment, so that the re-rendered provenance reads as the sealed one does; the
   * calculation itself runs on this machine (`CheckRequest.environment`).
   */
  environment: RunEnvironment;
}

export interface CheckRequest {
  html: string;
  /** The study source: given by the checker, or the copy the report carries. */
  source: string | undefined;
  sourceOrigin: string;
  trusted: readonly PublicIdentity[];
  defaultRelativeTolerance: number;
  /** This machine's kvarbook, Node.js and lock file: a difference from the sealed ones is said, not judged. */
  environment: RunEnvironment;
  /** Runs the study again; injected so this stage stays free of processes. A type-checked run, as sealing requires. */
  rerun: (request: RerunRequest) => Promise<RunProduct>;
}

/** A calculation block the report shows without its code: its study lines, fences included. */
export interface HiddenBlock {
  fromLine: number;
  toLine: number;
}

/** Where the re-rendered report body first differs from the one in hand. */
export interface BodyDifference {
  /** 1-based line of the report body: the report file without its seal section. */
  line: number;
  sealed: string;
  rerun: string;
}

export interface CheckOutcome {
  verdict: 'verified' | 'failed';
  steps: CheckStep[];
  signer: PublicIdentity | null;
  envelope: SealEnvelope | null;
  checks: CheckRecord[];
  comparison: ResultComparison | null;
  /** Which study and revision the seal is for; null when no seal could be read. */
  study: { id: string; revision: string; title: string } | null;
  /** From the re-run: how many calculation blocks there are, and which keep their code out of the report. */
  blocks: { total: number; hidden: HiddenBlock[] } | null;
  bodyDifference: BodyDifference | null;
  /** The criteria as the seal records them: how many, and the names of those not met; null when no seal could be read. */
  criteria: { total: number; notMet: string[] } | null;
  /** The re-run itself, for steps the edge adds (the PDF); not part of any record. */
  rerun: RunProduct | null;
}

/** What can be known of a sealed report without running its study: steps 1 to 3 and the counter-signatures. */
export interface SealedReportFindings {
  steps: CheckStep[];
  verification: ReturnType<typeof verifyEnvelope> | null;
  manifest: SealManifest | null;
  envelope: SealEnvelope | null;
  checks: CheckRecord[];
  /** The report's body parts around the seal slot; null when the slot is not intact. */
  parts: ReportParts | null;
  sourceMatches: boolean;
  /** Null when every counter-signature on the report verifies (or there is none). */
  counterSignatures: CheckStep | null;
}

/** The seal's signature and trust, the report unchanged, and the source the one sealed; never runs the study. */
export function verifySealedReport(
  html: string,
  source: string | undefined,
  sourceOrigin: string,
  trusted: readonly PublicIdentity[],
): SealedReportFindings {
  const steps: CheckStep[] = [];
  const reading = readSealedHtml(html);
  if (!reading.ok) {
    steps.push({ name: 'seal', passed: false, detail: reading.problem });
    return { steps, verification: null, manifest: null, envelope: null, checks: [], parts: null, sourceMatches: false, counterSignatures: null };
  }
  const { parts } = reading.contents;

  // 1. The signature, and whether the signer is one the checker trusts.
  const verification = verifyEnvelope(reading.contents.envelope, trusted);
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

  // 2. The report in hand is the one that was sealed, and the seal section itself is untouched.
  const checks: CheckRecord[] = [];
  if (manifest && envelope) {
    const bodyMatches = sha256Hex(reportBody(parts)) === manifest.reportBodySha256;
    for (const raw of reading.contents.checks) {
      const parsed = checkRecordSchema.safeParse(raw);
      if (parsed.success) checks.push(parsed.data);
    }
    const framingMatches = checks.length === reading.contents.checks.length && sealedReportHtml(parts, envelope, checks) === html;
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
  const sourceMatches = manifest !== null && source !== undefined && sha256Hex(source) === manifest.studySourceSha256;
  steps.push({
    name: 'study source',
    passed: sourceMatches,
    detail:
      source === undefined
        ? 'no study source: the report carries none and none was given'
        : sourceMatches
          ? `the source (${sourceOrigin}) is the one sealed`
          : `the source (${sourceOrigin}) differs from the one sealed`,
  });

  // Counter-signatures already on the report, if any.
  let counterSignatures: CheckStep | null = null;
  if (envelope && checks.length > 0) {
    const verified = checks.map((check) => verifyCheckRecord(check, envelope, trusted));
    counterSignatures = {
      name: 'counter-signatures',
      passed: verified.every((result) => result.ok),
      detail: verified
        .map(
          (result) =>
            `${result.signer ? describeSigner(result.signer) : 'unknown checker'}: ${result.ok ? 'valid' : result.problems.join('; ') || 'not trusted'}`,
        )
        .join('; '),
    };
  }
  return { steps, verification, manifest, envelope, checks, parts, sourceMatches, counterSignatures };
}

export async function checkSealedReport(request: CheckRequest): Promise<CheckOutcome> {
  const findings = verifySealedReport(request.html, request.source, request.sourceOrigin, request.trusted);
  const { steps, verification, manifest, envelope, checks, parts, sourceMatches } = findings;
  if (verification === null || parts === null) {
    return {
      verdict: 'failed',
      steps,
      signer: null,
      envelope: null,
      checks: [],
      comparison: null,
      study: null,
      blocks: null,
      bodyDifference: null,
      criteria: null,
      rerun: null,
    };
  }
  // 4. Re-run, and compare every named result and criterion.
  let comparison: ResultComparison | null = null;
  let rerun: RunProduct | null = null;
  if (manifest && request.source !== undefined && sourceMatches) {
    try {
      rerun = await request.rerun({
        source: request.source,
        studyFile: manifest.studyFile,
        overrides: overridesOf(manifest),
        sensitivity: manifest.sensitivity !== undefined,
        environment: sealedEnvironment(manifest),
      });
      comparison = compareResults(sealedFigures(manifest), rerunFigures(rerun.results), {
        defaultRelativeTolerance: request.defaultRelativeTolerance,
      });
      const problems = comparison.mismatches.length + comparison.missing.length + comparison.extra.length;
      steps.push({
        name: 're-run',
        passed: problems === 0,
        detail: `${
          problems === 0
            ? `${comparison.matched === 1 ? 'the one sealed figure' : `all ${comparison.matched} sealed figures`} reproduced${manifest.sensitivity ? `, ${manifest.sensitivity.length} of them from the sensitivity runs, run again` : ''}`
            : `${comparison.mismatches.length} figures differ, ${comparison.missing.length} missing, ${comparison.extra.length} not sealed`
        }${environmentNote(manifest, request.environment)}`,
      });
    } catch (error) {
      steps.push({ name: 're-run', passed: false, detail: `the study did not run: ${(error as Error).message}` });
    }
  } else {
    steps.push({ name: 're-run', passed: false, detail: 'not attempted: the sealed source is not available' });
  }

  // 5. The body the study renders is the body that was sealed: runs are byte-identical, so any
  //    difference is an edit the figures alone would not show (a verdict, a caption, a sentence).
  let bodyDifference: BodyDifference | null = null;
  if (manifest && rerun) {
    const rendered = reportBody(rerun.report);
    const passed = sha256Hex(rendered) === manifest.reportBodySha256;
    if (!passed) bodyDifference = firstDifference(reportBody(parts), rendered);
    steps.push({
      name: 'report body',
      passed,
      detail: passed
        ? 'the re-run renders the sealed report body byte for byte'
        : `the re-run renders a different report body than the one sealed${bodyDifference ? `, first at line ${bodyDifference.line} of the body` : ''}: the sealed report says something the study does not`,
    });
  } else {
    steps.push({ name: 'report body', passed: false, detail: 'not compared: the study did not re-run' });
  }

  // 6. The seal is by the engineer the study names, not by some other trusted key.
  steps.push(engineerStep(verification.signer, rerun?.results.study.engineer));

  if (findings.counterSignatures) steps.push(findings.counterSignatures);

  return {
    verdict: verdictOf(steps),
    steps,
    signer: verification.signer,
    envelope,
    checks,
    comparison,
    study: manifest ? { id: manifest.studyId, revision: manifest.revision, title: manifest.title } : null,
    blocks: rerun ? { total: rerun.run.study.blocks.length, hidden: hiddenBlocks(rerun.run.study.blocks) } : null,
    bodyDifference,
    criteria: manifest
      ? { total: manifest.criteria.length, notMet: manifest.criteria.filter((criterion) => !criterion.passed).map((criterion) => criterion.name) }
      : null,
    rerun,
  };
}

/** A step the edge adds after the procedure (the PDF as printed); the verdict follows every step. */
export function withStep(outcome: CheckOutcome, step: CheckStep): CheckOutcome {
  const steps = [...outcome.steps, step];
  return { ...outcome, steps, verdict: verdictOf(steps) };
}

function verdictOf(steps: readonly CheckStep[]): 'verified' | 'failed' {
  return steps.every((step) => step.passed) ? 'verified' : 'failed';
}

function engineerStep(signer: PublicIdentity | null, engineer: Person | undefined): CheckStep {
  if (signer === null) return { name: 'engineer', passed: false, detail: 'not compared: the seal names no readable signer' };
  if (engineer === undefined)
    return { name: 'engineer', passed: false, detail: 'not compared: the study did not re-run, so the engineer it names is not known' };
  const named = `${engineer.name}, licence ${engineer.licence ?? '(none given)'} (${engineer.jurisdiction ?? 'no jurisdiction given'})`;
  const same = signer.name === engineer.name && signer.licence === engineer.licence && signer.jurisdiction === engineer.jurisdiction;
  return same
    ? { name: 'engineer', passed: true, detail: `the seal is by ${named}, the engineer the study names` }
    : { name: 'engineer', passed: false, detail: `the seal is by ${describeSigner(signer)}, but the study names ${named}` };
}

/** Study lines of every block whose code the report leaves out, opening to closing fence. */
function hiddenBlocks(blocks: readonly CalcBlock[]): HiddenBlock[] {
  return blocks
    .filter((block) => block.options.hideCode)
    .map((block) => {
      const codeLines = block.code === '' ? 0 : block.code.split('\n').length - (block.code.endsWith('\n') ? 1 : 0);
      return { fromLine: block.fenceLine, toLine: block.firstCodeLine + codeLines };
    });
}

function firstDifference(sealed: string, rerun: string): BodyDifference | null {
  let index = 0;
  while (index < sealed.length && index < rerun.length && sealed[index] === rerun[index]) index += 1;
  if (index === sealed.length && index === rerun.length) return null;
  const lineStart = sealed.lastIndexOf('\n', index - 1) + 1;
  const lineOf = (text: string) => {
    const end = text.indexOf('\n', index);
    return excerpt(text.slice(lineStart, end < 0 ? undefined : end), index - lineStart);
  };
  return { line: sealed.slice(0, lineStart).split('\n').length, sealed: lineOf(sealed), rerun: lineOf(rerun) };
}

/** At most 160 characters of a line, around the column where it differs. */
function excerpt(line: string, column: number): string {
  if (line.length <= 160) return line;
  const from = Math.max(0, column - 60);
  return `${from > 0 ? '…' : ''}${line.slice(from, from + 160)}${from + 160 < line.length ? '…' : ''}`;
}

function sealedEnvironment(manifest: SealManifest): RunEnvironment {
  return { kvarbookVersion: manifest.kvarbookVersion, nodeVersion: manifest.nodeVersion, lockfileSha256: manifest.lockfileSha256 };
}

function environmentNote(manifest: SealManifest, here: RunEnvironment): string {
  const differences = [
    manifest.kvarbookVersion !== here.kvarbookVersion ? `kvarbook ${here.kvarbookVersion} (sealed with ${manifest.kvarbookVersion})` : '',
    manifest.nodeVersion !== here.nodeVersion ? `Node.js ${here.nodeVersion} (sealed with ${manifest.nodeVersion})` : '',
    manifest.lockfileSha256 !== here.lockfileSha256 ? 'a different package-lock.json' : '',
  ].filter(Boolean);
  return differences.length ? `; re-run here with ${differences.join(', ')}` : '';
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
    ...(manifest.sensitivity ?? []),
    ...manifest.criteria.flatMap((criterion) => [
      { name: `criterion "${criterion.name}"`, value: criterion.value, ...(criterion.unit ? { unit: criterion.unit } : {}) },
      { name: `criterion "${criterion.name}" met`, value: criterion.passed },
    ]),
  ];
}

function rerunFigures(results: ResultsDocument) {
  return [
    ...results.results.map((result) => ({ name: result.name, value: result.value, ...(result.unit ? { unit: result.unit } : {}) })),
    ...(results.sensitivity ? sensitivityFigures(results.sensitivity) : []),
    ...results.criteria.flatMap((criterion) => [
      { name: `criterion "${criterion.name}"`, value: criterion.value, ...(criterion.unit ? { unit: criterion.unit } : {}) },
      { name: `criterion "${criterion.name}" met`, value: criterion.passed },
    ]),
  ];
}
