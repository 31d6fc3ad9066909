// Benchmark: kvarbook's PDF printing against the bare Chromium print of the same HTML file.
import { spawn } from 'node:child_process';
import { mkdtemp, readFile, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { findChromium } from '../src/report/pdf/find-chromium.ts';
import { chromiumFlags, printReportPdf } from '../src/report/pdf/print.ts';

const repetitions = 5;

export interface PdfBenchResult {
  /** Median wall time of printReportPdf (launch, print, stamp, close). */
  kvarbookMs: number;
  /** Median wall time of `chromium --headless --print-to-pdf` with the same flags. */
  chromiumFloorMs: number;
  ratio: number;
}

export async function runPdfBench(htmlPath: string): Promise<PdfBenchResult> {
  const found = findChromium(process.env);
  if ('error' in found) throw new Error(found.error);
  const html = await readFile(htmlPath, 'utf8');
  const kvarbookTimes: number[] = [];
  const floorTimes: number[] = [];
  // Interleaved so that drift in machine load affects both sides alike.
  for (let run = 0; run < repetitions; run += 1) {
    kvarbookTimes.push(await timed(() => printOnce(found.path, html)));
    floorTimes.push(await timed(() => chromiumAlone(found.path, resolve(htmlPath))));
  }
  const kvarbookMs = median(kvarbookTimes);
  const chromiumFloorMs = median(floorTimes);
  return { kvarbookMs, chromiumFloorMs, ratio: kvarbookMs / chromiumFloorMs };
}

async function printOnce(chromiumPath: string, html: string): Promise<void> {
  await printReportPdf({
    html,
    chromiumPath,
    paper: 'A4',
    headerText: 'BENCH-1  rev 0',
    metadata: { title: 'Benchmark report', author: 'kvarbook bench', subject: 'timing', keywords: ['bench'] },
    fixedDate: new Date('2024-01-01T00:00:00Z'),
    attachments: [{ fileName: 'report.html', mimeType: 'text/html', description: 'source', content: new TextEncoder().encode(html) }],
  });
}

async function chromiumAlone(chromiumPath: string, htmlPath: string): Promise<void> {
  const workDirectory = await mkdtemp(join(tmpdir(), 'kvarbook-bench-'));
  try {
    const args = [
      ...chromiumFlags,
      `--user-data-dir=${join(workDirectory, 'profile')}`,
      `--print-to-pdf=${join(workDirectory, 'out.pdf')}`,
      pathToFileURL(htmlPath).href,
    ];
    await new Promise<void>((done, fail) => {
      const child = spawn(chromiumPath, args, { stdio: 'ignore' });
      child.on('error', fail);
      child.on('exit', (code) => (code === 0 ? done() : fail(new Error(`chromium exited with ${String(code)}`))));
    });
  } finally {
    await rm(workDirectory, { recursive: true, force: true });
  }
}

async function timed(action: () => Promise<void>): Promise<number> {
  const start = performance.now();
  await action();
  return performance.now() - start;
}

function median(values: number[]): number {
  const sorted = [...values].sort((a, b) => a - b);
  const middle = Math.floor(sorted.length / 2);
  return sorted.length % 2 === 1 ? (sorted[middle] ?? Number.NaN) : ((sorted[middle - 1] ?? 0) + (sorted[middle] ?? 0)) / 2;
}

/** A report-like page: headings, a results table and a few inline SVG charts. */
async function sampleReportHtml(): Promise<string> {
  const { renderChartSvg } = await import('../src/report/chart/render.ts');
  const { voltageProfileChart, powerAngleChart } = await import('../src/report/chart/builders.ts');
  const profile = (receivingPu: number) =>
    [0, 100, 200, 300, 400].map((distanceKm) => ({ distanceKm, voltagePu: receivingPu * Math.cos((0.06 * Math.PI * (400 - distanceKm)) / 180) }));
  const charts = await Promise.all([
    renderChartSvg(voltageProfileChart({ cases: [{ label: 'no load', points: profile(1.1) }, { label: 'reactors in', points: profile(1.02) }], bandPu: { min: 0.95, max: 1.05 } })),
    renderChartSvg(
      powerAngleChart({
        curves: [{ label: 'intact', points: Array.from({ length: 19 }, (_, i) => ({ angleDeg: i * 10, pMw: 1200 * Math.sin((i * 10 * Math.PI) / 180) })) }],
        operatingPoint: { angleDeg: 30, pMw: 600 },
      }),
    ),
  ]);
  const rows = Array.from({ length: 60 }, (_, i) => `<tr><td>${i + 1}</td><td>${(i * 6.5).toFixed(1)} km</td><td>${(1 + i / 1000).toFixed(3)} pu</td></tr>`).join('');
  return `<!doctype html><html><head><meta charset="utf-8"><title>Bench</title></head><body><h1>Eastvale–Norhaven 400 kV</h1>${charts.join('')}<table>${rows}</table></body></html>`;
}

if (process.argv[1] !== undefined && import.meta.url === pathToFileURL(resolve(process.argv[1])).href) {
  let htmlPath = process.argv[2];
  let sampleDirectory: string | undefined;
  if (htmlPath === undefined) {
    sampleDirectory = await mkdtemp(join(tmpdir(), 'kvarbook-bench-sample-'));
    htmlPath = join(sampleDirectory, 'report.html');
    await writeFile(htmlPath, await sampleReportHtml());
  }
  const result = await runPdfBench(htmlPath);
  process.stdout.write(
    `pdf: kvarbook ${result.kvarbookMs.toFixed(0)} ms, chromium alone ${result.chromiumFloorMs.toFixed(0)} ms, ratio ${result.ratio.toFixed(2)} (target ≤ 1.30)\n`,
  );
  if (sampleDirectory !== undefined) await rm(sampleDirectory, { recursive: true, force: true });
}
