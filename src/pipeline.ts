// The run of one study, stage by stage: parse -> inputs -> transpile -> type-check -> execute -> sensitivity -> charts -> render.
import type { Diagnostic } from './diagnostics/diagnostic.ts';
import { StudyFailure } from './diagnostics/diagnostic.ts';
import { parseStudy } from './study/parse.ts';
import { type InputOverride, effectiveInputs } from './study/inputs.ts';
import { releaseTranspiler, transpileBlocks, transpileInlines } from './execute/transpile.ts';
import { type TypecheckCache, typecheckStudy } from './execute/typecheck.ts';
import { type ExecutionHooks, type ExecutionOutcome, type LocatedRecord, executeStudy, startCalculation } from './execute/session.ts';
import { type RenderedCharts, type ReportParts, renderReportParts } from './report/html.ts';
import { type ResultsDocument, type StudyRun, resultsDocument } from './report/studyRun.ts';
import { type LimitedWorker, WorkerLimitError, openLimitedWorker } from './execute/limitedWorker.ts';
import { DEFAULT_CEILINGS, HOST_STAGE_LIMITS, OUTPUT_LIMITS, grantLimits } from './execute/limits.ts';
import type { RunLimits } from './study/model.ts';
import { partModule } from './installation.ts';
import { requireNamedFigures, sensitivityOutcome } from './sensitivity/outcome.ts';
import { runSensitivity } from './sensitivity/variants.ts';
import { sensitivityCharts } from './report/sensitivity.ts';

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
  /** Charts drawn by earlier runs, kept by the edge; every run draws anew when absent. */
  chartCache?: ChartCache;
  hooks?: ExecutionHooks;
  /** Also run the study with each uncertain input at each end of its range (the front matter's `sensitivity:`). */
  sensitivity?: boolean;
  /** Another build of the calculation child, for tests of a changed solver; the command line never sets it. */
  childBundle?: string;
  /** Ends the run early, between stages and inside the execution (the live preview's superseded runs). */
  signal?: AbortSignal;
}

/** The SVG of a chart specification (as JSON text) that this same kvarbook drew before without a problem. */
export interface ChartCache {
  read(specJson: string): string | undefined;
  write(specJson: string, svg: string): void;
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
  // The calculation child is forked now, so that its start overlaps the transpile and the type check.
  const granted = grantLimits(study.meta.limits, request.ceilings ?? DEFAULT_CEILINGS);
  const calculation = startCalculation(study, granted.limits, request.childBundle);
  const charts = new ChartDrawing(study.file, request.chartCache);
  let outcome: ExecutionOutcome;
  let sensitivity: ReturnType<typeof sensitivityOutcome> | undefined;
  try {
    // 3. Transpile every block and inline value; declarations found for the shared scope.
    let blocks: ReturnType<typeof transpileBlocks>;
    let inlines: ReturnType<typeof transpileInlines>;
    try {
      blocks = transpileBlocks(study);
      inlines = transpileInlines(study);
    } finally {
      releaseTranspiler();
    }
    // 4. Type-check against the block API, unless the author skipped it while drafting; 5. execute in the sandboxed
    // child, within the study's limits as far as the run's ceilings grant them. The blocks run while the type check
    // works, and its problems come first, as if it had run alone; each chart is drawn as soon as its block is done,
    // but not before the type check is (the compiler and Vega at once would add to the run's peak memory).
    let typeChecked = !request.typecheck;
    const held: LocatedRecord[][] = [];
    const checked = request.typecheck ? typecheckStudy(study, undefined, request.typecheckCache) : Promise.resolve();
    const executed = executeStudy(study, inputs, blocks, inlines, {
      hooks: { ...request.hooks, onBlockDone: (block) => (typeChecked ? charts.draw(block.records) : held.push(block.records)) },
      ...(request.signal ? { signal: request.signal } : {}),
      granted,
      started: calculation,
    });
    executed.catch(() => undefined);
    await checked;
    request.signal?.throwIfAborted();
    typeChecked = true;
    for (const records of held) charts.draw(records);
    outcome = await executed;
    request.signal?.throwIfAborted();
    calculation.close();
    // 6. Sensitivity: the named figures exist in every run; with --sensitivity, each range's ends (and the samples) run too, a few processes at a time.
    const plan = study.sensitivity;
    if (plan) requireNamedFigures(plan, outcome);
    if (request.sensitivity && !plan) {
      throw new StudyFailure([
        {
          code: 'sensitivity-no-plan',
          message: '--sensitivity was asked, but the front matter declares no "sensitivity" section',
          at: { file: study.file, line: 1 },
          hint: 'name the uncertain inputs and the results to follow, e.g.\nsensitivity:\n  inputs:\n    lineLength: { low: -1 %, high: +1 % }\n  results: [Open-end voltage]',
        },
      ]);
    }
    const sensitivityRuns =
      request.sensitivity && plan
        ? await runSensitivity({
            study,
            plan,
            overrides: request.overrides,
            asRun: inputs,
            execute: (variantInputs) =>
              executeStudy(study, variantInputs, blocks, inlines, {
                ...(request.signal ? { signal: request.signal } : {}),
                ...(request.childBundle ? { childBundle: request.childBundle } : {}),
                granted,
              }),
          })
        : undefined;
    request.signal?.throwIfAborted();
    sensitivity = sensitivityRuns && plan ? sensitivityOutcome(plan, { outcome, inputs }, sensitivityRuns) : undefined;
  } catch (error) {
    calculation.close();
    await charts.close();
    throw error;
  }
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
    ...(sensitivity ? { sensitivity: { outcome: sensitivity, charts: sensitivityCharts(sensitivity) } } : {}),
  };
  // 7. Charts: Vega-Lite to SVG, each failure located at its chart() call.
  charts.draw(run.sensitivity?.charts ?? []);
  const rendered = await charts.finish();
  // 8. Render the report and the results document, within the size a report may have.
  const report = renderReportParts(run, rendered, request.stylesheet);
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

