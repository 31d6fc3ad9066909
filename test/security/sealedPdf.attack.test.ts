import { readFileSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { deflateSync } from 'node:zlib';
import { PDFArray, PDFDict, PDFDocument, PDFHexString, PDFName, PDFRawStream, StandardFonts, rgb } from 'pdf-lib';
import { beforeAll, describe, expect, it } from 'vitest';
import { readPdfAttachments } from '../../src/report/pdf/attachments.ts';
import { kvarbook, kvarbookInProcess } from '../support/cli.ts';
import { studyText } from '../support/studies.ts';
import { sealWorkspace, type SealWorkspace } from './sealWorkspace.ts';

const study = studyText({
  inputs: '  lineLength: 320 km',
  body: '# Charging\n\n```ts\nconst chargingMvar = 0.4 * inputs.lineLength.in("km");\nresult("Charging", chargingMvar, { unit: "Mvar" });\n```\n',
});

const PEAK_PROBE = resolve(import.meta.dirname, 'peakMemoryProbe.mjs');
const GIBIBYTE = 1024 * 1024 * 1024;

function embeddedFileNames(document: PDFDocument): PDFArray {
  const names = document.catalog.lookup(PDFName.of('Names'), PDFDict).lookup(PDFName.of('EmbeddedFiles'), PDFDict);
  return names.lookup(PDFName.of('Names'), PDFArray);
}

/** Adds an attachment whose stream is `compressed` as it stands (FlateDecode), placed first or last in the name tree. */
function attachRaw(document: PDFDocument, fileName: string, compressed: Uint8Array, first: boolean): void {
  const { context } = document;
  const stream = PDFRawStream.of(context.obj({ Type: 'EmbeddedFile', Filter: 'FlateDecode', Length: compressed.length }), compressed);
  const specification = context.obj({
    Type: 'Filespec',
    F: PDFHexString.fromText(fileName),
    UF: PDFHexString.fromText(fileName),
    EF: { F: context.register(stream) },
  });
  const names = embeddedFileNames(document);
  const key = PDFHexString.fromText(fileName);
  const value = context.register(specification);
  if (first) {
    names.insert(0, value);
    names.insert(0, key);
  } else {
    names.push(key);
    names.push(value);
  }
}

describe('attacks on a sealed PDF', () => {
  let space: SealWorkspace;
  let sealedPdf: Uint8Array;
  let otherPdf: Uint8Array;

  // Sealed and checked by the command line in this process: what is tested is the check's verdict, not the process;
  // the compression bombs below are checked by processes of their own, whose memory is measured.
  beforeAll(async () => {
    space = sealWorkspace('kvarbook-pdf-attack-');
    writeFileSync(join(space.folder, 'line.study.md'), study);
    for (const args of [
      ['--out', 'build'],
      ['--out', 'other', '--set', 'lineLength=100km'],
    ]) {
      const sealed = await kvarbookInProcess(['run', 'line.study.md', '--seal', '--pdf', ...args], space.folder, space.env);
      expect(sealed.status, sealed.stderr).toBe(0);
    }
    sealedPdf = readFileSync(join(space.folder, 'build/TEST-1-r1.pdf'));
    otherPdf = readFileSync(join(space.folder, 'other/TEST-1-r1.lineLength-100km.pdf'));
  });

  function check(name: string, pdf: Uint8Array) {
    writeFileSync(join(space.folder, name), pdf);
    return kvarbookInProcess(['check', name], space.folder, space.env);
  }

  it('verifies the PDF exactly as kvarbook printed it', async () => {
    const verified = await check('as-printed.pdf', sealedPdf);
    expect(verified.stdout).toMatch(/pdf as printed\s+pass/);
    expect(verified.status, verified.stdout + verified.stderr).toBe(0);
  });

  it('fails a sealed PDF whose first page was overlaid with another figure', async () => {
    const document = await PDFDocument.load(sealedPdf, { updateMetadata: false });
    const page = document.getPage(0);
    const font = await document.embedFont(StandardFonts.Helvetica);
    page.drawRectangle({ x: 50, y: page.getHeight() - 300, width: 300, height: 40, color: rgb(1, 1, 1) });
    page.drawText('Charging 99.0 Mvar', { x: 55, y: page.getHeight() - 285, size: 12, font });
    const forged = await check('overlaid.pdf', await document.save());
    expect(forged.stdout).toMatch(/pdf as printed\s+FAIL/);
    expect(forged.stdout).toContain('verdict: NOT VERIFIED');
    expect(forged.status).toBe(1);
  });

  it('fails the pages of another sealed report carrying this report’s attachments', async () => {
    const forgedDocument = await PDFDocument.create({ updateMetadata: false });
    const other = await PDFDocument.load(otherPdf, { updateMetadata: false });
    for (const page of await forgedDocument.copyPages(other, other.getPageIndices())) forgedDocument.addPage(page);
    for (const attachment of await readPdfAttachments(sealedPdf)) await forgedDocument.attach(attachment.content, attachment.fileName);
    const forged = await check('swapped.pdf', await forgedDocument.save());
    expect(forged.stdout).toMatch(/pdf as printed\s+FAIL/);
    expect(forged.stdout).toContain('verdict: NOT VERIFIED');
    expect(forged.status).toBe(1);
  });

  it('refuses a sealed PDF that carries another sealed report as an extra HTML attachment placed first', async () => {
    const document = await PDFDocument.load(sealedPdf, { updateMetadata: false });
    const otherHtml = (await readPdfAttachments(otherPdf)).find((attachment) => attachment.fileName.endsWith('.html'))!;
    attachRaw(document, 'A-report.html', deflateSync(otherHtml.content), true);
    const forged = await check('extra-first.pdf', await document.save());
    expect(forged.stdout).not.toContain('verdict: VERIFIED');
    expect(forged.stderr).toContain('pdf-report-ambiguous');
    expect(forged.status).toBe(1);
  });

  it('fails a sealed PDF whose document title was changed', async () => {
    const document = await PDFDocument.load(sealedPdf, { updateMetadata: false });
    document.setTitle('Another study altogether');
    const forged = await check('retitled.pdf', await document.save());
    expect(forged.stdout).toMatch(/pdf as printed\s+FAIL/);
    expect(forged.status).toBe(1);
  });

  describe('a compression bomb handed to check', () => {
    let bomb: Uint8Array;
    beforeAll(() => {
      // One gibibyte of zeros deflates to about a megabyte.
      bomb = deflateSync(Buffer.alloc(GIBIBYTE), { level: 9 });
    });

    function peakKb(stderr: string): number {
      const line = stderr.split('\n').find((text) => text.startsWith('kvarbook-peak-rss-kb '));
      return Number(line?.split(' ')[1]);
    }

    function checkBounded(name: string, pdf: Uint8Array) {
      writeFileSync(join(space.folder, name), pdf);
      return kvarbook(['check', name], space.folder, { ...space.env, NODE_OPTIONS: `--import=${PEAK_PROBE}` });
    }

    it('refuses, with a located error and bounded memory, an attachment that inflates to a gibibyte', async () => {
      const document = await PDFDocument.load(sealedPdf, { updateMetadata: false });
      attachRaw(document, 'zeros.bin', bomb, false);
      const refused = checkBounded('bomb-attachment.pdf', await document.save());
      expect(refused.status).toBe(1);
      expect(refused.stderr).toMatch(/bomb-attachment\.pdf.*EmbeddedFiles\/zeros\.bin.*more than 64 MiB/);
      expect(peakKb(refused.stderr)).toBeLessThan(512 * 1024);
    });

    it('refuses, with a located error and bounded memory, an object stream that inflates to a gibibyte', async () => {
      const document = await PDFDocument.load(sealedPdf, { updateMetadata: false });
      const { context } = document;
      const objectStream = PDFRawStream.of(context.obj({ Type: 'ObjStm', N: 1, First: 4, Filter: 'FlateDecode', Length: bomb.length }), bomb);
      document.catalog.set(PDFName.of('Bomb'), context.register(objectStream));
      const refused = checkBounded('bomb-object-stream.pdf', await document.save({ useObjectStreams: false }));
      expect(refused.status).toBe(1);
      expect(refused.stderr).toMatch(/bomb-object-stream\.pdf.*more than 64 MiB/);
      expect(peakKb(refused.stderr)).toBeLessThan(512 * 1024);
    });
  });
});
