// Public entry of the PDF printer: find Chromium, print a report, read attachments back.
export { findChromium, chromiumCandidatePaths } from './find-chromium.ts';
export { printReportPdf, chromiumFlags, type PrintReportOptions } from './print.ts';
export { readPdf, readPdfAttachments, type ReadAttachment, type ReadPdf } from './attachments.ts';
export { comparePrints, type PrintComparison } from './compare.ts';
export { MAX_DECODED_BYTES } from './decodeBudget.ts';
export { stampPdf, pdfCreator, pdfProducer, type PdfAttachment, type PdfMetadata, type StampOptions } from './stamp.ts';
export { pageLayout } from './layout.ts';
export { PdfError, type PdfErrorCode } from './errors.ts';
