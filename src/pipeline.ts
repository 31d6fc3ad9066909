// The run of one study, stage by stage: parse -> inputs -> transpile -> type-check -> execute -> charts -> render.
import type { Diagnostic } from './diagnostics/diagnostic.ts';
import { StudyFailure } from './diagnostics/diagnostic.ts';
import { parseStudy } from './study/parse.ts';
import { type InputOverride, effectiveInputs } from './study/inputs.ts';
import { releaseTranspiler, transpileBlocks, transpileInlines } from './execute/transpile.ts';
import { type TypecheckCache, typecheckStudy } from './execute/typecheck.ts';
import { type ExecutionHooks, executeStudy } from './execute/session.ts';
import { type RenderedCharts, type ReportParts, renderReportParts } from './report/html.ts';
import { type ResultsDocument, type StudyRun, recordsOf, resultsDocument } from './report/studyRun.ts';
import { WorkerLimitError, openLimitedWorker } from './execute/limitedWorker.ts';
import { DEFAULT_CEILINGS, HOST_STAGE_LIMITS, OUTPUT_LIMITS, grantLimits } from './execute/limits.ts';
import type { RunLimits } from './study/model.ts';
import { partModule } from './installation.ts';

export interface RunRequest {
  /** The study path as the user named it; used in every location shown. */
  file: string;
  source: string;
  overrides: readonly InputOverride[];
  typecheck: boolean;
  /** The most the run grants whatever the study asks; DEFAULT_CEILINGS when absent. */
  ceilings?: RunLimits;
  /** Facts from the edge: versions and the lock-file hash, so this stage reads no files of its own. */
  environment: { kvarbookVersion: string; nodeVersion: string; lockfileSha256: string };
  /** The report's stylesheet (templates/report.css), read at the edge like the environment. */
  stylesheet: string;
  /** Outcomes of earlier type checks, kept by the edge; every run checks anew when absent. */
  typecheckCache?: TypecheckCache;
  hooks?: ExecutionHooks;
  /** Another build of the calculation child, for tests of a changed solver; the command line never sets it. */
  childBundle?: string;
}

export interface RunProduct {
  run: StudyRun;
  report: ReportParts;
  results: ResultsDocument;
}

const ISOLATION_DESCRIPTION =
  'separate Node.js process under the permission model: reads only the study folder, no writes, no child processes, workers or network modules';

export async function runStudy(request: RunRequest): Promise<RunProduct> {
  // 1. Parse: Markdown + front matter -> Study.
  const study = parseStudy(request.file, request.source);
  // 2. Inputs: front matter values with command-line overrides, unit- and range-checked.
  const inputs = effectiveInputs(study.inputs, request.overrides);
  // 3. Transpile every block and inline value; declarations found for the shared scope.
  let blocks: ReturnType<typeof transpileBlocks>;
  let inlines: ReturnType<typeof transpileInlines>;
  try {
    blocks = transpileBlocks(study);
    inlines = transpileInlines(study);
  } finally {
    releaseTranspiler();
  }
  // 4. Type-check against the block API, unless the author skipped it while drafting.
  if (request.typecheck) await typecheckStudy(study, undefined, request.typecheckCache);
  // 5. Execute in the sandboxed child, within the study's limits as far as the run's ceilings grant them.
  const granted = grantLimits(study.meta.limits, request.ceilings ?? DEFAULT_CEILINGS);
  const outcome = await executeStudy(study, inputs, blocks, inlines, {
    ...(request.hooks ? { hooks: request.hooks } : {}),
    ...(request.childBundle ? { childBundle: request.childBundle } : {}),
    granted,
  });
  const run: StudyRun = {
    study,
    inputs,
    outcome,
    provenance: {
      ...request.environment,
      studyFile: request.file.split(/[\\/]/).pop() ?? request.file,
      studySourceSha256: study.sourceSha256,
      limits: granted.limits,
      ...(Object.keys(granted.asked).length > 0 ? { limitsAsked: granted.asked } : {}),
      typeChecked: request.typecheck,
      isolation: ISOLATION_DESCRIPTION,
    },
  };
  // 6. Charts: Vega-Lite to SVG, each failure located at its chart() call.
  const charts = await renderCharts(run);
  // 7. Render the report and the results document, within the size a report may have.
  const report = renderReportParts(run, charts, request.stylesheet);
  requireReportSize(run, report);
  return { run, report, results: resultsDocument(run) };
}

/** The report as a whole is bounded too (prose and the source it carries count); the refusal names the block that wrote most. */
function requireReportSize(run: StudyRun, report: ReportParts): void {
  const bytes = Buffer.byteLength(report.head) + Buffer.byteLength(report.body);
  if (bytes <= OUTPUT_LIMITS.reportBytes) return;
  const sizes = run.outcome.blocks.map((block) => ({ blockIndex: block.blockIndex, characters: JSON.stringify(block.records).length }));
  const largest = sizes.reduce((best, next) => (next.characters > best.characters ? next : best), { blockIndex: -1, characters: 0 });
  const block = run.study.blocks.find((candidate) => candidate.index === largest.blockIndex);
  // A block that wrote megabytes is where to look; otherwise it is the study text itself.
  const line = block && largest.characters > 1024 * 1024 ? block.fenceLine : 1;
  throw new StudyFailure([
    {
      code: 'report-too-large',
      message: `the report would be ${(bytes / 1024 / 1024).toFixed(1)} MB; a report may be at most ${OUTPUT_LIMITS.reportBytes / 1024 / 1024} MB${block && line !== 1 ? ` (the block at line ${line} wrote ${(largest.characters / 1024 / 1024).toFixed(1)} MB of it)` : ''}`,
      at: { file: run.study.file, line },
      hint: 'write less: summarise long series, and keep bulky data out of the study text',
    },
  ]);
}

/** Charts are drawn by Vega in a limited worker: a specification that asks for endless work ends that worker, not the run's host. */
async function renderCharts(run: StudyRun): Promise<RenderedCharts> {
  const rendered: RenderedCharts = new Map();
  const problems: Diagnostic[] = [];
  const chartRecords = recordsOf(run, 'chart');
  if (chartRecords.length === 0) return rendered;
  const renderer = openLimitedWorker(partModule('chartWorker'), 'renderChartSvg', HOST_STAGE_LIMITS.chart);
  try {
    for (const record of chartRecords) {
      const at = record.at ?? { file: run.study.file, line: 1 };
      try {
        const svg = await renderer.call(record.spec);
        if (typeof svg !== 'string') throw new Error('the chart worker answered without an SVG');
        rendered.set(record, svg);
      } catch (error) {
        const limited = error instanceof WorkerLimitError;
        problems.push({
          code: limited ? 'chart-limit' : 'chart-spec',
          message: `chart "${record.caption}" cannot be drawn: ${limited ? `drawing it ${(error as Error).message}` : (error as Error).message}`,
          at,
          hint: limited
            ? `a chart is drawn within ${HOST_STAGE_LIMITS.chart.callSeconds} s and ${HOST_STAGE_LIMITS.chart.heapMb} MB; draw fewer points or split the chart`
            : 'the specification must be valid Vega-Lite with inline data (values); see the charts.* builders',
        });
        // A worker past its limits is gone; the charts after it are not drawn.
        if (limited) break;
      }
    }
  } finally {
    await renderer.close();
  }
  if (problems.length > 0) throw new StudyFailure(problems);
  return rendered;
}
