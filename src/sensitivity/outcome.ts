// What the one-at-a-time runs show: each named result at each end of each range, sorted by effect, and the criteria that flip.
import { type Diagnostic, StudyFailure } from '../diagnostics/diagnostic.ts';
import type { ExecutionOutcome } from '../execute/session.ts';
import type { CriterionRecord, ResultRecord } from '../execute/records.ts';
import type { SensitivityPlan } from '../study/model.ts';
import type { ParsedQuantity } from '../study/units.ts';
import { describe } from '../study/inputs.ts';

export type RangeEnd = 'low' | 'high';
export const RANGE_ENDS: readonly RangeEnd[] = ['low', 'high'];

/** One input moved to one end of its range, the others as run. */
export interface Variant {
  input: string;
  end: RangeEnd;
  quantity: ParsedQuantity;
}

export interface VariantOutcome {
  variant: Variant;
  outcome: ExecutionOutcome;
}

/** One sampled run: every ranged input drawn at once. */
export interface Sample {
  index: number;
  quantities: { input: string; quantity: ParsedQuantity }[];
}

export interface SensitivityRuns {
  ends: VariantOutcome[];
  samples: { sample: Sample; outcome: ExecutionOutcome }[];
}

export interface InputRange {
  input: string;
  declared: string;
  asRun: { value: number; unit: string };
  low: { value: number; unit: string };
  high: { value: number; unit: string };
}

export interface ResultSwing {
  input: string;
  low: number;
  high: number;
  /** |high − low|: the bar's length in the tornado chart, and the order of the rows. */
  effect: number;
}

export interface ResultSensitivity {
  name: string;
  unit: string;
  digits: number;
  /** The result's own relative tolerance for a checker, which its sensitivity figures keep. */
  tolerance?: number;
  asRun: number;
  /** Largest effect first; equal effects keep the order of the ranges. */
  swings: ResultSwing[];
}

export interface CriterionEndOutcome {
  value: number;
  passed: boolean;
}

export interface CriterionSensitivity {
  name: string;
  unit: string;
  digits: number;
  asRun: CriterionEndOutcome;
  ends: { input: string; low: CriterionEndOutcome; high: CriterionEndOutcome }[];
  /** Each input end at which the outcome differs from the outcome as run. */
  flips: { input: string; end: RangeEnd }[];
}

export interface SampledResult {
  name: string;
  unit: string;
  digits: number;
  tolerance?: number;
  mean: number;
  /** The sample standard deviation (divided by n − 1). */
  standardDeviation: number;
  min: number;
  /** Nearest-rank percentiles: the ⌈p·n⌉-th smallest value. */
  percentile5: number;
  percentile95: number;
  max: number;
}

export interface SampledCriterion {
  name: string;
  /** How many samples meet it, and that count over the samples: the estimated probability that it is met. */
  met: number;
  probability: number;
}

export interface SampledOutcome {
  samples: number;
  seed: number;
  results: SampledResult[];
  criteria: SampledCriterion[];
}

export interface SensitivityOutcome {
  /** Runs at the ends of the ranges, beyond the one as run: two per range. */
  runs: number;
  inputs: InputRange[];
  results: ResultSensitivity[];
  criteria: CriterionSensitivity[];
  /** Present when the front matter asks for samples. */
  sampled?: SampledOutcome;
}

function namedRecords<K extends 'result' | 'criterion'>(
  outcome: ExecutionOutcome,
  kind: K,
): Map<string, Extract<ResultRecord | CriterionRecord, { kind: K }>> {
  const byName = new Map<string, Extract<ResultRecord | CriterionRecord, { kind: K }>>();
  for (const block of outcome.blocks)
    for (const record of block.records)
      if (record.kind === kind && !byName.has((record as { name: string }).name))
        byName.set((record as { name: string }).name, record as Extract<ResultRecord | CriterionRecord, { kind: K }>);
  return byName;
}

