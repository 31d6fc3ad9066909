// `kvarbook run`: one study to its report files, written atomically; a failed run leaves earlier reports as they were.
import { basename } from 'node:path';
import { parseOverrideArguments } from '../study/inputs.ts';
import { runStudy, type RunProduct } from '../pipeline.ts';
import { UNSEALED_NOTICE, assembleReport, criteriaStatus } from '../report/html.ts';
import { PendingSet, currentSet, openReportFolder } from '../output/reportSet.ts';
import { StudyFailure } from '../diagnostics/diagnostic.ts';
import { buildManifest, serializeEnvelope, signManifest, verifyEnvelope } from '../seal/manifest.ts';
import { unlockStoredKey } from '../seal/keystore.ts';
import { reportBodySha256, sealSubject, sealedReportHtml } from '../seal/sealedReport.ts';
import { installationFacts, reportStylesheet } from './environment.ts';
import { launchEnvironment } from './launchEnvironment.ts';
import { typecheckCache } from './typecheckCache.ts';
import { chartCache } from './chartCache.ts';
import { readStudyFile } from './readStudy.ts';
import { readPassphrase } from './passphrase.ts';
import { DRAFT_VARIANT, isSealedSet, reportFolder, reportPaths, resultsJsonText, sealedReportExists, variantName } from './reportFiles.ts';
import { loadPrinterAhead, printStudyPdf } from './printPdf.ts';
import type { Terminal } from './terminal.ts';
import type { RunLimits } from '../study/model.ts';
import { loadDefaultKeyOf } from './keyCommand.ts';

export interface RunOptions {
  out: string;
  set: string[];
  /** The word a variant's file names carry instead of its overrides written out. */
  variant?: string;
  typecheck: boolean;
  seal?: boolean;
  pdf?: boolean;
  replaceSealed?: boolean;
  keys?: string;
  /** The most the run grants whatever the study asks. */
  ceilings?: RunLimits;
  /** Also run each uncertain input at the ends of its range (the front matter's `sensitivity:`). */
  sensitivity?: boolean;
}

/** The study run in this process to its report in memory (`run` writes it; `preview` serves it); `signal` ends it early. */
export async function produceStudy(
  studyPath: string,
  options: Pick<RunOptions, 'set' | 'typecheck' | 'ceilings' | 'sensitivity'> & { signal?: AbortSignal },
  terminal: Terminal,
): Promise<RunProduct> {
  const source = readStudyFile(studyPath);
  terminal.studyText(studyPath, source);
  const environment = installationFacts();
  return runStudy({
    file: studyPath,
    source,
    overrides: parseOverrideArguments(options.set),
    typecheck: options.typecheck,
    ...(options.ceilings ? { ceilings: options.ceilings } : {}),
    ...(options.sensitivity ? { sensitivity: true } : {}),
    environment,
    stylesheet: reportStylesheet(),
    typecheckCache: typecheckCache(launchEnvironment(), environment.kvarbookVersion),
    ...(options.signal ? { signal: options.signal } : {}),
    chartCache: chartCache(launchEnvironment(), environment),
    hooks: {
      onBlockStart: (block, position, count) => terminal.progress(`block ${position + 1}/${count} (line ${block.block.fenceLine})`),
    },
  });
}

/** Seal with the engineer's key, refusing a key that is not the engineer the study names. */
async function sealedFiles(product: RunProduct, keysFolder: string): Promise<{ html: string; seal: string }> {
  const engineer = product.run.study.meta.engineer;
  const stored = loadDefaultKeyOf(engineer, keysFolder);
  const signer = stored.identity;
  if (signer.name !== engineer.name || signer.licence !== engineer.licence || signer.jurisdiction !== engineer.jurisdiction) {
    throw new StudyFailure([
      {
        code: 'seal-not-the-engineer',
        message: `the study names ${engineer.name} (licence ${engineer.licence ?? '?'}, ${engineer.jurisdiction ?? '?'}) as its engineer, but the signing key belongs to ${signer.name} (licence ${signer.licence}, ${signer.jurisdiction})`,
        at: { file: product.run.study.file, line: 1 },
        hint: 'only the engineer named in the front matter may seal the study',
      },
    ]);
  }
  const privateKey = unlockStoredKey(stored, await readPassphrase(`Passphrase for the signing key of ${signer.name}: `));
  const manifest = buildManifest(sealSubject(product.results, reportBodySha256(product.report)));
  const envelope = signManifest(manifest, privateKey, signer);
  const verification = verifyEnvelope(envelope, [signer]);
  if (!verification.ok) throw new Error(`the seal just made does not verify: ${verification.problems.join('; ')}`);
  return { html: sealedReportHtml(product.report, envelope), seal: `${serializeEnvelope(envelope)}\n` };
}

