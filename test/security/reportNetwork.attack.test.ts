// Attacks on the report as a reader opens it: nothing in a study makes the report load anything, and the report's
// content security policy blocks every network load even if something did get in; inline CSS and SVG still work.
import { mkdtempSync, rmSync } from 'node:fs';
import { createServer, type Server } from 'node:http';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import puppeteer from 'puppeteer-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { UNSEALED_NOTICE, assembleReport } from '../../src/report/html.ts';
import { findChromium } from '../../src/report/pdf/find-chromium.ts';
import { chromiumFlags } from '../../src/report/pdf/print.ts';
import { diagnosticsOf, lineOf, runSource, studyText } from '../support/studies.ts';

describe('a study cannot make its report load anything', () => {
  it('shows raw HTML as text: no element of it reaches the report', async () => {
    const product = await runSource(
      studyText({ body: 'A pixel <img src="https://tracker.invalid/raw.png"> here.\n\n<div><img src="https://tracker.invalid/block.png"></div>\n' }),
    );
    expect(product.report.body).not.toMatch(/<img|<div><img/);
    expect(product.report.body).toContain('&lt;img src=&quot;https://tracker.invalid/raw.png&quot;&gt;');
  });

  it('refuses a Markdown image from a web address, at its line', async () => {
    const source = studyText({ body: '# Scope\n\nThe line route ![route](https://tracker.invalid/pixel.png) runs north.\n' });
    const [problem] = await diagnosticsOf(runSource(source));
    expect(problem).toMatchObject({ code: 'markdown-image-source', at: { line: lineOf(source, '![route]') } });
    expect(problem?.message).toContain('https://tracker.invalid/pixel.png');
  });

  it('refuses a Markdown image given by reference, at the line of the reference', async () => {
    const source = studyText({ body: 'See ![map][route].\n\n[route]: //tracker.invalid/map.png\n' });
    const [problem] = await diagnosticsOf(runSource(source));
    expect(problem).toMatchObject({ code: 'markdown-image-source', at: { line: lineOf(source, '[route]: //tracker') } });
  });

  it('refuses a Markdown image from a file beside the study, which a report opened elsewhere would look for', async () => {
    const source = studyText({ body: '![one-line diagram](figures/one-line.png)\n' });
    expect((await diagnosticsOf(runSource(source)))[0]?.code).toBe('markdown-image-source');
  });

  it('keeps an image carried in the study itself as a data: address', async () => {
    const product = await runSource(studyText({ body: '![dot](data:image/png;base64,iVBORw0KGgo=)\n' }));
    expect(product.report.body).toContain('<img src="data:image/png;base64,iVBORw0KGgo=" alt="dot" />');
  });

  it('gives every report a content security policy that blocks every network load', async () => {
    const product = await runSource(studyText({ body: 'Plain.' }));
    const policy = /<meta http-equiv="Content-Security-Policy" content="([^"]+)">/.exec(product.report.head)?.[1];
    expect(policy).toBe("default-src 'none'; img-src data:; style-src 'unsafe-inline'; font-src data:; base-uri 'none'; form-action 'none'");
    // Before anything that could load: right after the character set.
    expect(product.report.head.indexOf('Content-Security-Policy')).toBeLessThan(product.report.head.indexOf('<title>'));
  });
});

describe('the content security policy in a browser', () => {
  let server: Server;
  let origin = '';
  const requests: string[] = [];
  beforeAll(async () => {
    server = createServer((request, response) => {
      requests.push(request.url ?? '');
      response.writeHead(200, { 'content-type': 'image/png' });
      response.end();
    });
    await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
    origin = `http://127.0.0.1:${(server.address() as { port: number }).port}`;
  });
  afterAll(() => new Promise<void>((resolve) => server.close(() => resolve())));

  it('blocks a load that got into a report anyway, and keeps the inline styles and charts working', async () => {
    const chromium = findChromium(process.env);
    if ('error' in chromium) throw new Error(chromium.error);
    const spec =
      "{ data: { values: [{ x: 1, y: 2 }, { x: 2, y: 3 }] }, mark: 'line', encoding: { x: { field: 'x', type: 'quantitative' }, y: { field: 'y', type: 'quantitative' } } }";
    const product = await runSource(studyText({ body: ['```ts', `chart(${spec}, { caption: 'Inline chart' });`, '```'].join('\n') }));
    // As if a study had found a way past the Markdown rules: a pixel, a stylesheet and a background image.
    const planted = `<img src="${origin}/pixel.png"><link rel="stylesheet" href="${origin}/style.css"><div style="background:url(${origin}/bg.png)">x</div>`;
    const html = assembleReport(product.report, UNSEALED_NOTICE).replace('<main class="study">', `<main class="study">${planted}`);
    const profile = mkdtempSync(join(tmpdir(), 'kvarbook-csp-'));
    const browser = await puppeteer.launch({ executablePath: chromium.path, args: [...chromiumFlags, `--user-data-dir=${profile}`], headless: true });
    try {
      const page = await browser.newPage();
      await page.setContent(html, { waitUntil: 'load' });
      // Until the page's network has been quiet for a moment: a load the policy let through would have reached the server.
      await page.waitForNetworkIdle({ idleTime: 200 });
      // Evaluated in the page, where the DOM is; written as text because this project's types have no DOM.
      const seen = (await page.evaluate(`({
        svgWidth: document.querySelector('figure.chart svg')?.getBoundingClientRect().width ?? 0,
        bodyFont: getComputedStyle(document.body).fontFamily,
      })`)) as { svgWidth: number; bodyFont: string };
      expect(requests).toEqual([]);
      expect(seen.svgWidth).toBeGreaterThan(100);
      expect(seen.bodyFont).not.toBe('');
      expect(seen.bodyFont).not.toMatch(/^Times/);
    } finally {
      await browser.close();
      rmSync(profile, { recursive: true, force: true });
    }
  });
});