/** Every result and criterion the plan names was produced by the run as run, and every named result is a number. */
export function requireNamedFigures(plan: SensitivityPlan, outcome: ExecutionOutcome): void {
  const diagnostics: Diagnostic[] = [];
  const results = namedRecords(outcome, 'result');
  const criteria = namedRecords(outcome, 'criterion');
  for (const named of plan.results) {
    const record = results.get(named.name);
    if (!record) {
      diagnostics.push({
        code: 'sensitivity-unknown-result',
        message: `"sensitivity" names the result "${named.name}", which the run never produced`,
        at: named.at,
        hint: results.size ? `the results are: ${[...results.keys()].map((name) => `"${name}"`).join(', ')}` : 'the study produced no results',
      });
    } else if (typeof record.value !== 'number') {
      diagnostics.push({
        code: 'sensitivity-result-not-number',
        message: `"sensitivity" names the result "${named.name}", which is ${typeof record.value === 'string' ? 'a text' : 'a yes/no'}, not a number`,
        at: named.at,
        hint: 'name a result whose value is a number; a yes/no outcome belongs under "criteria"',
      });
    }
  }
  for (const named of plan.criteria) {
    if (!criteria.has(named.name)) {
      diagnostics.push({
        code: 'sensitivity-unknown-result',
        message: `"sensitivity" names the criterion "${named.name}", which the run never stated`,
        at: named.at,
        hint: criteria.size ? `the criteria are: ${[...criteria.keys()].map((name) => `"${name}"`).join(', ')}` : 'the study states no criteria',
      });
    }
  }
  if (diagnostics.length > 0) throw new StudyFailure(diagnostics);
}

/** The figures of every run, gathered; a variant that lost a named figure is located at the name. */
export function sensitivityOutcome(
  plan: SensitivityPlan,
  asRun: { outcome: ExecutionOutcome; inputs: readonly { name: string; value: number; unit: string }[] },
  runs: SensitivityRuns,
): SensitivityOutcome {
  const variants = runs.ends;
  const baseResults = namedRecords(asRun.outcome, 'result');
  const baseCriteria = namedRecords(asRun.outcome, 'criterion');
  const ofVariant = (input: string, end: RangeEnd) => {
    const found = variants.find((candidate) => candidate.variant.input === input && candidate.variant.end === end);
    if (!found) throw new Error(`no run with ${input} at its ${end} end`);
    return { variant: found.variant, results: namedRecords(found.outcome, 'result'), criteria: namedRecords(found.outcome, 'criterion') };
  };
  const byRange = plan.ranges.map((range) => ({ range, low: ofVariant(range.input, 'low'), high: ofVariant(range.input, 'high') }));
  const lost = (what: string, named: { name: string; at: Diagnostic['at'] }, where: string): never => {
    throw new StudyFailure([
      {
        code: 'sensitivity-variant-failed',
        message: `${where} the run produced no numeric ${what} "${named.name}"`,
        ...(named.at ? { at: named.at } : {}),
        hint: 'a followed figure must come out at every end of every range; narrow the range or follow another figure',
      },
    ]);
  };
  const inputs = plan.ranges.map((range): InputRange => {
    const input = asRun.inputs.find((candidate) => candidate.name === range.input)!;
    const { low, high } = byRange.find((run) => run.range === range)!;
    return {
      input: range.input,
      declared: range.declared,
      asRun: { value: input.value, unit: input.unit },
      low: { value: low.variant.quantity.value, unit: low.variant.quantity.unit },
      high: { value: high.variant.quantity.value, unit: high.variant.quantity.unit },
    };
  });
  const results = plan.results.map((named): ResultSensitivity => {
    const base = baseResults.get(named.name) as ResultRecord;
    const valueAt = (found: { variant: Variant; results: Map<string, ResultRecord> }) => {
      const value = found.results.get(named.name)?.value;
      return typeof value === 'number' ? value : lost('result', named, endText(found.variant));
    };
    const swings = byRange.map(({ range, low, high }) => {
      const [lowValue, highValue] = [valueAt(low), valueAt(high)];
      return { input: range.input, low: lowValue, high: highValue, effect: Math.abs(highValue - lowValue) };
    });
    // Array.prototype.sort is stable: equal effects keep the order the front matter gives.
    swings.sort((a, b) => b.effect - a.effect);
    return { name: named.name, unit: base.unit, digits: base.digits, ...tolerance(base), asRun: base.value as number, swings };
  });
  const criteria = plan.criteria.map((named): CriterionSensitivity => {
    const base = baseCriteria.get(named.name) as CriterionRecord;
    const endOf = (found: { variant: Variant; criteria: Map<string, CriterionRecord> }): CriterionEndOutcome => {
      const record = found.criteria.get(named.name);
      return record ? { value: record.value, passed: record.passed } : lost('criterion', named, endText(found.variant));
    };
    const ends = byRange.map(({ range, low, high }) => ({ input: range.input, low: endOf(low), high: endOf(high) }));
    const flips = ends.flatMap((entry) => RANGE_ENDS.filter((end) => entry[end].passed !== base.passed).map((end) => ({ input: entry.input, end })));
    return { name: named.name, unit: base.unit, digits: base.digits, asRun: { value: base.value, passed: base.passed }, ends, flips };
  });
  const sampled = plan.sampling ? sampledOutcome(plan, plan.sampling, runs.samples, baseResults, lost) : undefined;
  return { runs: variants.length, inputs, results, criteria, ...(sampled ? { sampled } : {}) };
}

