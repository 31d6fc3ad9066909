import { PDFArray, PDFDict, PDFDocument, PDFName, PDFString } from 'pdf-lib';
import { describe, expect, it } from 'vitest';
import { stampPdf } from '../../../src/report/pdf/stamp.ts';

/** A page with a tagged table of two header cells whose identifiers start at `first`, as Chromium writes them. */
async function taggedPdf(first: number): Promise<Uint8Array> {
  const document = await PDFDocument.create({ updateMetadata: false });
  document.addPage();
  const { context } = document;
  const id = (offset: number) => PDFString.of(`node${String(first + offset).padStart(8, '0')}`);
  const cells = [0, 1].map((offset) => context.register(context.obj({ Type: 'StructElem', S: 'TH', ID: id(offset) })));
  const leaf = context.obj({ Names: [id(0), cells[0]!, id(1), cells[1]!], Limits: [id(0), id(1)] });
  document.catalog.set(
    PDFName.of('StructTreeRoot'),
    context.register(context.obj({ Type: 'StructTreeRoot', K: cells, IDTree: { Kids: [context.register(leaf)] } })),
  );
  return document.save();
}

const stamping = {
  identityText: 'the same report',
  printedBy: 'Chrome/0.0',
  metadata: { title: 'T', author: 'A', subject: 'S', keywords: [] },
  fixedDate: new Date('2024-03-15T00:00:00Z'),
  attachments: [],
};

describe('stampPdf', () => {
  it('gives the same bytes for two prints whose structure identifiers Chromium numbered from different starts', async () => {
    const [first, second] = [await taggedPdf(80), await taggedPdf(79)];
    expect(Buffer.from(first).equals(Buffer.from(second))).toBe(false);
    const [a, b] = [await stampPdf(first, stamping), await stampPdf(second, stamping)];
    expect(Buffer.from(a).equals(Buffer.from(b))).toBe(true);
    const stamped = await PDFDocument.load(a);
    const cells = stamped.catalog.lookup(PDFName.of('StructTreeRoot'), PDFDict).lookup(PDFName.of('K'), PDFArray);
    expect(cells.lookup(0, PDFDict).lookup(PDFName.of('ID'), PDFString).decodeText()).toBe('node00000001');
  });
});
