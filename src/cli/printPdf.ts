// The PDF edge: prints the report with what a checker needs attached, and reads and re-prints a PDF handed to check.
import { basename } from 'node:path';
import { StudyFailure } from '../diagnostics/diagnostic.ts';
import type { ReadPdf } from '../report/pdf/attachments.ts';
import type { CheckOutcome } from '../seal/check.ts';
import type { CheckStep } from '../seal/checkRecord.ts';
import { serializeEnvelope } from '../seal/manifest.ts';
import type { StudyMeta } from '../study/model.ts';
import { launchEnvironment } from './launchEnvironment.ts';
import { reportPaths, resultsJsonText } from './reportFiles.ts';

export interface PdfInputs {
  html: string;
  meta: StudyMeta;
  studyFileName: string;
  studySource: string;
  resultsJson: string;
  sealJson?: string;
  htmlFileName: string;
}

/** Starts loading the printer's code (puppeteer-core and pdf-lib, about a third of a second) while the study runs, so that a print waits for Chromium alone. */
export function loadPrinterAhead(): void {
  import('../report/pdf/index.ts').catch(() => undefined);
}

export async function printStudyPdf(inputs: PdfInputs): Promise<Uint8Array> {
  const { findChromium, printReportPdf } = await import('../report/pdf/index.ts');
  const chromium = findChromium(launchEnvironment());
  if ('error' in chromium) throw new StudyFailure([{ code: 'pdf-no-chromium', message: chromium.error }]);
  const { meta } = inputs;
  const encoder = new TextEncoder();
  const base = `${meta.id}-r${meta.revision}`;
  return printReportPdf({
    html: inputs.html,
    chromiumPath: chromium.path,
    paper: meta.report.paper,
    headerText: `${meta.id}  rev ${meta.revision}`,
    metadata: {
      title: meta.title,
      author: meta.engineer.name,
      subject: `${meta.project}: reactive compensation study ${meta.id}, revision ${meta.revision}`,
      keywords: ['reactive compensation', meta.id, `revision ${meta.revision}`, meta.project],
    },
    fixedDate: new Date(`${meta.date}T00:00:00Z`),
    attachments: [
      {
        fileName: inputs.htmlFileName,
        mimeType: 'text/html',
        description: 'The report itself, as sealed; check it with kvarbook check',
        content: encoder.encode(inputs.html),
      },
      {
        fileName: `${base}.results.json`,
        mimeType: 'application/json',
        description: 'Every result, criterion and caution, for machines',
        content: encoder.encode(inputs.resultsJson),
      },
      ...(inputs.sealJson
        ? [
            {
              fileName: `${base}.seal.json`,
              mimeType: 'application/json',
              description: "The engineer's seal",
              content: encoder.encode(inputs.sealJson),
            },
          ]
        : []),
      {
        fileName: basename(inputs.studyFileName),
        mimeType: 'text/markdown',
        description: 'The study source the figures were computed from',
        content: encoder.encode(inputs.studySource),
      },
    ],
  });
}

/** A PDF handed to `check`: its bytes, what was read from it, and the one report it carries. */
export interface PdfInHand {
  bytes: Uint8Array;
  read: ReadPdf;
  html: string;
}

/**
 * Reads the report a PDF carries. A kvarbook PDF carries exactly one HTML attachment, first among
 * them; any other arrangement leaves open which report a reader or a tool would take, so it is refused.
 */
export async function readPdfReport(bytes: Uint8Array, pdfPath: string): Promise<PdfInHand> {
  const { readPdf, PdfError } = await import('../report/pdf/index.ts');
  let read: ReadPdf;
  try {
    read = await readPdf(bytes);
  } catch (error) {
    if (error instanceof PdfError)
      throw new StudyFailure(error.diagnostics.map((diagnostic) => ({ ...diagnostic, message: `${pdfPath}: ${diagnostic.message}` })));
    throw error;
  }
  const reports = read.attachments.filter((attachment) => attachment.fileName.toLowerCase().endsWith('.html'));
  if (reports.length === 0) {
    throw new StudyFailure([
      {
        code: 'pdf-no-report',
        message: `${pdfPath} carries no report to check`,
        hint: 'a kvarbook PDF carries its HTML report as an attachment; was this PDF made by kvarbook?',
      },
    ]);
  }
  if (reports.length > 1 || read.attachments[0] !== reports[0]) {
    throw new StudyFailure([
      {
        code: 'pdf-report-ambiguous',
        message: `${pdfPath} carries the attachments ${read.attachments.map((attachment) => attachment.fileName).join(', ')}; a kvarbook PDF carries exactly one HTML report, as its first attachment`,
        hint: 'this PDF was changed after kvarbook printed it; check the sealed .html report instead, or ask the engineer for the PDF as printed',
      },
    ]);
  }
  return { bytes, read, html: new TextDecoder('utf-8').decode(reports[0]!.content) };
}

/**
 * The PDF as printed: a fresh print of the verified report, with the same attachments, must give
 * the very bytes in hand. Pages, document information and attachments are all covered at once.
 */
export async function pdfAsPrintedStep(inHand: PdfInHand, outcome: CheckOutcome, source: string | undefined): Promise<CheckStep> {
  const name = 'pdf as printed';
  if (outcome.verdict !== 'verified' || outcome.rerun === null || outcome.envelope === null || source === undefined) {
    return { name, passed: false, detail: 'not compared: the report it carries did not verify' };
  }
  const { meta } = outcome.rerun.run.study;
  const envelope = outcome.envelope;
  let reprint: Uint8Array;
  try {
    reprint = await printStudyPdf({
      html: inHand.html,
      meta,
      studyFileName: envelope.manifest.studyFile,
      studySource: source,
      resultsJson: resultsJsonText(outcome.rerun),
      sealJson: `${serializeEnvelope(envelope)}\n`,
      htmlFileName: basename(reportPaths('.', meta.id, meta.revision).html),
    });
  } catch (error) {
    if (error instanceof StudyFailure) return { name, passed: false, detail: `not compared: no fresh print could be made (${error.message})` };
    throw error;
  }
  const { comparePrints } = await import('../report/pdf/index.ts');
  const comparison = await comparePrints(inHand, reprint);
  return comparison.identical
    ? {
        name,
        passed: true,
        detail: `every byte is what this machine prints from the verified report (producer: ${inHand.read.producer ?? 'kvarbook'})`,
      }
    : { name, passed: false, detail: `the PDF is not the print of the verified report: ${comparison.differences.join('; ')}` };
}