export async function runCommand(studyPath: string, options: RunOptions, terminal: Terminal): Promise<number> {
  if (options.seal && !options.typecheck) {
    // check always type-checks, and compares the body it renders with the sealed one, which records the type check.
    throw new StudyFailure([
      {
        code: 'seal-needs-typecheck',
        message: '--seal and --no-typecheck cannot go together: a sealed report is type-checked',
        hint: 'drop --no-typecheck when sealing',
      },
    ]);
  }
  const variant = variantName(parseOverrideArguments(options.set), options.variant);
  if (options.pdf) loadPrinterAhead();
  const product = await produceStudy(studyPath, options, terminal);
  terminal.progressDone();
  const { meta } = product.run.study;
  const sealed = options.seal ? await sealedFiles(product, options.keys as string) : undefined;
  let paths = reportPaths(options.out, meta.id, meta.revision, variant);
  let folder = reportFolder(options.out, meta.id, meta.revision, variant);
  await openReportFolder(folder, isSealedSet);
  let previous = currentSet(folder);
  let previousSealed = await isSealedSet(previous);
  if (previousSealed && !options.replaceSealed) {
    if (sealed) throw sealedReportExists(paths);
    // A draft never touches the sealed report: it is written beside it, under a name of its own.
    terminal.say(`the sealed report ${paths.html} is kept; this draft is written beside it`);
    const draft = variant === undefined ? DRAFT_VARIANT : `${variant}-${DRAFT_VARIANT}`;
    paths = reportPaths(options.out, meta.id, meta.revision, draft);
    folder = reportFolder(options.out, meta.id, meta.revision, draft);
    await openReportFolder(folder, isSealedSet);
    previous = currentSet(folder);
    previousSealed = await isSealedSet(previous);
  }
  const html = sealed ? sealed.html : assembleReport(product.report, UNSEALED_NOTICE);
  const resultsJson = resultsJsonText(product);
  // Every file of the run goes into one fresh set, switched in only once all are written: a killed
  // run shows the earlier set, never a mix, and a run without a PDF shows no earlier PDF.
  const pending = new PendingSet(folder);
  let pdfFailure: StudyFailure | undefined;
  let superseded: string | undefined;
  try {
    pending.write(basename(paths.html), html);
    pending.write(basename(paths.results), resultsJson);
    if (sealed) pending.write(basename(paths.seal), sealed.seal);
    if (options.pdf || meta.report.pdf) {
      try {
        const pdf = await printStudyPdf({
          html,
          meta,
          studyFileName: studyPath,
          studySource: product.run.study.source,
          resultsJson,
          ...(sealed ? { sealJson: sealed.seal } : {}),
          // The PDF carries its files under the study's own names, as a checker's fresh print names them.
          htmlFileName: basename(reportPaths('.', meta.id, meta.revision).html),
        });
        pending.write(basename(paths.pdf), pdf);
      } catch (error) {
        // A missing browser costs the PDF only: the rest of the run is still shown.
        if (!(error instanceof StudyFailure)) throw error;
        pdfFailure = error;
      }
    }
    superseded = pending.publish(previous, previousSealed);
  } catch (error) {
    pending.abandon();
    throw error;
  }
  const criteria = product.results.criteria;
  const failed = criteria.filter((criterion) => !criterion.passed).length;
  if (superseded) terminal.say(`the earlier sealed report was moved to ${superseded}`);
  terminal.say(`report: ${paths.html}${sealed ? ' (sealed)' : ''}`);
  terminal.say(`results: ${paths.results}`);
  if (sealed) terminal.say(`seal: ${paths.seal}`);
  terminal.say(`criteria: ${criteriaStatus(failed, criteria.length)}`);
  if (sealed && failed > 0) {
    const names = criteria.filter((criterion) => !criterion.passed).map((criterion) => criterion.name);
    terminal.warn(`sealed with ${criteriaStatus(failed, criteria.length)}: ${names.join(', ')}`);
  }
  const sensitivity = product.results.sensitivity;
  if (sensitivity) {
    const flipping = sensitivity.criteria.filter((criterion) => criterion.flips.length > 0).map((criterion) => `"${criterion.name}"`);
    terminal.say(
      `sensitivity: ${sensitivity.runs} runs at the ends of ${sensitivity.inputs.length} ${sensitivity.inputs.length === 1 ? 'range' : 'ranges'}${sensitivity.sampled ? ` and ${sensitivity.sampled.samples} samples (seed ${sensitivity.sampled.seed})` : ''}; ${flipping.length ? `outcome flips within the ranges: ${flipping.join(', ')}` : 'no followed criterion flips'}`,
    );
  }
  if (pdfFailure) throw pdfFailure;
  if (options.pdf || meta.report.pdf) terminal.say(`pdf: ${paths.pdf}`);
  return 0;
}
