// The bounds of a run besides the study's own limits: the checker's ceilings over them, the host stages' limits, the size of output.
import type { WorkerLimits } from './limitedWorker.ts';
import type { RunLimits } from '../study/model.ts';

/**
 * The most a run grants whatever the study asks (a study may ask for up to an hour per block and 16 GB): the
 * checker's machine is the checker's. Raised on the command line with --ceiling-block-seconds and the like.
 */
export const DEFAULT_CEILINGS: RunLimits = { blockSeconds: 60, studySeconds: 600, heapMb: 2048 };

/** The values a ceiling may take on the command line. */
export const CEILING_RANGES: Record<keyof RunLimits, { min: number; max: number; integer: boolean }> = {
  blockSeconds: { min: 0.1, max: 86_400, integer: false },
  studySeconds: { min: 1, max: 864_000, integer: false },
  heapMb: { min: 32, max: 65_536, integer: true },
};

/** The options that set each ceiling, so that a message can say how to raise one. */
export const CEILING_OPTIONS: Record<keyof RunLimits, string> = {
  blockSeconds: '--ceiling-block-seconds',
  studySeconds: '--ceiling-study-seconds',
  heapMb: '--ceiling-heap-mb',
};

export interface GrantedLimits {
  /** What the run holds the study to: what it asked, but no more than the ceilings. */
  limits: RunLimits;
  /** What the study asked for where a ceiling cut it down; empty when nothing was capped. */
  asked: Partial<RunLimits>;
}

export function grantLimits(asked: RunLimits, ceilings: RunLimits): GrantedLimits {
  const limits = { ...asked };
  const capped: Partial<RunLimits> = {};
  for (const key of Object.keys(asked) as (keyof RunLimits)[]) {
    if (asked[key] > ceilings[key]) {
      limits[key] = ceilings[key];
      capped[key] = asked[key];
    }
  }
  return { limits, asked: capped };
}

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