/**
 * Charts are drawn by Vega in a limited worker: a specification that asks for endless work ends that worker, not the
 * run's host. The worker starts with the first chart and draws each in turn while the blocks after it run.
 */
class ChartDrawing {
  private readonly file: string;
  private readonly cache: ChartCache | undefined;
  private renderer: LimitedWorker | undefined;
  private closed = false;
  /** Each chart in study order; `specJson` is set for a chart drawn in this run, which finish() keeps in the cache. */
  private readonly drawn: { record: Extract<LocatedRecord, { kind: 'chart' }>; svg: Promise<unknown>; specJson?: string }[] = [];

  constructor(file: string, cache: ChartCache | undefined) {
    this.file = file;
    this.cache = cache;
  }

  draw(records: readonly LocatedRecord[]): void {
    for (const record of records) {
      if (record.kind !== 'chart' || this.closed) continue;
      const specJson = this.cache ? JSON.stringify(record.spec) : undefined;
      const cached = specJson === undefined ? undefined : this.cache?.read(specJson);
      if (cached !== undefined) {
        this.drawn.push({ record, svg: Promise.resolve(cached) });
        continue;
      }
      this.renderer ??= openLimitedWorker(partModule('chartWorker'), 'renderChartSvg', HOST_STAGE_LIMITS.chart);
      const svg = this.renderer.call(record.spec);
      // Looked at in finish(), in order; a run that fails before then never looks.
      svg.catch(() => undefined);
      this.drawn.push({ record, svg, ...(specJson === undefined ? {} : { specJson }) });
    }
  }

  /** The SVG of every chart, or every chart's problem up to the first that ran past the worker's limits. */
  async finish(): Promise<RenderedCharts> {
    const rendered: RenderedCharts = new Map();
    const problems: Diagnostic[] = [];
    try {
      for (const { record, svg: drawing, specJson } of this.drawn) {
        const at = record.at ?? { file: this.file, line: 1 };
        try {
          const svg = await drawing;
          if (typeof svg !== 'string') throw new Error('the chart worker answered without an SVG');
          rendered.set(record, svg);
          if (specJson !== undefined) this.cache?.write(specJson, svg);
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
      await this.close();
    }
    if (problems.length > 0) throw new StudyFailure(problems);
    return rendered;
  }

  async close(): Promise<void> {
    this.closed = true;
    await this.renderer?.close();
  }
}
