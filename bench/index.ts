// `npm run bench`: every speed target of kvarbook measured against its own floor, in one run.
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { spawnSync } from 'node:child_process';
import { runProfileBench } from './profile.bench.ts';
import { runPdfBench } from './pdf.bench.ts';
import { runCheckBench } from './check.bench.ts';
import { runScalingBench, scalingTable, unclosedBracesTable } from './scaling.bench.ts';

const ROOT = resolve(import.meta.dirname, '..');

function demoReportHtml(folder: string): string {
  const result = spawnSync(process.execPath, [join(ROOT, 'bin/kvarbook.mjs'), 'run', join(ROOT, 'studies/caldera-bay-400kv.study.md'), '--out', folder], { encoding: 'utf8' });
  if (result.status !== 0) throw new Error(result.stderr);
  return join(folder, 'CBX-RC-001-r2.html');
}

const rows: string[] = [];
const profile = await runProfileBench();
rows.push(`profile, 10,000 points   solver ${profile.solverMs.toFixed(2)} ms   plain Float64Array loop ${profile.plainMs.toFixed(2)} ms   ratio ${profile.ratio.toFixed(2)}`);

const scratch = mkdtempSync(join(tmpdir(), 'kvarbook-bench-'));
try {
  const pdf = await runPdfBench(demoReportHtml(scratch));
  rows.push(`PDF of the demo report    kvarbook ${pdf.kvarbookMs.toFixed(0)} ms   chromium --print-to-pdf ${pdf.chromiumFloorMs.toFixed(0)} ms   ratio ${pdf.ratio.toFixed(2)} (target 1.3)`);
} finally {
  rmSync(scratch, { recursive: true, force: true });
}

const check = await runCheckBench();
rows.push(`check vs run of the demo  run ${check.runMs.toFixed(0)} ms   check ${check.checkMs.toFixed(0)} ms   ratio ${check.ratio.toFixed(2)} (target 1.15)`);

console.log(rows.join('\n'));
console.log('\nstages against study size (declarations, results and inline values each; x2.0 per doubling is linear):');
console.log(scalingTable(await runScalingBench()));
console.log(unclosedBracesTable());
