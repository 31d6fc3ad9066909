import { execFileSync, spawn, spawnSync } from 'node:child_process';
import { randomUUID } from 'node:crypto';
import { mkdirSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { createServer } from 'node:http';
import type { AddressInfo } from 'node:net';
import { join } from 'node:path';
import { PDFDocument } from 'pdf-lib';
import { beforeAll, describe, expect, it, vi } from 'vitest';
import { readPdfAttachments } from '../../../src/report/pdf/attachments.ts';
import { PdfError } from '../../../src/report/pdf/errors.ts';
import { findChromium } from '../../../src/report/pdf/find-chromium.ts';
import { printReportPdf, type PrintReportOptions } from '../../../src/report/pdf/print.ts';
import { scratchFolder } from '../../support/cli.ts';

const scratch = scratchFolder('kvarbook-print-test-');

// Profile directories go to os.tmpdir(), which follows TMPDIR; a private one shows leftovers. Chromium
// and every process it starts have their HOME inside their profile, so this folder also tells this
// file's browsers apart from those other test files start at the same time.
const profileParent = join(scratch, 'profiles');
mkdirSync(profileParent);
process.env.TMPDIR = profileParent;
// A variable of the user's that no browser may inherit.
const userSecret = `KVARBOOK_PRINT_TEST_SECRET=${randomUUID()}`;
process.env.KVARBOOK_PRINT_TEST_SECRET = userSecret.split('=')[1];

let chromiumPath = '';

beforeAll(() => {
  const found = findChromium(process.env);
  // Not skipped: CI installs Chromium (scripts/ensure-system-packages.sh), so its absence is a failure.
  if ('error' in found) throw new Error(`PDF tests need Chromium: ${found.error}`);
  chromiumPath = found.path;
});

/** The processes this file's browsers started (their HOME is in one of its profiles): environment and command line. */
function browserProcesses(): { environment: string[]; commandLine: string }[] {
  const found: { environment: string[]; commandLine: string }[] = [];
  for (const entry of readdirSync('/proc')) {
    if (!/^\d+$/.test(entry)) continue;
    try {
      const environment = readFileSync(`/proc/${entry}/environ`, 'latin1').split('\0');
      if (environment.some((variable) => variable.startsWith(`HOME=${profileParent}/`)))
        found.push({ environment, commandLine: readFileSync(`/proc/${entry}/cmdline`, 'latin1') });
    } catch {
      // The process ended while we looked.
    }
  }
  return found;
}

const browserEnvironments = () => browserProcesses().map((browser) => browser.environment);
const markedProcessCount = () => browserProcesses().length;

/**
 * Waits until the browser and a helper it starts (the crash handler, which gets the browser's environment) are running.
 * The zygote and renderers are not seen: Chromium writes over their environment block with its process titles.
 */
async function untilHelpersRun(): Promise<void> {
  await vi.waitFor(() => expect(browserProcesses().some((browser) => browser.commandLine.includes('crashpad'))).toBe(true), {
    timeout: 4000,
    interval: 50,
  });
}

const sourceBytes = new TextEncoder().encode('---\nstudy: KB-017\n---\n# Northbrook–Saltmere 400 kV\n');
const binaryBytes = Uint8Array.from({ length: 4096 }, (_, index) => (index * 37) % 256);

function options(html: string, overrides: Partial<PrintReportOptions> = {}): PrintReportOptions {
  return {
    html,
    chromiumPath,
    paper: 'A4',
    headerText: 'KB-017  rev 3',
    metadata: {
      title: 'Shunt compensation of the Northbrook–Saltmere line',
      author: 'Example Grid Engineering',
      subject: 'Reactive compensation study',
      keywords: ['shunt reactor', 'kvarbook'],
    },
    fixedDate: new Date('2024-03-15T00:00:00Z'),
    attachments: [
      { fileName: 'study.md', mimeType: 'text/markdown', description: 'Study source', content: sourceBytes },
      { fileName: 'résultats.bin', mimeType: 'application/octet-stream', description: 'Raw results', content: binaryBytes },
    ],
    ...overrides,
  };
}

const shortReport =
  '<!doctype html><html><head><meta charset="utf-8"><title>KB-017</title></head><body>' +
  '<h1>Northbrook–Saltmere 400 kV</h1><p>Required shunt reactor rating: 412.7 Mvar</p></body></html>';

const longReport =
  '<!doctype html><html><head><meta charset="utf-8"></head><body>' +
  Array.from({ length: 250 }, (_, index) => `<p>Section ${index + 1}: reactive balance at tower ${index * 3}.</p>`).join('') +
  '</body></html>';

function pdfText(pdf: Uint8Array): string {
  const file = join(scratch, `${randomUUID()}.pdf`);
  writeFileSync(file, pdf);
  return execFileSync('pdftotext', [file, '-'], { encoding: 'utf8' });
}

async function printError(promise: Promise<unknown>): Promise<PdfError> {
  const error = await promise.then(
    () => undefined,
    (thrown: unknown) => thrown,
  );
  if (!(error instanceof PdfError)) throw new Error(`expected PdfError, got ${String(error)}`);
  return error;
}

describe('printReportPdf', () => {
  let shortPdf: Uint8Array;

  beforeAll(async () => {
    shortPdf = await printReportPdf(options(shortReport));
  });

  it('prints a short report to a one-page PDF', async () => {
    expect(new TextDecoder().decode(shortPdf.slice(0, 5))).toBe('%PDF-');
    expect((await PDFDocument.load(shortPdf)).getPageCount()).toBe(1);
  });

  it('puts the report text, the study header and the page numbering into the PDF', () => {
    const text = pdfText(shortPdf);
    expect(text).toContain('412.7 Mvar');
    expect(text).toContain('KB-017');
    expect(text).toContain('page 1 of 1');
  });

  it('sets title, author, subject, keywords, creator, producer and both dates', async () => {
    const document = await PDFDocument.load(shortPdf, { updateMetadata: false });
    expect(document.getTitle()).toBe('Shunt compensation of the Northbrook–Saltmere line');
    expect(document.getAuthor()).toBe('Example Grid Engineering');
    expect(document.getSubject()).toBe('Reactive compensation study');
    expect(document.getKeywords()).toBe('shunt reactor, kvarbook');
    expect(document.getCreator()).toBe('kvarbook');
    expect(document.getProducer()).toContain('kvarbook');
    expect(document.getCreationDate()?.toISOString()).toBe('2024-03-15T00:00:00.000Z');
    expect(document.getModificationDate()?.toISOString()).toBe('2024-03-15T00:00:00.000Z');
  });

  it('returns the attached files byte for byte', async () => {
    const attachments = await readPdfAttachments(shortPdf);
    expect(attachments.map((attachment) => attachment.fileName)).toEqual(['study.md', 'résultats.bin']);
    expect(attachments[0]?.content).toEqual(sourceBytes);
    expect(attachments[1]?.content).toEqual(binaryBytes);
  });

  it('prints the same HTML twice to byte-identical files', async () => {
    const reprint = await printReportPdf(options(shortReport));
    expect(Buffer.from(reprint).equals(Buffer.from(shortPdf))).toBe(true);
  });

  it('spreads a long report over several numbered pages', async () => {
    const pdf = await printReportPdf(options(longReport, { paper: 'Letter' }));
    const pages = (await PDFDocument.load(pdf)).getPageCount();
    expect(pages).toBeGreaterThanOrEqual(4);
    expect(pages).toBeLessThanOrEqual(12);
    expect(pdfText(pdf)).toContain(`page ${pages} of ${pages}`);
  });

  it('loads nothing from the network', async () => {
    // A loopback server stands in for the outside world and counts what reaches it.
    let requestsReceived = 0;
    const server = createServer((_request, response) => {
      requestsReceived += 1;
      response.end('x');
    });
    await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
    const { port } = server.address() as AddressInfo;
    try {
      const html =
        `<body><img src="http://127.0.0.1:${port}/tower.png" onerror="document.body.append('image-blocked')">` +
        `<link rel="stylesheet" href="http://127.0.0.1:${port}/style.css"></body>`;
      const text = pdfText(await printReportPdf(options(html, { attachments: [] })));
      expect(text).toContain('image-blocked');
      expect(requestsReceived).toBe(0);
    } finally {
      await new Promise((resolve) => server.close(resolve));
    }
  });

  it('sees its own Chromium processes while one is printing', async () => {
    const hanging = '<body><script>for (;;) {}</script></body>';
    const printing = printReportPdf(options(hanging, { timeoutMs: 4000 })).catch(() => undefined);
    await vi.waitFor(() => expect(markedProcessCount()).toBeGreaterThan(0), { timeout: 4000, interval: 50 });
    // Guards the leftover checks below: a count that is always 0 would prove nothing.
    expect(markedProcessCount()).toBeGreaterThan(0);
    await printing;
  });

  it('gives Chromium and its helpers a minimal environment, none of the user’s variables', async () => {
    const hanging = '<body><script>for (;;) {}</script></body>';
    const printing = printReportPdf(options(hanging, { timeoutMs: 4000 })).catch(() => undefined);
    await untilHelpersRun();
    const environments = browserEnvironments();
    await printing;
    expect(environments.length).toBeGreaterThan(0);
    for (const environment of environments) expect(environment).not.toContain(userSecret);
  });

  it('removes the profile a killed print left behind, and keeps one of a print still running', async () => {
    const gone = spawnSync(process.execPath, ['-e', '0']).pid!;
    const running = spawn(process.execPath, ['-e', 'setTimeout(() => {}, 60000)'], { stdio: 'ignore' });
    try {
      const orphan = join(profileParent, `kvarbook-chromium-${gone}-Ab12Cd`);
      const live = join(profileParent, `kvarbook-chromium-${running.pid}-Ef34Gh`);
      for (const folder of [orphan, live]) mkdirSync(join(folder, 'Default'), { recursive: true });
      await printReportPdf(options(shortReport, { attachments: [] }));
      expect(readdirSync(profileParent)).toEqual([`kvarbook-chromium-${running.pid}-Ef34Gh`]);
    } finally {
      running.kill('SIGKILL');
      rmSync(join(profileParent, `kvarbook-chromium-${running.pid}-Ef34Gh`), { recursive: true, force: true });
    }
  });

  it('leaves no Chromium process and no profile directory behind after a print', async () => {
    await printReportPdf(options(shortReport, { attachments: [] }));
    expect(markedProcessCount()).toBe(0);
    expect(readdirSync(profileParent)).toEqual([]);
  });

  it('kills a browser that hangs past the timeout and says so', async () => {
    const hanging = '<body><p>loop</p><script>for (;;) {}</script></body>';
    const error = await printError(printReportPdf(options(hanging, { timeoutMs: 3000 })));
    expect(error.code).toBe('pdf-browser-timeout');
    expect(markedProcessCount()).toBe(0);
    expect(readdirSync(profileParent)).toEqual([]);
  });

  it('reports a Chromium that cannot start, without leaving anything behind', async () => {
    const error = await printError(printReportPdf(options(shortReport, { chromiumPath: join(scratch, 'no-such-chromium') })));
    expect(error.code).toBe('pdf-browser-launch-failed');
    expect(error.message).toContain('apt-get install -y chromium');
    expect(readdirSync(profileParent)).toEqual([]);
  });

  it('refuses an invalid report date before starting Chromium', async () => {
    const error = await printError(printReportPdf(options(shortReport, { fixedDate: new Date('not a date') })));
    expect(error.code).toBe('pdf-invalid-option');
    expect(error.quantity).toBe('fixedDate');
  });
});

describe('readPdfAttachments', () => {
  it('finds no attachments in a PDF without any', async () => {
    const document = await PDFDocument.create();
    document.addPage();
    expect(await readPdfAttachments(await document.save())).toEqual([]);
  });

  it('rejects bytes that are not a PDF', async () => {
    const error = await printError(readPdfAttachments(new TextEncoder().encode('plain text')));
    expect(error.code).toBe('pdf-read-failed');
  });
});
