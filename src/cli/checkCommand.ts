// `kvarbook check`: verify a sealed report step by step, re-run its study, and optionally counter-sign.
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { basename, dirname, join } from 'node:path';
import { styleText } from 'node:util';
import { StudyFailure } from '../diagnostics/diagnostic.ts';
import { runStudy } from '../pipeline.ts';
import { embeddedStudySource } from '../report/embed.ts';
import { checkSealedReport, type CheckOutcome } from '../seal/check.ts';
import { serializeCheckRecord, signCheckRecord } from '../seal/checkRecord.ts';
import { envelopeSha256 } from '../seal/manifest.ts';
import { loadDefaultKey, unlockStoredKey } from '../seal/keystore.ts';
import { loadTrustedIdentities } from '../seal/trust.ts';
import { sealedReportHtml, readSealedHtml } from '../seal/sealedReport.ts';
import { writeFilesAtomically } from '../output/atomicWrite.ts';
import { installationFacts } from './environment.ts';
import { readPassphrase } from './passphrase.ts';
import { readStudyFile } from './readStudy.ts';
import { withSealErrors } from './sealErrors.ts';
import { reportHtmlFromPdf } from './printPdf.ts';
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

async function readReportHtml(reportPath: string): Promise<string> {
  if (!existsSync(reportPath)) throw new StudyFailure([{ code: 'report-missing', message: `${reportPath} does not exist`, hint: 'name a sealed .html or .pdf report' }]);
  const bytes = readFileSync(reportPath);
  // A PDF carries the sealed HTML as an attachment; the PDF alone is enough to check.
  if (bytes.subarray(0, 5).toString('latin1') === '%PDF-') return reportHtmlFromPdf(bytes, reportPath);
  return bytes.toString('utf8');
}

function rerunFrom(sourcePath: string | undefined, ceilings: RunLimits | undefined) {
  return async (source: string, overrides: { name: string; text: string }[]) => {
    // An embedded source runs from an empty scratch folder: it may read nothing of the checker's.
    const scratch = sourcePath ? undefined : mkdtempSync(join(tmpdir(), 'kvarbook-check-'));
    const file = sourcePath ?? join(scratch as string, 'embedded.study.md');
    if (scratch) writeFileSync(file, source);
    try {
      const product = await runStudy({ file, source, overrides, typecheck: true, ...(ceilings ? { ceilings } : {}), environment: installationFacts() });
      return product.results;
    } catch (error) {
      if (error instanceof StudyFailure) throw new Error(error.diagnostics.map((d) => `${d.at ? `${basename(d.at.file)}:${d.at.line}: ` : ''}${d.message}`).join('; '));
      throw error;
    } finally {
      if (scratch) rmSync(scratch, { recursive: true, force: true });
    }
  };
}

function describeOutcome(outcome: CheckOutcome, terminal: Terminal, colour: boolean): void {
  const paint = (style: Parameters<typeof styleText>[0], text: string) => (colour ? styleText(style, text) : text);
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
  terminal.say(`verdict: ${outcome.verdict === 'verified' ? paint(['bold', 'green'], 'VERIFIED') : paint(['bold', 'red'], 'NOT VERIFIED')}`);
}

export async function checkCommand(reportPath: string, options: CheckOptions, terminal: Terminal): Promise<number> {
  const html = await readReportHtml(reportPath);
  const embedded = embeddedStudySource(html);
  const source = options.source ? readStudyFile(options.source) : embedded;
  const trust = loadTrustedIdentities(options.trust);
  const outcome = await checkSealedReport({
    html,
    source,
    sourceOrigin: options.source ? options.source : 'carried in the report',
    trusted: trust.identities,
    defaultRelativeTolerance: options.tolerance,
    rerun: rerunFrom(options.source, options.ceilings),
  });
  if (options.json) process.stdout.write(`${JSON.stringify({ report: reportPath, ...outcome, trustProblems: trust.problems }, null, 2)}\n`);
  else describeOutcome(outcome, terminal, Boolean(process.stdout.isTTY) && !process.env.NO_COLOR);
  if (options.sign) await countersign(reportPath, html, outcome, options, terminal);
  return outcome.verdict === 'verified' ? 0 : 1;
}

async function countersign(reportPath: string, html: string, outcome: CheckOutcome, options: CheckOptions, terminal: Terminal): Promise<void> {
  const envelope = outcome.envelope;
  const reading = readSealedHtml(html);
  if (!envelope || !reading.ok) throw new StudyFailure([{ code: 'check-unsignable', message: 'there is no readable seal to counter-sign', hint: 'only a sealed report can be counter-signed' }]);
  await withSealErrors(async () => {
    const stored = loadDefaultKey(options.keys);
    if (stored.identity.fingerprint === envelope.manifest.signer.fingerprint) {
      throw new StudyFailure([{
        code: 'check-own-seal',
        message: `the checking key is the key that sealed the report (${envelope.manifest.signer.name}); a check is a second engineer's`,
        hint: "counter-sign with the checker's own key (--keys <folder of the checker's keys>)",
      }]);
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
      throw new StudyFailure([{ code: 'check-exists', message: `${checkPath} already exists; a check record is never overwritten`, hint: 'move the earlier check record aside first' }]);
    }
    writeFilesAtomically([
      { path: checkPath, content: `${serializeCheckRecord(record)}\n` },
      { path: checkedHtmlPath, content: sealedReportHtml(reading.contents.parts, envelope, [...outcome.checks, record]) },
    ]);
    terminal.say(`check record: ${checkPath}`);
    terminal.say(`report with both signatures: ${checkedHtmlPath}`);
  });
}
