// Reading a report file handed to a command: its HTML, and for a PDF what it carries, within a size bound.
import { readFileSync, statSync } from 'node:fs';
import { StudyFailure } from '../diagnostics/diagnostic.ts';
import { readPdfReport, type PdfInHand } from './printPdf.ts';

/** Far above any report kvarbook writes; a larger file is not a report, and is not read into memory. */
const MAX_REPORT_FILE_BYTES = 256 * 1024 * 1024;

export interface ReportInHand {
  html: string;
  /** Present when the file is a PDF: the HTML above is the report it carries. */
  pdf?: PdfInHand;
}

export async function readReport(reportPath: string): Promise<ReportInHand> {
  let size: number;
  try {
    size = statSync(reportPath).size;
  } catch {
    throw new StudyFailure([{ code: 'report-missing', message: `${reportPath} does not exist`, hint: 'name a sealed .html or .pdf report' }]);
  }
  if (size > MAX_REPORT_FILE_BYTES) {
    throw new StudyFailure([
      {
        code: 'report-too-large',
        message: `${reportPath} is ${(size / 1024 / 1024).toFixed(0)} MiB; a report kvarbook reads may be at most ${MAX_REPORT_FILE_BYTES / 1024 / 1024} MiB`,
        hint: 'name the .html or .pdf report kvarbook wrote',
      },
    ]);
  }
  const bytes = readFileSync(reportPath);
  // A PDF carries the HTML report as an attachment; the PDF alone is enough.
  if (bytes.subarray(0, 5).toString('latin1') === '%PDF-') {
    const pdf = await readPdfReport(bytes, reportPath);
    return { html: pdf.html, pdf };
  }
  return { html: bytes.toString('utf8') };
}
