// The sensitivity runs: each uncertain input at each end of its range, and the seeded samples, through the override mechanism, a few calculation processes at a time.
import { availableParallelism } from 'node:os';
import { uniformFloat64 } from 'pure-rand/distribution/uniformFloat64';
import { xoroshiro128plus } from 'pure-rand/generator/xoroshiro128plus';
import { StudyFailure } from '../diagnostics/diagnostic.ts';
import type { ExecutionOutcome } from '../execute/session.ts';
import { type EffectiveInput, type InputOverride, describe, effectiveInputs } from '../study/inputs.ts';
import type { SensitivityPlan, Study } from '../study/model.ts';
import { endsProblem, rangeEnds } from '../study/sensitivity.ts';
import { parseQuantity } from '../study/units.ts';
import { RANGE_ENDS, type Sample, type SensitivityRuns, type Variant } from './outcome.ts';

/** More processes than this gain nothing on a study's small runs and cost memory. */
const MAX_PARALLEL_RUNS = 4;

export interface VariantRequest {
  study: Study;
  plan: SensitivityPlan;
  /** The run's own overrides (--set): the base the ranges spread about. */
  overrides: readonly InputOverride[];
  asRun: readonly EffectiveInput[];
  /** One sandboxed execution of the study with these inputs (the pipeline's, with its limits and signal). */
  execute: (inputs: EffectiveInput[]) => Promise<ExecutionOutcome>;
}

/** The two ends of every range about the inputs as run; a range that no longer fits a --set value is refused at the range. */
function rangesAbout(plan: SensitivityPlan, asRun: readonly EffectiveInput[]) {
  return plan.ranges.map((range) => {
    const input = asRun.find((candidate) => candidate.name === range.input)!;
    const base = { value: input.value, unit: input.unit, si: input.si };
    const problem = endsProblem(range, base, input);
    if (problem) throw new StudyFailure([{ ...problem, at: range.at }]);
    return { range, ends: rangeEnds(range, base) };
  });
}

function variantsOf(plan: SensitivityPlan, asRun: readonly EffectiveInput[]): Variant[] {
  return rangesAbout(plan, asRun).flatMap(({ range, ends }) => RANGE_ENDS.map((end) => ({ input: range.input, end, quantity: ends[end] })));
}

/**
 * The samples of a sampled run: for each sample in turn, each range in the front matter's order draws one number, uniform
 * between the range's ends, from one xoroshiro128+ stream seeded by the study's seed; the same seed draws the same samples.
 */
export function samplesOf(plan: SensitivityPlan, asRun: readonly EffectiveInput[]): Sample[] {
  if (!plan.sampling) return [];
  const ranges = rangesAbout(plan, asRun);
  const generator = xoroshiro128plus(plan.sampling.seed);
  return Array.from({ length: plan.sampling.samples }, (_, index) => ({
    index,
    quantities: ranges.map(({ range, ends }) => {
      const value = ends.low.value + uniformFloat64(generator) * (ends.high.value - ends.low.value);
      return { input: range.input, quantity: parseQuantity(ends.low.unit ? `${value} ${ends.low.unit}` : String(value)) };
    }),
  }));
}

export async function runSensitivity(request: VariantRequest): Promise<SensitivityRuns> {
  const variants = variantsOf(request.plan, request.asRun);
  const samples = samplesOf(request.plan, request.asRun);
  const jobs = [
    ...variants.map((variant) => ({
      changes: [{ input: variant.input, quantity: variant.quantity }],
      what: `with ${variant.input} at the ${variant.end} end of its sensitivity range (${describe(variant.quantity)})`,
    })),
    ...samples.map((sample) => ({
      changes: sample.quantities,
      what: `in sample ${sample.index + 1} of the sampled run (${sample.quantities.map((entry) => `${entry.input} = ${describe(entry.quantity)}`).join(', ')})`,
    })),
  ];
  const outcomes = await inPool(jobs, async (job) => {
    const changed = new Set(job.changes.map((change) => change.input));
    const overrides = [
      ...request.overrides.filter((override) => !changed.has(override.name)),
      ...job.changes.map((change) => ({ name: change.input, text: describe(change.quantity) })),
    ];
    try {
      return await request.execute(effectiveInputs(request.study.inputs, overrides));
    } catch (error) {
      if (!(error instanceof StudyFailure)) throw error;
      throw new StudyFailure(error.diagnostics.map((diagnostic) => ({ ...diagnostic, message: `${job.what}: ${diagnostic.message}` })));
    }
  });
  return {
    ends: variants.map((variant, index) => ({ variant, outcome: outcomes[index]! })),
    samples: samples.map((sample, index) => ({ sample, outcome: outcomes[variants.length + index]! })),
  };
}

/** Each job in its own run, as many at once as the machine has cores (at most MAX_PARALLEL_RUNS); outcomes in the jobs' order. */
async function inPool<T, R>(jobs: readonly T[], run: (job: T) => Promise<R>): Promise<R[]> {
  const width = Math.max(1, Math.min(availableParallelism(), MAX_PARALLEL_RUNS, jobs.length));
  const outcomes: R[] = new Array(jobs.length);
  let next = 0;
  const worker = async () => {
    for (let index = next++; index < jobs.length; index = next++) {
      try {
        outcomes[index] = await run(jobs[index]!);
      } catch (error) {
        // The first failure ends the sweep: no worker starts another run.
        next = jobs.length;
        throw error;
      }
    }
  };
  await Promise.all(Array.from({ length: width }, worker));
  return outcomes;
}
