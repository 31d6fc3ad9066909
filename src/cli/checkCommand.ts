// `kvarbook check`: verify a sealed report step by step, re-run its study, and optionally counter-sign.
import { existsSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { basename, dirname, join } from 'node:path';
import { styleText } from 'node:util';
import { StudyFailure } from '../diagnostics/diagnostic.ts';
import { runStudy, type RunProduct } from '../pipeline.ts';
import { embeddedStudySource } from '../report/embed.ts';
import { criteriaStatus } from '../report/html.ts';
import { checkSealedReport, withStep, type CheckOutcome, type RerunRequest } from '../seal/check.ts';
import { serializeCheckRecord, signCheckRecord } from '../seal/checkRecord.ts';
import { envelopeSha256 } from '../seal/manifest.ts';
import { type SourceChange, sourceDifference } from '../seal/sourceDifference.ts';
import { unlockStoredKey } from '../seal/keystore.ts';
import { loadDefaultKeyOf } from './keyCommand.ts';
import { describeSigner, loadTrustedIdentities, type TrustedIdentities } from '../seal/trust.ts';
import { sealedReportHtml, readSealedHtml } from '../seal/sealedReport.ts';
import { addToSet } from '../output/reportSet.ts';
import { installationFacts, reportStylesheet } from './environment.ts';
import { typecheckCache } from './typecheckCache.ts';
import { chartCache } from './chartCache.ts';
import { launchEnvironment } from './launchEnvironment.ts';
import { readPassphrase } from './passphrase.ts';
import { readStudyFile } from './readStudy.ts';
import { pdfAsPrintedStep } from './printPdf.ts';
import { readReport } from './readReport.ts';
import type { Terminal } from './terminal.ts';
import type { RunLimits } from '../study/model.ts';

export interface CheckOptions {
  source?: string;
  trust: string;
  json?: boolean;
  sign?: boolean;
  keys: string;
  tolerance: number;
  /** The most the re-run grants whatever the study asks. */
  ceilings?: RunLimits;
}

/** The check's re-run of a study: from the checker's copy of the source, or the embedded one in a scratch folder. */
export function rerunFrom(sourcePath: string | undefined, ceilings: RunLimits | undefined, childBundle?: string) {
  // One cache for every re-run it makes: a recheck of many studies works out the checker's identity once, not per study.
  const cache = typecheckCache(launchEnvironment(), installationFacts().kvarbookVersion);
  return async (request: RerunRequest): Promise<RunProduct> => {
    // An embedded source runs from an empty scratch folder: it may read nothing of the checker's.
    // Either way the run carries the sealed file name, so that the report it renders can be compared.
    const scratch = sourcePath ? undefined : mkdtempSync(join(tmpdir(), 'kvarbook-check-'));
    const file = join(scratch ?? dirname(sourcePath as string), request.studyFile);
    if (scratch) writeFileSync(file, request.source);
    try {
      return await runStudy({
        file,
        source: request.source,
        overrides: request.overrides,
        sensitivity: request.sensitivity,
        typecheck: true,
        ...(ceilings ? { ceilings } : {}),
        environment: request.environment,
        ...(childBundle ? { childBundle } : {}),
        stylesheet: reportStylesheet(),
        typecheckCache: cache,
        chartCache: chartCache(launchEnvironment(), installationFacts()),
      });
    } catch (error) {
      if (error instanceof StudyFailure)
        throw new Error(error.diagnostics.map((d) => `${d.at ? `${basename(d.at.file)}:${d.at.line}: ` : ''}${d.message}`).join('; '));
      throw error;
    } finally {
      if (scratch) rmSync(scratch, { recursive: true, force: true });
    }
  };
}

/** One line on the trust folder, so that a checker never mistakes "no one is trusted" for a bad signature. */
function trustLine(folder: string, trust: TrustedIdentities): string {
  if (trust.folder === 'missing') return `trust folder: ${folder} does not exist, so no signer can be trusted`;
  if (trust.folder === 'unreadable')
    return `trust folder: ${folder} cannot be read, so no signer can be trusted (${trust.problems[0]?.problems[0] ?? ''})`;
  if (trust.identities.length === 0) return `trust folder: ${folder} holds no identities, so no signer can be trusted`;
  return `trust folder: ${folder} (${trust.identities.length} trusted ${trust.identities.length === 1 ? 'identity' : 'identities'})`;
}

function hiddenCodeLine(blocks: CheckOutcome['blocks']): string {
  if (blocks === null) return 'hidden code: not known, the study did not re-run';
  const { total, hidden } = blocks;
  if (hidden.length === 0) return `hidden code: none; the report shows the code of ${total === 1 ? 'its one block' : `all ${total} blocks`}`;
  const spans = hidden.map((span) => `${span.fromLine}–${span.toLine}`);
  const lines = spans.length === 1 ? spans[0] : `${spans.slice(0, -1).join(', ')} and ${spans.at(-1)}`;
  const verb = hidden.length === 1 ? 'runs with its code' : 'run with their code';
  return `hidden code: ${hidden.length} of ${total} blocks ${verb} left out of the report; read it in the study source, lines ${lines}`;
}

function verdictLine(outcome: CheckOutcome, paint: (style: Parameters<typeof styleText>[0], text: string) => string): string {
  const verified = outcome.verdict === 'verified';
  const word = verified ? paint(['bold', 'green'], 'VERIFIED') : paint(['bold', 'red'], 'NOT VERIFIED');
  const what = outcome.study ? `study ${outcome.study.id}, revision ${outcome.study.revision}` : 'no readable seal';
  const who = outcome.signer ? `, ${verified ? 'sealed' : 'seal signed'} by ${describeSigner(outcome.signer)}` : '';
  // What the seal says of the criteria; only a verified report's figures are vouched for.
  const criteria = outcome.criteria ? criteriaStatus(outcome.criteria.notMet.length, outcome.criteria.total) : undefined;
  const findings = criteria === undefined ? '' : verified ? `; figures verified; ${criteria}, as sealed` : `; the seal states ${criteria}`;
  return `verdict: ${word}: ${what}${who}${findings}`;
}

/** Changed lines a terminal shows of a copy that differs throughout; --json gives every one. */
const CHANGED_LINES_SHOWN = 200;

interface SourceComparison {
  /** The study file the checker named, as the lines say it. */
  sourceName: string;
  sourceChanges: SourceChange[];
}

function describeOutcome(
  outcome: CheckOutcome,
  { sourceName, sourceChanges }: SourceComparison,
  trustFolder: string,
  trust: TrustedIdentities,
  terminal: Terminal,
  colour: boolean,
): void {
  const paint = (style: Parameters<typeof styleText>[0], text: string) => (colour ? styleText(style, text) : text);
  terminal.say(trustLine(trustFolder, trust));
  for (const skipped of trust.problems.filter((problem) => problem.file !== trustFolder))
    terminal.say(`   skipped ${skipped.file}: ${skipped.problems.join('; ')}`);
  outcome.steps.forEach((step, index) => {
    terminal.say(`${index + 1}. ${step.name.padEnd(18)} ${step.passed ? paint('green', 'pass') : paint('red', 'FAIL')}  ${step.detail}`);
  });
  for (const mismatch of outcome.comparison?.mismatches ?? []) {
    terminal.say(
      `   ${mismatch.name}: sealed ${String(mismatch.sealed)}${mismatch.sealedUnit ? ` ${mismatch.sealedUnit}` : ''}, re-run ${String(mismatch.rerun)}${mismatch.rerunUnit ? ` ${mismatch.rerunUnit}` : ''}${mismatch.difference !== null ? `, difference ${mismatch.difference.toPrecision(4)} (relative ${mismatch.relativeDifference?.toPrecision(3)}, allowed ${mismatch.tolerance})` : ''}`,
    );
  }
  for (const name of outcome.comparison?.missing ?? []) terminal.say(`   ${name}: sealed, but the re-run did not produce it`);
  for (const name of outcome.comparison?.extra ?? []) terminal.say(`   ${name}: produced by the re-run, but not sealed`);
  let shown = 0;
  for (const change of sourceChanges) {
    if (shown >= CHANGED_LINES_SHOWN) break;
    terminal.say(`   study source, line ${change.sealedLine} as sealed, line ${change.sourceLine} in ${sourceName}:`);
    for (const line of change.removed) terminal.say(`     - ${line}`);
    for (const line of change.added) terminal.say(`     + ${line}`);
    shown += change.removed.length + change.added.length;
  }
  const notShown = sourceChanges.reduce((sum, change) => sum + change.removed.length + change.added.length, 0) - shown;
  if (notShown > 0) terminal.say(`   … and ${notShown} more changed lines (--json lists them all)`);
  if (outcome.bodyDifference) {
    terminal.say(`   report body, line ${outcome.bodyDifference.line}:`);
    terminal.say(`     sealed: ${outcome.bodyDifference.sealed}`);
    terminal.say(`     re-run: ${outcome.bodyDifference.rerun}`);
  }
  terminal.say(hiddenCodeLine(outcome.blocks));
  terminal.say(verdictLine(outcome, paint));
}

export async function checkCommand(reportPath: string, options: CheckOptions, terminal: Terminal): Promise<number> {
  const { html, pdf } = await readReport(reportPath);
  const embedded = embeddedStudySource(html);
  const source = options.source ? readStudyFile(options.source) : embedded;
  const trust = loadTrustedIdentities(options.trust);
  let outcome = await checkSealedReport({
    html,
    source,
    sourceOrigin: options.source ? options.source : 'carried in the report',
    trusted: trust.identities,
    defaultRelativeTolerance: options.tolerance,
    environment: installationFacts(),
    rerun: rerunFrom(options.source, options.ceilings),
  });
  // A PDF is what its reader sees: it verifies only as the exact print of the verified report.
  if (pdf) outcome = withStep(outcome, await pdfAsPrintedStep(pdf, outcome, source));
  // A copy the checker holds that is not the sealed source: which lines differ from the source the report carries.
  const sourceChanges = options.source && embedded !== undefined && source !== undefined ? sourceDifference(embedded, source) : [];
  if (options.json) {
    const { rerun: _rerun, ...findings } = outcome;
    process.stdout.write(
      `${JSON.stringify({ report: reportPath, ...findings, sourceDifference: sourceChanges, trustFolder: { path: options.trust, state: trust.folder, identities: trust.identities.length }, trustProblems: trust.problems }, null, 2)}\n`,
    );
  } else
    describeOutcome(
      outcome,
      { sourceName: options.source ?? '', sourceChanges },
      options.trust,
      trust,
      terminal,
      Boolean(process.stdout.isTTY) && !launchEnvironment().NO_COLOR,
    );
  if (options.sign) await countersign(reportPath, html, outcome, options, terminal);
  return outcome.verdict === 'verified' ? 0 : 1;
}

async function countersign(reportPath: string, html: string, outcome: CheckOutcome, options: CheckOptions, terminal: Terminal): Promise<void> {
  const envelope = outcome.envelope;
  const reading = readSealedHtml(html);
  if (!envelope || !reading.ok)
    throw new StudyFailure([
      { code: 'check-unsignable', message: 'there is no readable seal to counter-sign', hint: 'only a sealed report can be counter-signed' },
    ]);
  const stored = loadDefaultKeyOf(outcome.rerun?.run.study.meta.checker, options.keys);
  if (stored.identity.fingerprint === envelope.manifest.signer.fingerprint) {
    throw new StudyFailure([
      {
        code: 'check-own-seal',
        message: `the checking key is the key that sealed the report (${envelope.manifest.signer.name}); a check is a second engineer's`,
        hint: "counter-sign with the checker's own key (--keys <folder of the checker's keys>)",
      },
    ]);
  }
  const privateKey = unlockStoredKey(stored, await readPassphrase(`Passphrase for the signing key of ${stored.identity.name}: `));
  const record = signCheckRecord(
    {
      envelopeSha256: envelopeSha256(envelope),
      verdict: outcome.verdict,
      steps: outcome.steps,
      // The one place a date comes from the clock: the day the checker signs.
      checkedOn: new Date().toISOString().slice(0, 10),
    },
    privateKey,
    stored.identity,
  );
  const stem = join(dirname(reportPath), basename(reportPath).replace(/(\.checked)?\.(html|pdf)$/, ''));
  const checkPath = `${stem}.check.json`;
  const checkedHtmlPath = `${stem}.checked.html`;
  if (existsSync(checkPath) || existsSync(checkedHtmlPath)) {
    throw new StudyFailure([
      {
        code: 'check-exists',
        message: `${checkPath} already exists; a check record is never overwritten`,
        hint: 'move the earlier check record aside first',
      },
    ]);
  }
  try {
    // Into the report's own set when it is one, so that the counter-signature stays with it when superseded.
    addToSet(reportPath, [
      { name: basename(checkedHtmlPath), content: sealedReportHtml(reading.contents.parts, envelope, [...outcome.checks, record]) },
      { name: basename(checkPath), content: `${serializeCheckRecord(record)}\n` },
    ]);
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code !== 'EEXIST') throw error;
    throw new StudyFailure([
      {
        code: 'check-exists',
        message: `${checkPath} already exists; a check record is never overwritten`,
        hint: 'move the earlier check record aside first',
      },
    ]);
  }
  terminal.say(`check record: ${checkPath}`);
  terminal.say(`report with both signatures: ${checkedHtmlPath}`);
}
