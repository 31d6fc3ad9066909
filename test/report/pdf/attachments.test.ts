import { deflateSync } from 'node:zlib';
import { PDFArray, PDFDict, PDFDocument, PDFHexString, PDFName, PDFRawStream } from 'pdf-lib';
import { describe, expect, it } from 'vitest';
import { readPdf } from '../../../src/report/pdf/attachments.ts';
import { PdfError } from '../../../src/report/pdf/errors.ts';

const MEBIBYTE = 1024 * 1024;

/** A one-page PDF with one attachment whose stored stream is `compressed` (FlateDecode), as pdf-lib would not write it. */
async function pdfWithRawAttachment(fileName: string, compressed: Uint8Array): Promise<Uint8Array> {
  const document = await PDFDocument.create();
  document.addPage();
  await document.attach(new TextEncoder().encode('placeholder'), 'placeholder.txt');
  const loaded = await PDFDocument.load(await document.save());
  const { context } = loaded;
  const stream = PDFRawStream.of(context.obj({ Type: 'EmbeddedFile', Filter: 'FlateDecode', Length: compressed.length }), compressed);
  const specification = context.obj({
    Type: 'Filespec',
    F: PDFHexString.fromText(fileName),
    UF: PDFHexString.fromText(fileName),
    EF: { F: context.register(stream) },
  });
  const names = loaded.catalog
    .lookup(PDFName.of('Names'), PDFDict)
    .lookup(PDFName.of('EmbeddedFiles'), PDFDict)
    .lookup(PDFName.of('Names'), PDFArray);
  names.push(PDFHexString.fromText(fileName));
  names.push(context.register(specification));
  return loaded.save();
}

async function readError(read: Promise<unknown>): Promise<PdfError> {
  const error = await read.then(
    () => undefined,
    (thrown: unknown) => thrown,
  );
  if (!(error instanceof PdfError)) throw new Error(`expected a PdfError, got ${String(error)}`);
  return error;
}

describe('readPdf within a decompression budget', () => {
  it('reads an attachment that decompresses within the budget, byte for byte', async () => {
    const content = Buffer.alloc(3 * MEBIBYTE, 7);
    const read = await readPdf(await pdfWithRawAttachment('data.bin', deflateSync(content)), 8 * MEBIBYTE);
    expect(Buffer.from(read.attachments[1]!.content).equals(content)).toBe(true);
  });

  it('stops at the budget and names the attachment that asked for more', async () => {
    const error = await readError(readPdf(await pdfWithRawAttachment('zeros.bin', deflateSync(Buffer.alloc(32 * MEBIBYTE))), 8 * MEBIBYTE));
    expect(error.code).toBe('pdf-read-failed');
    expect(error.quantity).toBe('EmbeddedFiles/zeros.bin');
    expect(error.actual).toBe('more than 8 MiB decompressed');
  });

  it('counts every attachment of one PDF against the same budget', async () => {
    const document = await PDFDocument.create();
    document.addPage();
    for (const name of ['a.bin', 'b.bin', 'c.bin']) await document.attach(Buffer.alloc(3 * MEBIBYTE, 1), name);
    const pdf = await document.save();
    expect((await readPdf(pdf, 32 * MEBIBYTE)).attachments).toHaveLength(3);
    const error = await readError(readPdf(pdf, 8 * MEBIBYTE));
    expect(error.quantity).toMatch(/^EmbeddedFiles\/[bc]\.bin$/);
  });
});
