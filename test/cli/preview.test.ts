import { type ChildProcess, spawn } from 'node:child_process';
import { readFileSync, readdirSync, renameSync, writeFileSync } from 'node:fs';
import { createServer, request } from 'node:http';
import type { AddressInfo } from 'node:net';
import { join } from 'node:path';
import puppeteer, { type Browser, type Page } from 'puppeteer-core';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { chromiumFlags, findChromium } from '../../src/report/pdf/index.ts';
import { shutDown } from '../../src/report/pdf/print.ts';
import { KVARBOOK_BIN, kvarbookInProcess, scratchFolder } from '../support/cli.ts';
import { lineOf, studyText } from '../support/studies.ts';

/** A study whose one figure names the line length, so that a changed input shows as a changed caption. */
function lineStudy(lengthKm: number, extraBlock = ''): string {
  return studyText({
    frontMatter: 'limits: { blockSeconds: 120, studySeconds: 300 }',
    inputs: `  lineLength: ${lengthKm} km`,
    body: [
      '# The line',
      '',
      '```ts',
      'const lengthKm = inputs.lineLength.in("km");',
      'result("length", lengthKm, { unit: "km" });',
      'const profile = [{ distanceKm: 0, voltagePu: 1 }, { distanceKm: lengthKm, voltagePu: 1.05 }];',
      "chart(charts.voltageProfileChart({ cases: [{ label: 'no load', points: profile }], bandPu: { min: 0.95, max: 1.05 } }), { caption: `Voltage along the ${lengthKm} km line` });",
      '```',
      '',
      ...(extraBlock ? ['```ts', extraBlock, '```', ''] : []),
      ...Array.from({ length: 40 }, (_, index) => `Paragraph ${index + 1} of prose, so that the report is taller than the window.\n`),
    ].join('\n'),
  });
}

const WAIT = { timeout: 45_000, interval: 100 };

let folder: string;
let studyPath: string;
let preview: ChildProcess;
let output = '';
let url: string;
let browser: Browser;
let page: Page;

/** Saves as editors that write a new file and rename it over the old one do. */
function saveByRename(text: string): void {
  const temporary = join(folder, '.line.study.md.swp');
  writeFileSync(temporary, text);
  renameSync(temporary, studyPath);
}

/** An expression evaluated in the page (as text: the project's types have no DOM). */
const inPage = <T>(expression: string) => page.evaluate(expression) as Promise<T>;
const figureCaption = () => inPage<string>("document.querySelector('figure.chart figcaption')?.textContent ?? ''");
const problemsPanel = () => inPage<string | null>("document.querySelector('.preview-problems')?.textContent ?? null");

/** The calculation processes allowed to read `studyFolder`: a run's child is started so, and ends with its run. */
function calculationProcesses(studyFolder: string): number[] {
  return readdirSync('/proc')
    .filter((name) => /^\d+$/.test(name))
    .filter((name) => {
      try {
        return readFileSync(`/proc/${name}/cmdline`, 'utf8').includes(`--allow-fs-read=${studyFolder}\u0000`);
      } catch {
        return false;
      }
    })
    .map(Number);
}

/** The status the preview answers a GET with; `headers` replace the ones a client would send. */
function get(path: string, headers: Record<string, string> = {}): Promise<number> {
  const { port } = new URL(url);
  return new Promise((resolve, reject) => {
    const sent = request({ host: '127.0.0.1', port, path, headers }, (response) => {
      response.resume();
      resolve(response.statusCode ?? 0);
    });
    sent.on('error', reject);
    sent.end();
  });
}

beforeAll(async () => {
  folder = scratchFolder('kvarbook-preview-');
  studyPath = join(folder, 'line.study.md');
  writeFileSync(studyPath, lineStudy(320));
  preview = spawn(process.execPath, [KVARBOOK_BIN, 'preview', 'line.study.md', '--no-typecheck'], { cwd: folder, stdio: ['ignore', 'pipe', 'pipe'] });
  preview.stdout?.on('data', (chunk: Buffer) => {
    output += chunk.toString('utf8');
  });
  preview.stderr?.on('data', (chunk: Buffer) => {
    output += chunk.toString('utf8');
  });
  url = await vi.waitFor(() => {
    const found = /preview: (http:\/\/127\.0\.0\.1:\d+\/)/.exec(output)?.[1];
    if (!found) throw new Error(`no address printed yet: ${output}`);
    return found;
  }, WAIT);
  const chromium = findChromium(process.env);
  if ('error' in chromium) throw new Error(chromium.error);
  browser = await puppeteer.launch({
    executablePath: chromium.path,
    headless: true,
    pipe: true,
    userDataDir: scratchFolder('kvarbook-preview-profile-'),
    args: chromiumFlags.filter((flag) => flag !== '--headless'),
  });
  page = await browser.newPage();
  await page.setViewport({ width: 900, height: 600 });
  await page.goto(url);
});

afterAll(async () => {
  await shutDown(browser);
  if (preview && preview.exitCode === null) preview.kill('SIGKILL');
});

