// `npm run bench`: every speed target of kvarbook measured against its own floor, in one run.
import { runProfileBench } from './profile.bench.ts';
import { runPdfBench } from './pdf.bench.ts';
import { runCheckBench } from './check.bench.ts';
import { archiveRow, runArchiveBench } from './archive.bench.ts';
import { runScalingBench, scalingTable, unclosedBracesTable } from './scaling.bench.ts';
import { runStartupBench, startupRows } from './startup.bench.ts';

const rows: string[] = [];
rows.push(...startupRows(await runStartupBench()));
const profile = await runProfileBench();
rows.push(
  `profile, 10,000 points   solver ${profile.solverMs.toFixed(2)} ms   plain Float64Array loop ${profile.plainMs.toFixed(2)} ms   ratio ${profile.ratio.toFixed(2)}`,
);

const pdf = await runPdfBench();
rows.push(
  `run --pdf minus run        ${(pdf.runPdfMs - pdf.runMs).toFixed(0)} ms (run ${pdf.runMs.toFixed(0)} ms, run --pdf ${pdf.runPdfMs.toFixed(0)} ms)   chromium --print-to-pdf ${pdf.chromiumFloorMs.toFixed(0)} ms   ratio ${pdf.ratio.toFixed(2)} (target 1.2)`,
);

const check = await runCheckBench();
rows.push(
  `check vs run of the demo  run ${check.runMs.toFixed(0)} ms   check ${check.checkMs.toFixed(0)} ms   ratio ${check.ratio.toFixed(2)} (target 1.1)`,
);

rows.push(archiveRow(await runArchiveBench()));

console.log(rows.join('\n'));
console.log('\nstages against study size (declarations, results and inline values each; x2.0 per doubling is linear):');
console.log(scalingTable(await runScalingBench()));
console.log(unclosedBracesTable());
