// Prints a self-contained HTML report to a reproducible PDF with the system Chromium, offline.
import { mkdtemp, readdir, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import puppeteer, { type Browser } from 'puppeteer-core';
import { processIsRunning } from '../../output/liveProcess.ts';
import { PdfError, messageOf } from './errors.ts';
import { stampPdf, type PdfAttachment, type PdfMetadata } from './stamp.ts';
import { pageLayout, footerTemplate, headerTemplate } from './layout.ts';

export interface PrintReportOptions {
  html: string;
  chromiumPath: string;
  paper: 'A4' | 'Letter';
  /** Shown at the top of every page, e.g. "STUDY-ID  rev 3". */
  headerText: string;
  metadata: PdfMetadata;
  /** The study date; used for every date in the file so reprints are identical. Never the wall clock. */
  fixedDate: Date;
  attachments: PdfAttachment[];
  /** Whole print, launch to close; a browser still busy then is killed. Default 60 s. */
  timeoutMs?: number;
}

/** Flags for every Chromium we start: headless, offline, no background services, no first-run UI. */
export const chromiumFlags = [
  '--headless',
  '--no-sandbox',
  '--disable-gpu',
  '--disable-quic',
  '--no-first-run',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
] as const;

const defaultTimeoutMs = 60_000;
/** Scratch profiles are named after the process that made them, so a later print can tell orphans. */
const PROFILE_PREFIX = 'kvarbook-chromium-';
const ORPHAN_PATTERN = new RegExp(`^${PROFILE_PREFIX}(\\d+)-[A-Za-z0-9]+$`);
const closeGraceMs = 5_000;

/**
 * Prints `html` to PDF: one Chromium per call, always closed (killed with its whole process group if
 * it does not close), a fresh profile directory removed afterwards, every network request refused.
 */
export async function printReportPdf(options: PrintReportOptions): Promise<Uint8Array> {
  const timeoutMs = checkOptions(options);
  await removeOrphanedProfiles();
  const profileDirectory = await mkdtemp(join(tmpdir(), `${PROFILE_PREFIX}${process.pid}-`));
  const session: ChromiumSession = {};
  let timer: NodeJS.Timeout | undefined;
  const deadline = new Promise<never>((_, reject) => {
    timer = setTimeout(() => {
      reject(
        new PdfError('pdf-browser-timeout', 'Chromium did not finish printing in time and was killed', {
          quantity: 'timeoutMs',
          value: String(timeoutMs),
          allowed: 'printing to finish within the timeout',
          hint: 'Look for scripts in the report that never finish, or raise timeoutMs for very long reports.',
        }),
      );
    }, timeoutMs);
  });
  try {
    const printed = await Promise.race([printWithChromium(options, timeoutMs, profileDirectory, session), deadline]);
    // Header text, paper and the Chromium build shape the bytes too, so they join the identity.
    const identityText = JSON.stringify([options.html, options.headerText, options.paper, session.browserVersion ?? '']);
    return await stampPdf(printed, { ...options, identityText, printedBy: session.browserVersion ?? 'Chromium' });
  } finally {
    clearTimeout(timer);
    // A launch still in flight when the deadline hit settles within its own timeout; its browser
    // must be closed too, or it would outlive this call.
    await shutDown(await session.launching?.catch(() => undefined));
    await rm(profileDirectory, { recursive: true, force: true, maxRetries: 3 });
  }
}

interface ChromiumSession {
  launching?: Promise<Browser>;
  browserVersion?: string;
}

async function printWithChromium(
  options: PrintReportOptions,
  timeoutMs: number,
  profileDirectory: string,
  session: ChromiumSession,
): Promise<Uint8Array> {
  session.launching = puppeteer.launch({
    executablePath: options.chromiumPath,
    headless: true,
    pipe: true,
    userDataDir: profileDirectory,
    // puppeteer adds --headless and --user-data-dir itself from the two options above.
    args: chromiumFlags.filter((flag) => flag !== '--headless'),
    timeout: timeoutMs,
    protocolTimeout: 0,
    handleSIGINT: false,
    handleSIGTERM: false,
    handleSIGHUP: false,
    env: chromiumEnvironment(profileDirectory),
  });
  let browser: Browser;
  try {
    browser = await session.launching;
  } catch (error) {
    throw new PdfError(
      'pdf-browser-launch-failed',
      'Chromium could not be started',
      {
        quantity: 'chromiumPath',
        value: options.chromiumPath,
        allowed: 'a working Chromium executable',
        hint: `Chromium said: ${firstLine(messageOf(error))}. Install it with \`apt-get install -y chromium\` or set KVARBOOK_CHROMIUM.`,
      },
      { cause: error },
    );
  }
  try {
    session.browserVersion = await browser.version();
    const page = await browser.newPage();
    await page.setRequestInterception(true);
    page.on('request', (request) => {
      // The report is self-contained: inline data: URLs are content, everything else would be a fetch.
      if (request.url().startsWith('data:')) void request.continue();
      else void request.abort('blockedbyclient');
    });
    await page.setContent(options.html, { waitUntil: 'load', timeout: 0 });
    await page.emulateMediaType('print');
    const pdf = await page.pdf({
      format: options.paper,
      printBackground: true,
      displayHeaderFooter: true,
      headerTemplate: headerTemplate(options.headerText, options.metadata.title),
      footerTemplate: footerTemplate(),
      margin: pageLayout.margin,
      preferCSSPageSize: false,
      tagged: true,
      outline: false,
      timeout: 0,
    });
    return pdf;
  } catch (error) {
    if (error instanceof PdfError) throw error;
    throw new PdfError(
      'pdf-print-failed',
      'Chromium failed while printing the report',
      { quantity: 'html', value: `${options.html.length} characters`, allowed: 'printable HTML', hint: firstLine(messageOf(error)) },
      { cause: error },
    );
  }
}

/**
 * Chromium gets a minimal environment: no passphrase or token of the user's, its home inside the
 * profile that is removed afterwards, and a fixed locale and zone so that the same HTML prints to
 * the same bytes for the engineer and for the checker. Its scratch space stays the system's: it puts
 * a Unix socket there, whose path may not be longer than 107 bytes.
 */
function chromiumEnvironment(profileDirectory: string): NodeJS.ProcessEnv {
  return { PATH: process.env.PATH ?? '/usr/bin:/bin', HOME: profileDirectory, TMPDIR: tmpdir(), LANG: 'C.UTF-8', TZ: 'UTC' };
}

/**
 * A print whose process was killed (kill -9, a power cut) never reached its clean-up; its profile is
 * removed by the next print once the process that made it is gone. Chromium itself exits when the
 * pipe to that process closes.
 */
async function removeOrphanedProfiles(): Promise<void> {
  let names: string[];
  try {
    names = await readdir(tmpdir());
  } catch {
    return;
  }
  for (const name of names) {
    const owner = ORPHAN_PATTERN.exec(name)?.[1];
    if (owner !== undefined && Number(owner) !== process.pid && !processIsRunning(Number(owner))) {
      await rm(join(tmpdir(), name), { recursive: true, force: true, maxRetries: 3 });
    }
  }
}

/** Closes the browser politely; if it does not go within a grace period, kills its process group. */
export async function shutDown(browser: Browser | undefined): Promise<void> {
  if (browser === undefined) return;
  const browserProcess = browser.process();
  const closed = browser.close().then(
    () => true,
    () => false,
  );
  let graceTimer: NodeJS.Timeout | undefined;
  const graceOver = new Promise<false>((resolve) => {
    graceTimer = setTimeout(() => resolve(false), closeGraceMs);
  });
  // A grace timer left pending after a clean close would hold the process open for its full length.
  const inTime = await Promise.race([closed, graceOver]).finally(() => clearTimeout(graceTimer));
  const pid = browserProcess?.pid;
  if (pid === undefined) return;
  // puppeteer starts Chromium detached, so the browser leads its own process group and the negative
  // pid also reaches zygote, renderer and utility processes. Sent even after a clean close: helpers
  // can linger for a moment after the browser process itself has exited. (Debian's crashpad handler
  // sits in a group of its own but exits by itself once the browser is gone; the tests check that.)
  try {
    process.kill(-pid, 'SIGKILL');
  } catch {
    // The group is already gone.
  }
  if (!inTime) await closed;
}

function checkOptions(options: PrintReportOptions): number {
  const timeoutMs = options.timeoutMs ?? defaultTimeoutMs;
  if (!Number.isFinite(timeoutMs) || timeoutMs <= 0) {
    throw new PdfError('pdf-invalid-option', 'The print timeout must be a positive number of milliseconds', {
      quantity: 'timeoutMs',
      value: String(timeoutMs),
      allowed: 'a finite number greater than 0',
      hint: 'Leave it out for the default of 60000 ms.',
    });
  }
  if (Number.isNaN(options.fixedDate.getTime())) {
    throw new PdfError('pdf-invalid-option', 'The report date is not a valid date', {
      quantity: 'fixedDate',
      value: String(options.fixedDate),
      allowed: 'a valid Date, taken from the study date',
      hint: 'Write the study date in the front matter as YYYY-MM-DD.',
    });
  }
  if (options.paper !== 'A4' && options.paper !== 'Letter') {
    throw new PdfError('pdf-invalid-option', 'Unknown paper size', {
      quantity: 'paper',
      value: String(options.paper),
      allowed: '"A4" or "Letter"',
      hint: 'Use "A4" (210 × 297 mm) or "Letter" (8.5 × 11 in).',
    });
  }
  return timeoutMs;
}

function firstLine(text: string): string {
  return text.split('\n', 1)[0] ?? text;
}
