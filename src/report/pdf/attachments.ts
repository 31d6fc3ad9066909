// Reads a PDF kvarbook did not necessarily write: its attachments (pdf-lib can write them but not list
// them), its producer and its pages, with every decompression bounded.
import { createHash } from 'node:crypto';
import { PDFArray, PDFDict, PDFDocument, PDFHexString, PDFName, PDFRawStream, PDFString, decodePDFRawStream, type PDFObject } from 'pdf-lib';
import { DecodeBudgetExceeded, MAX_DECODED_BYTES, withDecodeBudget, type DecodeBudget } from './decodeBudget.ts';
import { PdfError, messageOf } from './errors.ts';

export interface ReadAttachment {
  fileName: string;
  content: Uint8Array;
}

export interface ReadPdf {
  attachments: ReadAttachment[];
  /** The document information's /Producer, which names the Chromium that printed a kvarbook PDF. */
  producer: string | undefined;
  /** The document information's /Title: what a viewer shows in its window bar. */
  title: string | undefined;
  /** SHA-256 of each page's content streams as stored (not decompressed): equal pages have equal digests. */
  pageDigests: string[];
}

/**
 * Lists the document-level attachments: the catalog's /Names → /EmbeddedFiles name tree, in tree
 * order, each file specification's /EF stream decoded (FlateDecode and the other standard filters).
 */
export async function readPdfAttachments(pdf: Uint8Array, limitBytes = MAX_DECODED_BYTES): Promise<ReadAttachment[]> {
  return (await readPdf(pdf, limitBytes)).attachments;
}

/** The attachments, producer and pages; all it decompresses together stays within `limitBytes`. */
export async function readPdf(pdf: Uint8Array, limitBytes = MAX_DECODED_BYTES): Promise<ReadPdf> {
  const budget: DecodeBudget = { limitBytes, usedBytes: 0, part: 'the document structure (object and cross-reference streams)' };
  try {
    return await withDecodeBudget(budget, () => readWithin(pdf, budget));
  } catch (error) {
    // pdf-lib may catch the budget's throw and fail later with a message of its own; the budget knows.
    if (budget.exceededIn !== undefined) throw budgetError(budget);
    throw error;
  }
}

async function readWithin(pdf: Uint8Array, budget: DecodeBudget): Promise<ReadPdf> {
  let document: PDFDocument;
  try {
    // throwOnInvalidObject: pdf-lib would otherwise skip an object it cannot parse (printing a warning)
    // and carry on; a PDF kvarbook wrote has none, so anything of the kind is refused.
    document = await PDFDocument.load(pdf, { updateMetadata: false, throwOnInvalidObject: true });
  } catch (error) {
    if (error instanceof DecodeBudgetExceeded) throw error;
    throw readError('(file)', `the bytes are not a readable PDF: ${messageOf(error)}`);
  }
  const names = document.catalog.lookupMaybe(PDFName.of('Names'), PDFDict);
  const embeddedFiles = names?.lookupMaybe(PDFName.of('EmbeddedFiles'), PDFDict);
  const attachments: ReadAttachment[] = [];
  if (embeddedFiles !== undefined) collectNameTree(embeddedFiles, attachments, new Set(), budget);
  return {
    attachments,
    producer: document.getProducer(),
    title: document.getTitle(),
    pageDigests: document.getPages().map((page) => pageDigest(page.node)),
  };
}

function pageDigest(page: PDFDict): string {
  const hash = createHash('sha256');
  const contents = page.lookup(PDFName.of('Contents'));
  const streams = contents instanceof PDFArray ? contents.asArray().map((item) => page.context.lookup(item)) : [contents];
  for (const stream of streams) if (stream instanceof PDFRawStream) hash.update(stream.contents);
  return hash.digest('hex');
}

function collectNameTree(node: PDFDict, into: ReadAttachment[], visited: Set<PDFDict>, budget: DecodeBudget): void {
  // A malformed file could make the tree cyclic; each node is visited once.
  if (visited.has(node)) return;
  visited.add(node);
  const kids = node.lookupMaybe(PDFName.of('Kids'), PDFArray);
  if (kids !== undefined) {
    for (let index = 0; index < kids.size(); index += 1) {
      collectNameTree(kids.lookup(index, PDFDict), into, visited, budget);
    }
  }
  const pairs = node.lookupMaybe(PDFName.of('Names'), PDFArray);
  if (pairs === undefined) return;
  // The /Names array alternates key string and value (the file specification dictionary).
  for (let index = 0; index + 1 < pairs.size(); index += 2) {
    const key = textOf(pairs.lookup(index));
    const fileSpecification = pairs.lookup(index + 1, PDFDict);
    into.push(readFileSpecification(fileSpecification, key, budget));
  }
}

function readFileSpecification(fileSpecification: PDFDict, key: string | undefined, budget: DecodeBudget): ReadAttachment {
  // /UF is the Unicode file name (PDF 1.7 §7.11.3); /F the older byte-string one; the tree key last.
  const fileName = textOf(fileSpecification.lookup(PDFName.of('UF'))) ?? textOf(fileSpecification.lookup(PDFName.of('F'))) ?? key;
  if (fileName === undefined) throw readError('EmbeddedFiles', 'an attachment has no file name');
  const embedded = fileSpecification.lookupMaybe(PDFName.of('EF'), PDFDict);
  const stream = embedded?.lookup(PDFName.of('F'));
  if (!(stream instanceof PDFRawStream)) {
    throw readError(`EmbeddedFiles/${fileName}`, 'the attachment has no embedded file stream');
  }
  budget.part = `EmbeddedFiles/${fileName}`;
  try {
    return { fileName, content: decodePDFRawStream(stream).decode() };
  } catch (error) {
    if (error instanceof DecodeBudgetExceeded) throw error;
    throw readError(`EmbeddedFiles/${fileName}`, `the embedded stream cannot be decoded: ${messageOf(error)}`);
  }
}

function textOf(object: PDFObject | undefined): string | undefined {
  return object instanceof PDFString || object instanceof PDFHexString ? object.decodeText() : undefined;
}

function readError(quantity: string, problem: string): PdfError {
  return new PdfError('pdf-read-failed', 'Attachments could not be read from the PDF', {
    quantity,
    value: problem,
    allowed: 'a PDF whose /EmbeddedFiles name tree follows PDF 1.7 §7.9.6 and §7.11.4',
    hint: 'Check that the file was written completely; re-print the report if it was cut short.',
  });
}

function budgetError(budget: DecodeBudget): PdfError {
  return new PdfError('pdf-read-failed', 'The PDF asks for more decompression than a report needs; reading stopped', {
    quantity: budget.exceededIn ?? budget.part,
    value: `more than ${budget.limitBytes / 1024 / 1024} MiB decompressed`,
    allowed: `at most ${budget.limitBytes / 1024 / 1024} MiB decompressed from one PDF`,
    hint: 'A kvarbook PDF decompresses to far less; this file was built to exhaust memory (a compression bomb) or is not a kvarbook report.',
  });
}
