// The one-at-a-time runs: each uncertain input at each end of its range through the override mechanism, a few calculation processes at a time.
import { availableParallelism } from 'node:os';
import { StudyFailure } from '../diagnostics/diagnostic.ts';
import type { ExecutionOutcome } from '../execute/session.ts';
import { type EffectiveInput, type InputOverride, describe, effectiveInputs } from '../study/inputs.ts';
import type { SensitivityPlan, Study } from '../study/model.ts';
import { endsProblem, rangeEnds } from '../study/sensitivity.ts';
import { RANGE_ENDS, type Variant, type VariantOutcome } from './outcome.ts';

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

/** The variants of a plan about the inputs as run; a range that no longer fits a --set value is refused at the range. */
export function variantsOf(plan: SensitivityPlan, asRun: readonly EffectiveInput[]): Variant[] {
  return plan.ranges.flatMap((range) => {
    const input = asRun.find((candidate) => candidate.name === range.input)!;
    const base = { value: input.value, unit: input.unit, si: input.si };
    const problem = endsProblem(range, base, input);
    if (problem) throw new StudyFailure([{ ...problem, at: range.at }]);
    const ends = rangeEnds(range, base);
    return RANGE_ENDS.map((end) => ({ input: range.input, end, quantity: ends[end] }));
  });
}

export async function runVariants(request: VariantRequest): Promise<VariantOutcome[]> {
  const variants = variantsOf(request.plan, request.asRun);
  const width = Math.max(1, Math.min(availableParallelism(), MAX_PARALLEL_RUNS, variants.length));
  const outcomes: VariantOutcome[] = new Array(variants.length);
  let next = 0;
  // Each worker takes the next variant until none is left; results land at their variant's index, so the order is the plan's.
  const worker = async () => {
    for (let index = next++; index < variants.length; index = next++) {
      const variant = variants[index]!;
      const text = describe(variant.quantity);
      const overrides = [...request.overrides.filter((override) => override.name !== variant.input), { name: variant.input, text }];
      const inputs = effectiveInputs(request.study.inputs, overrides);
      try {
        outcomes[index] = { variant, outcome: await request.execute(inputs) };
      } catch (error) {
        // The first failure ends the sweep: no worker starts another run.
        next = variants.length;
        if (!(error instanceof StudyFailure)) throw error;
        throw new StudyFailure(
          error.diagnostics.map((diagnostic) => ({
            ...diagnostic,
            message: `with ${variant.input} at the ${variant.end} end of its sensitivity range (${text}): ${diagnostic.message}`,
          })),
        );
      }
    }
  };
  await Promise.all(Array.from({ length: width }, worker));
  return outcomes;
}