describe('kvarbook preview', () => {
  it('refuses a study file that does not exist, as run does', async () => {
    const { status, stderr } = await kvarbookInProcess(['preview', 'missing.study.md'], folder);
    expect(status).toBe(1);
    expect(stderr).toContain('missing.study.md does not exist');
  });

  it('says which port is taken when it cannot listen there', async () => {
    const taken = createServer();
    await new Promise<void>((resolve) => taken.listen(0, '127.0.0.1', resolve));
    const port = (taken.address() as AddressInfo).port;
    try {
      const { status, stderr } = await kvarbookInProcess(['preview', 'line.study.md', '--port', String(port)], folder);
      expect(status).toBe(1);
      expect(stderr).toContain(`the preview cannot listen on 127.0.0.1:${port} (EADDRINUSE)`);
      expect(stderr).toContain('[preview-port-unavailable]');
    } finally {
      await new Promise((resolve) => taken.close(resolve));
    }
  });

  it('prints a loopback address and serves the study report there', async () => {
    expect(url).toMatch(/^http:\/\/127\.0\.0\.1:\d+\/$/);
    await vi.waitFor(async () => expect(await figureCaption()).toContain('Voltage along the 320 km line'), WAIT);
    expect(await inPage("document.querySelector('figure.chart svg') !== null")).toBe(true);
  });

  it('shows the changed figure once the study file is saved, without reloading the page', async () => {
    await inPage('window.loadedOnce = true');
    writeFileSync(studyPath, lineStudy(280));
    await vi.waitFor(async () => expect(await figureCaption()).toContain('Voltage along the 280 km line'), WAIT);
    expect(await inPage('window.loadedOnce')).toBe(true);
  });

  it("keeps the reader's scroll position across an update", async () => {
    await inPage('window.scrollTo(0, 400)');
    expect(await inPage('window.scrollY')).toBe(400);
    writeFileSync(studyPath, lineStudy(300));
    await vi.waitFor(async () => expect(await figureCaption()).toContain('Voltage along the 300 km line'), WAIT);
    expect(await inPage('window.scrollY')).toBe(400);
  });

  it("shows a failing block's located error at the top of the page, with the last good report below it", async () => {
    const broken = lineStudy(250).replace('result("length"', 'throw new Error("deliberate failure"); result("length"');
    saveByRename(broken);
    await vi.waitFor(async () => expect(await problemsPanel()).toContain('deliberate failure'), WAIT);
    const panel = (await problemsPanel()) ?? '';
    expect(panel).toContain(`line.study.md:${lineOf(broken, 'deliberate failure')}:`);
    // The terminal's excerpt: the study line itself, marked.
    expect(panel).toMatch(new RegExp(`> ${lineOf(broken, 'deliberate failure')} \\| .*throw new Error\\("deliberate failure"\\)`));
    expect(await inPage('document.body.firstElementChild.className')).toBe('preview-problems');
    expect(await figureCaption()).toContain('Voltage along the 300 km line');
  });

  it('takes the error away once the block is fixed', async () => {
    saveByRename(lineStudy(250));
    await vi.waitFor(async () => expect(await figureCaption()).toContain('Voltage along the 250 km line'), WAIT);
    expect(await problemsPanel()).toBeNull();
  });

  it('answers 404 for every path but the page and its update channel', async () => {
    for (const path of [
      '/../line.study.md',
      '/line.study.md',
      '/%2e%2e/line.study.md',
      '/etc/passwd',
      '/updates/../line.study.md',
      '/index.html',
      '//',
    ])
      expect(await get(path), path).toBe(404);
    expect(await get('/')).toBe(200);
  });

  it('refuses a request whose Host header is not its loopback address', async () => {
    const { port } = new URL(url);
    expect(await get('/', { host: `rebound.example:${port}` })).toBe(421);
    expect(await get('/updates', { host: `rebound.example:${port}` })).toBe(421);
    expect(await get('/', { host: `127.0.0.1:${port}` })).toBe(200);
  });

  it('refuses the update channel to a page of another origin', async () => {
    expect(await get('/updates', { origin: 'http://rebound.example' })).toBe(403);
  });

  it('ends a run still in progress when the study is saved again, and shows the newer save', async () => {
    saveByRename(lineStudy(240, 'while (true) {}'));
    await vi.waitFor(() => expect(calculationProcesses(folder)).not.toEqual([]), WAIT);
    saveByRename(lineStudy(230));
    // Long before the endless block's limit of 120 s: the run was ended, not waited for.
    await vi.waitFor(async () => expect(await figureCaption()).toContain('Voltage along the 230 km line'), WAIT);
    expect(await problemsPanel()).toBeNull();
    expect(calculationProcesses(folder)).toEqual([]);
  });

  it('stops on Ctrl-C during a run, leaving no calculation process behind', async () => {
    saveByRename(lineStudy(250, 'while (true) {}'));
    // The run is in progress once its calculation process, which may read the study folder, is there.
    await vi.waitFor(() => expect(calculationProcesses(folder)).not.toEqual([]), WAIT);
    const exited = new Promise<number | null>((resolve) => preview.once('exit', (code) => resolve(code)));
    preview.kill('SIGINT');
    // Well before the block's limit of 120 s: the run was ended, not waited for.
    expect(await exited).toBe(0);
    expect(output).toContain('preview stopped');
    expect(calculationProcesses(folder)).toEqual([]);
  });
});
