// The bounds of a run besides the study's own limits: how long and how large the host's own stages may grow on study data.
import type { WorkerLimits } from './limitedWorker.ts';

/** Host stages that work on study data run in limited workers: these are their bounds, stated in every report. */
export const HOST_STAGE_LIMITS = {
  /** One chart: Vega-Lite compile and Vega render of one specification. */
  chart: { heapMb: 512, callSeconds: 20 },
  /** The type check of all blocks together. */
  typecheck: { heapMb: 2048, callSeconds: 120 },
} as const satisfies Record<string, WorkerLimits>;
