// The bounds of a run besides the study's own limits: how long and how large the host's own stages may grow on study data.
import type { WorkerLimits } from './limitedWorker.ts';

/** Host stages that work on study data run in limited workers: these are their bounds, stated in every report. */
export const HOST_STAGE_LIMITS = {
  /** One chart: Vega-Lite compile and Vega render of one specification. */
  chart: { heapMb: 512, callSeconds: 20 },
  /** The type check of all blocks together. */
  typecheck: { heapMb: 2048, callSeconds: 120 },
} as const satisfies Record<string, WorkerLimits>;

/** How much a study may write: checked in the calculation process at the call, and again in the host. */
export const OUTPUT_LIMITS = {
  /** A result or criterion name, a column label, a unit, a caption. */
  nameCharacters: 200,
  /** Any other one text: a note, a caution, a printed line, a text value, a table cell, an inline value. */
  textCharacters: 10_000,
  /** Cells of one table. */
  tableCells: 100_000,
  /** One chart specification, as JSON. */
  chartSpecCharacters: 2_000_000,
  /** Everything one study writes (records and inline values, as JSON). */
  studyOutputBytes: 32 * 1024 * 1024,
  /** The HTML report, including the study source it carries. */
  reportBytes: 96 * 1024 * 1024,
} as const;