function sampledOutcome(
  plan: SensitivityPlan,
  sampling: { samples: number; seed: number },
  samples: SensitivityRuns['samples'],
  baseResults: Map<string, ResultRecord>,
  lost: (what: string, named: { name: string; at: Diagnostic['at'] }, where: string) => never,
): SampledOutcome {
  const gathered = samples.map(({ sample, outcome }) => ({
    sample,
    results: namedRecords(outcome, 'result'),
    criteria: namedRecords(outcome, 'criterion'),
  }));
  const inSample = (sample: Sample) => `in sample ${sample.index + 1} of the sampled run`;
  const results = plan.results.map((named): SampledResult => {
    const base = baseResults.get(named.name)!;
    const values = gathered.map(({ sample, results: byName }) => {
      const value = byName.get(named.name)?.value;
      return typeof value === 'number' ? value : lost('result', named, inSample(sample));
    });
    const n = values.length;
    const mean = values.reduce((sum, value) => sum + value, 0) / n;
    const variance = values.reduce((sum, value) => sum + (value - mean) ** 2, 0) / (n - 1);
    const sorted = [...values].sort((a, b) => a - b);
    const rank = (share: number) => sorted[Math.max(0, Math.ceil(share * n) - 1)]!;
    return {
      name: named.name,
      unit: base.unit,
      digits: base.digits,
      ...tolerance(base),
      mean,
      standardDeviation: Math.sqrt(variance),
      min: sorted[0]!,
      percentile5: rank(0.05),
      percentile95: rank(0.95),
      max: sorted[n - 1]!,
    };
  });
  const criteria = plan.criteria.map((named): SampledCriterion => {
    const met = gathered.filter(({ sample, criteria: byName }) => {
      const record = byName.get(named.name);
      return record ? record.passed : lost('criterion', named, inSample(sample));
    }).length;
    return { name: named.name, met, probability: met / gathered.length };
  });
  return { samples: sampling.samples, seed: sampling.seed, results, criteria };
}

function tolerance(record: ResultRecord): { tolerance?: number } {
  return record.tolerance === undefined ? {} : { tolerance: record.tolerance };
}

function endText(variant: Variant): string {
  return `with ${variant.input} at the ${variant.end} end of its range (${describe(variant.quantity)})`;
}

export interface SensitivityFigure {
  name: string;
  value: number | boolean;
  unit?: string;
  tolerance?: number;
}

/** Every sensitivity figure under a stable name, as the seal signs them and `check` compares them. */
export function sensitivityFigures(outcome: SensitivityOutcome): SensitivityFigure[] {
  const at = (input: string, end: RangeEnd) => `with ${input} at its ${end} end`;
  const withUnit = (value: number | boolean, unit: string) => ({ value, ...(unit ? { unit } : {}) });
  return [
    ...outcome.inputs.flatMap((range) =>
      RANGE_ENDS.map((end) => ({ name: `sensitivity: ${range.input} ${end} end`, ...withUnit(range[end].value, range[end].unit) })),
    ),
    ...outcome.results.flatMap((result) =>
      result.swings.flatMap((swing) =>
        RANGE_ENDS.map((end) => ({
          name: `sensitivity: "${result.name}" ${at(swing.input, end)}`,
          ...withUnit(swing[end], result.unit),
          ...(result.tolerance === undefined ? {} : { tolerance: result.tolerance }),
        })),
      ),
    ),
    ...outcome.criteria.flatMap((criterion) =>
      criterion.ends.flatMap((entry) =>
        RANGE_ENDS.flatMap((end) => [
          { name: `sensitivity: criterion "${criterion.name}" ${at(entry.input, end)}`, ...withUnit(entry[end].value, criterion.unit) },
          { name: `sensitivity: criterion "${criterion.name}" met ${at(entry.input, end)}`, value: entry[end].passed },
        ]),
      ),
    ),
    ...(outcome.sampled
      ? [
          ...outcome.sampled.results.flatMap((result) =>
            (['mean', 'standardDeviation', 'min', 'percentile5', 'percentile95', 'max'] as const).map((statistic) => ({
              name: `sampled: "${result.name}" ${statistic}`,
              ...withUnit(result[statistic], result.unit),
              // A spread is not a value of the result: a relative tolerance of the result says nothing of it.
              ...(result.tolerance === undefined || statistic === 'standardDeviation' ? {} : { tolerance: result.tolerance }),
            })),
          ),
          ...outcome.sampled.criteria.map((criterion) => ({
            name: `sampled: criterion "${criterion.name}" probability met`,
            value: criterion.probability,
          })),
        ]
      : []),
  ];
}
