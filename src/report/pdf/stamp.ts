// Sets the PDF's document information and embeds attachments, reproducibly, with pdf-lib.
import { createHash } from 'node:crypto';
import { PDFArray, PDFDict, PDFDocument, PDFHexString, PDFString, ParseSpeeds, type PDFObject } from 'pdf-lib';

export interface PdfMetadata {
  title: string;
  author: string;
  subject: string;
  keywords: string[];
}

export interface PdfAttachment {
  fileName: string;
  mimeType: string;
  description: string;
  content: Uint8Array;
}

export interface StampOptions {
  /**
   * Text that identifies what was printed (the HTML source); hashed with the other options into the
   * trailer /ID. Chromium's own identifier is random per print and would break reproducibility.
   */
  identityText: string;
  /** The browser that printed the pages, e.g. `HeadlessChrome/131.0.6778.204`: named in /Producer. */
  printedBy: string;
  metadata: PdfMetadata;
  /** Used for creation and modification dates of the document and of every attachment. */
  fixedDate: Date;
  attachments: PdfAttachment[];
}

export const pdfCreator = 'kvarbook';

/** Names the browser build: a checker can print the same bytes again only with the same one. */
export function pdfProducer(printedBy: string): string {
  return `kvarbook (${printedBy} print, pdf-lib)`;
}

/** Returns a new PDF with metadata and attachments; the same inputs always give the same bytes. */
export async function stampPdf(printed: Uint8Array, options: StampOptions): Promise<Uint8Array> {
  // updateMetadata: false stops pdf-lib from writing its own producer and the wall-clock dates.
  // Parsing at the fastest speed and saving with objectsPerTick: Infinity work in one go; pdf-lib
  // otherwise yields to the event loop every 100 objects, costing hundreds of ms on chart-heavy reports.
  const document = await PDFDocument.load(printed, { updateMetadata: false, parseSpeed: ParseSpeeds.Fastest });
  document.setTitle(options.metadata.title, { showInWindowTitleBar: true });
  document.setAuthor(options.metadata.author);
  document.setSubject(options.metadata.subject);
  // pdf-lib joins keywords with spaces, which would blur multi-word keywords together.
  document.setKeywords([options.metadata.keywords.join(', ')]);
  document.setCreator(pdfCreator);
  document.setProducer(pdfProducer(options.printedBy));
  renumberStructureIds(document);
  document.setCreationDate(options.fixedDate);
  document.setModificationDate(options.fixedDate);
  for (const attachment of options.attachments) {
    await document.attach(attachment.content, attachment.fileName, {
      mimeType: attachment.mimeType,
      description: attachment.description,
      creationDate: options.fixedDate,
      modificationDate: options.fixedDate,
    });
  }
  // The trailer /ID (required from PDF 2.0) must identify the file; a digest of everything the file is
  // made from does, and unlike Chromium's random one it is the same on every reprint.
  const identifier = PDFHexString.of(fileIdentifier(options));
  document.context.trailerInfo.ID = document.context.obj([identifier, identifier]);
  return document.save({ useObjectStreams: true, objectsPerTick: Infinity });
}

const STRUCTURE_ID = /^node(\d+)$/;

/**
 * Chromium names the tagged structure's elements after its accessibility nodes (`/ID (node00000080)`),
 * whose numbering now and then starts one higher from one print to the next. Renumbered by rank, in
 * the same order, the identifiers (and the /IDTree keyed by them) are the same on every print, which
 * a checker's re-print depends on.
 */
function renumberStructureIds(document: PDFDocument): void {
  const found: { holder: PDFDict | PDFArray; key: PDFObject | number; number: number }[] = [];
  const visit = (object: PDFObject) => {
    if (object instanceof PDFDict) {
      for (const [key, value] of object.entries()) {
        const number = structureIdNumber(value);
        if (number !== undefined) found.push({ holder: object, key, number });
        else visit(value);
      }
    } else if (object instanceof PDFArray) {
      object.asArray().forEach((value, index) => {
        const number = structureIdNumber(value);
        if (number !== undefined) found.push({ holder: object, key: index, number });
        else visit(value);
      });
    }
  };
  for (const [, object] of document.context.enumerateIndirectObjects()) visit(object);
  const ranks = new Map([...new Set(found.map((entry) => entry.number))].sort((a, b) => a - b).map((number, rank) => [number, rank + 1]));
  for (const entry of found) {
    const renamed = PDFString.of(`node${String(ranks.get(entry.number)).padStart(8, '0')}`);
    if (entry.holder instanceof PDFDict) entry.holder.set(entry.key as never, renamed);
    else entry.holder.set(entry.key as number, renamed);
  }
}

function structureIdNumber(value: PDFObject): number | undefined {
  const text = value instanceof PDFString || value instanceof PDFHexString ? value.decodeText() : undefined;
  const match = text === undefined ? null : STRUCTURE_ID.exec(text);
  return match ? Number(match[1]) : undefined;
}

function fileIdentifier(options: StampOptions): string {
  const hash = createHash('sha256');
  hash.update(options.identityText);
  hash.update(JSON.stringify({ ...options.metadata, date: options.fixedDate.toISOString() }));
  for (const attachment of options.attachments) {
    hash.update(JSON.stringify([attachment.fileName, attachment.mimeType, attachment.description]));
    hash.update(attachment.content);
  }
  return hash.digest('hex').slice(0, 32);
}
