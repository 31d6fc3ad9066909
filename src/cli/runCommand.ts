// `kvarbook run`: one study to its report files, written atomically; a failed run leaves earlier reports as they were.
import { basename } from 'node:path';
import { parseOverrideArguments } from '../study/inputs.ts';
import { runStudy, type RunProduct } from '../pipeline.ts';
import { UNSEALED_NOTICE, assembleReport, criteriaStatus } from '../report/html.ts';
import { writeFilesAtomically, type PendingFile } from '../output/atomicWrite.ts';
import { StudyFailure } from '../diagnostics/diagnostic.ts';
import { buildManifest, serializeEnvelope, signManifest, verifyEnvelope } from '../seal/manifest.ts';
import { loadDefaultKey, unlockStoredKey } from '../seal/keystore.ts';
import { reportBodySha256, sealSubject, sealedReportHtml } from '../seal/sealedReport.ts';
import { installationFacts } from './environment.ts';
import { readStudyFile } from './readStudy.ts';
import { readPassphrase } from './passphrase.ts';
import { protectSealedReport, reportPaths } from './reportFiles.ts';
import { withSealErrors } from './sealErrors.ts';
import { printStudyPdf } from './printPdf.ts';
import type { Terminal } from './terminal.ts';
import type { RunLimits } from '../study/model.ts';

export interface RunOptions {
  out: string;
  set: string[];
  typecheck: boolean;
  seal?: boolean;
  pdf?: boolean;
  replaceSealed?: boolean;
  keys?: string;
  /** The most the run grants whatever the study asks. */
  ceilings?: RunLimits;
}

/** The canonical text of results.json: two-space indented, keys in the order the document builds them. */
export function resultsJsonText(product: RunProduct): string {
  return `${JSON.stringify(product.results, null, 2)}\n`;
}

export async function produceStudy(studyPath: string, options: Pick<RunOptions, 'set' | 'typecheck' | 'ceilings'>, terminal: Terminal): Promise<RunProduct> {
  const source = readStudyFile(studyPath);
  return runStudy({
    file: studyPath,
    source,
    overrides: parseOverrideArguments(options.set),
    typecheck: options.typecheck,
    ...(options.ceilings ? { ceilings: options.ceilings } : {}),
    environment: installationFacts(),
    hooks: {
      onBlockStart: (block, position, count) => terminal.progress(`block ${position + 1}/${count} (line ${block.block.fenceLine})`),
    },
  });
}

/** Seal with the engineer's key, refusing a key that is not the engineer the study names. */
async function sealedFiles(product: RunProduct, keysFolder: string): Promise<{ html: string; seal: string }> {
  return withSealErrors(async () => {
    const stored = loadDefaultKey(keysFolder);
    const engineer = product.run.study.meta.engineer;
    const signer = stored.identity;
    if (signer.name !== engineer.name || signer.licence !== engineer.licence || signer.jurisdiction !== engineer.jurisdiction) {
      throw new StudyFailure([{
        code: 'seal-not-the-engineer',
        message: `the study names ${engineer.name} (licence ${engineer.licence ?? '?'}, ${engineer.jurisdiction ?? '?'}) as its engineer, but the signing key belongs to ${signer.name} (licence ${signer.licence}, ${signer.jurisdiction})`,
        at: { file: product.run.study.file, line: 1 },
        hint: 'only the engineer named in the front matter may seal the study',
      }]);
    }
    const privateKey = unlockStoredKey(stored, await readPassphrase(`Passphrase for the signing key of ${signer.name}: `));
    const manifest = buildManifest(sealSubject(product.results, reportBodySha256(product.report)));
    const envelope = signManifest(manifest, privateKey, signer);
    const verification = verifyEnvelope(envelope, [signer]);
    if (!verification.ok) throw new Error(`the seal just made does not verify: ${verification.problems.join('; ')}`);
    return { html: sealedReportHtml(product.report, envelope), seal: `${serializeEnvelope(envelope)}\n` };
  });
}

export async function runCommand(studyPath: string, options: RunOptions, terminal: Terminal): Promise<number> {
  const product = await produceStudy(studyPath, options, terminal);
  terminal.progressDone();
  const { meta } = product.run.study;
  const paths = reportPaths(options.out, meta.id, meta.revision);
  const sealed = options.seal ? await sealedFiles(product, options.keys as string) : undefined;
  const superseded = protectSealedReport(paths, Boolean(options.replaceSealed));
  const files: PendingFile[] = [
    { path: paths.html, content: sealed ? sealed.html : assembleReport(product.report, UNSEALED_NOTICE) },
    { path: paths.results, content: resultsJsonText(product) },
    ...(sealed ? [{ path: paths.seal, content: sealed.seal }] : []),
  ];
  writeFilesAtomically(files);
  const criteria = product.results.criteria;
  const failed = criteria.filter((criterion) => !criterion.passed).length;
  if (superseded) terminal.say(`the earlier sealed report was moved to ${superseded}`);
  terminal.say(`report: ${paths.html}${sealed ? ' (sealed)' : ''}`);
  terminal.say(`results: ${paths.results}`);
  if (sealed) terminal.say(`seal: ${paths.seal}`);
  terminal.say(`criteria: ${criteriaStatus(failed, criteria.length)}`);
  if (options.pdf || meta.report.pdf) {
    // After the HTML is safely written: a missing browser costs the PDF only.
    const pdf = await printStudyPdf({
      html: files[0]!.content as string,
      meta,
      studyFileName: studyPath,
      studySource: product.run.study.source,
      resultsJson: files[1]!.content as string,
      ...(sealed ? { sealJson: sealed.seal } : {}),
      htmlFileName: basename(paths.html),
    });
    writeFilesAtomically([{ path: paths.pdf, content: pdf }]);
    terminal.say(`pdf: ${paths.pdf}`);
  }
  return 0;
}
