// The PDF edge: finds the system Chromium, prints the report, and attaches what a checker needs to re-verify.
import { basename } from 'node:path';
import { StudyFailure } from '../diagnostics/diagnostic.ts';
import type { StudyMeta } from '../study/model.ts';

export interface PdfInputs {
  html: string;
  meta: StudyMeta;
  studyFileName: string;
  studySource: string;
  resultsJson: string;
  sealJson?: string;
  htmlFileName: string;
}

export async function printStudyPdf(inputs: PdfInputs): Promise<Uint8Array> {
  const { findChromium, printReportPdf, PdfError } = await import('../report/pdf/index.ts');
  const chromium = findChromium(process.env);
  if ('error' in chromium) throw new StudyFailure([{ code: 'pdf-no-chromium', message: chromium.error }]);
  const { meta } = inputs;
  const encoder = new TextEncoder();
  const base = `${meta.id}-r${meta.revision}`;
  try {
    return await printReportPdf({
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
        { fileName: inputs.htmlFileName, mimeType: 'text/html', description: 'The report itself, as sealed; check it with kvarbook check', content: encoder.encode(inputs.html) },
        { fileName: `${base}.results.json`, mimeType: 'application/json', description: 'Every result, criterion and caution, for machines', content: encoder.encode(inputs.resultsJson) },
        ...(inputs.sealJson ? [{ fileName: `${base}.seal.json`, mimeType: 'application/json', description: "The engineer's seal", content: encoder.encode(inputs.sealJson) }] : []),
        { fileName: basename(inputs.studyFileName), mimeType: 'text/markdown', description: 'The study source the figures were computed from', content: encoder.encode(inputs.studySource) },
      ],
    });
  } catch (error) {
    if (error instanceof PdfError) throw new StudyFailure([{ code: `pdf-${error.code.toLowerCase()}`, message: error.message }]);
    throw error;
  }
}

/** The sealed report a PDF carries, for `kvarbook check report.pdf`. */
export async function reportHtmlFromPdf(pdf: Uint8Array, pdfPath: string): Promise<string> {
  const { readPdfAttachments } = await import('../report/pdf/index.ts');
  const attachments = await readPdfAttachments(pdf);
  const html = attachments.find((attachment) => attachment.fileName.endsWith('.html'));
  if (!html) {
    throw new StudyFailure([{ code: 'pdf-no-report', message: `${pdfPath} carries no report to check`, hint: 'a kvarbook PDF carries its HTML report as an attachment; was this PDF made by kvarbook?' }]);
  }
  return new TextDecoder('utf-8').decode(html.content);
}
