// Reads embedded files back out of a PDF (pdf-lib can write attachments but not list them).
import {
  PDFArray,
  PDFDict,
  PDFDocument,
  PDFHexString,
  PDFName,
  PDFRawStream,
  PDFString,
  decodePDFRawStream,
  type PDFObject,
} from 'pdf-lib';
import { PdfError, messageOf } from './errors.ts';

export interface ReadAttachment {
  fileName: string;
  content: Uint8Array;
}

/**
 * Lists the document-level attachments: the catalog's /Names → /EmbeddedFiles name tree, in tree
 * order, each file specification's /EF stream decoded (FlateDecode and the other standard filters).
 */
export async function readPdfAttachments(pdf: Uint8Array): Promise<ReadAttachment[]> {
  let document: PDFDocument;
  try {
    document = await PDFDocument.load(pdf, { updateMetadata: false });
  } catch (error) {
    throw readError('(file)', `the bytes are not a readable PDF: ${messageOf(error)}`);
  }
  const names = document.catalog.lookupMaybe(PDFName.of('Names'), PDFDict);
  const embeddedFiles = names?.lookupMaybe(PDFName.of('EmbeddedFiles'), PDFDict);
  if (embeddedFiles === undefined) return [];
  const attachments: ReadAttachment[] = [];
  collectNameTree(embeddedFiles, attachments, new Set());
  return attachments;
}

function collectNameTree(node: PDFDict, into: ReadAttachment[], visited: Set<PDFDict>): void {
  // A malformed file could make the tree cyclic; each node is visited once.
  if (visited.has(node)) return;
  visited.add(node);
  const kids = node.lookupMaybe(PDFName.of('Kids'), PDFArray);
  if (kids !== undefined) {
    for (let index = 0; index < kids.size(); index += 1) {
      collectNameTree(kids.lookup(index, PDFDict), into, visited);
    }
  }
  const pairs = node.lookupMaybe(PDFName.of('Names'), PDFArray);
  if (pairs === undefined) return;
  // The /Names array alternates key string and value (the file specification dictionary).
  for (let index = 0; index + 1 < pairs.size(); index += 2) {
    const key = textOf(pairs.lookup(index));
    const fileSpecification = pairs.lookup(index + 1, PDFDict);
    into.push(readFileSpecification(fileSpecification, key));
  }
}

function readFileSpecification(fileSpecification: PDFDict, key: string | undefined): ReadAttachment {
  // /UF is the Unicode file name (PDF 1.7 §7.11.3); /F the older byte-string one; the tree key last.
  const fileName =
    textOf(fileSpecification.lookup(PDFName.of('UF'))) ?? textOf(fileSpecification.lookup(PDFName.of('F'))) ?? key;
  if (fileName === undefined) throw readError('EmbeddedFiles', 'an attachment has no file name');
  const embedded = fileSpecification.lookupMaybe(PDFName.of('EF'), PDFDict);
  const stream = embedded?.lookup(PDFName.of('F'));
  if (!(stream instanceof PDFRawStream)) {
    throw readError(`EmbeddedFiles/${fileName}`, 'the attachment has no embedded file stream');
  }
  try {
    return { fileName, content: decodePDFRawStream(stream).decode() };
  } catch (error) {
    throw readError(`EmbeddedFiles/${fileName}`, `the embedded stream cannot be decoded: ${messageOf(error)}`);
  }
}

function textOf(object: PDFObject | undefined): string | undefined {
  return object instanceof PDFString || object instanceof PDFHexString ? object.decodeText() : undefined;
}

function readError(quantity: string, problem: string): PdfError {
  return new PdfError('PDF_READ_FAILED', 'Attachments could not be read from the PDF', {
    quantity,
    value: problem,
    allowed: 'a PDF whose /EmbeddedFiles name tree follows PDF 1.7 §7.9.6 and §7.11.4',
    hint: 'Check that the file was written completely; re-print the report if it was cut short.',
  });
}
