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

export interface SensitivityOutcome {
  /** Runs beyond the one as run: two per range. */
  runs: number;
  inputs: InputRange[];
  results: ResultSensitivity[];
  criteria: CriterionSensitivity[];
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
  variants: readonly VariantOutcome[],
): SensitivityOutcome {
  const baseResults = namedRecords(asRun.outcome, 'result');
  const baseCriteria = namedRecords(asRun.outcome, 'criterion');
  const ofVariant = (input: string, end: RangeEnd) => {
    const found = variants.find((candidate) => candidate.variant.input === input && candidate.variant.end === end);
    if (!found) throw new Error(`no run with ${input} at its ${end} end`);
    return { variant: found.variant, results: namedRecords(found.outcome, 'result'), criteria: namedRecords(found.outcome, 'criterion') };
  };
  const runs = plan.ranges.map((range) => ({ range, low: ofVariant(range.input, 'low'), high: ofVariant(range.input, 'high') }));
  const lost = (what: string, named: { name: string; at: Diagnostic['at'] }, variant: Variant): never => {
    throw new StudyFailure([
      {
        code: 'sensitivity-variant-failed',
        message: `with ${variant.input} at the ${variant.end} end of its range (${describe(variant.quantity)}) the run produced no numeric ${what} "${named.name}"`,
        ...(named.at ? { at: named.at } : {}),
        hint: 'a followed figure must come out at every end of every range; narrow the range or follow another figure',
      },
    ]);
  };
  const inputs = plan.ranges.map((range): InputRange => {
    const input = asRun.inputs.find((candidate) => candidate.name === range.input)!;
    const { low, high } = runs.find((run) => run.range === range)!;
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
      return typeof value === 'number' ? value : lost('result', named, found.variant);
    };
    const swings = runs.map(({ range, low, high }) => {
      const [lowValue, highValue] = [valueAt(low), valueAt(high)];
      return { input: range.input, low: lowValue, high: highValue, effect: Math.abs(highValue - lowValue) };
    });
    // Array.prototype.sort is stable: equal effects keep the order the front matter gives.
    swings.sort((a, b) => b.effect - a.effect);
    return { name: named.name, unit: base.unit, digits: base.digits, asRun: base.value as number, swings };
  });
  const criteria = plan.criteria.map((named): CriterionSensitivity => {
    const base = baseCriteria.get(named.name) as CriterionRecord;
    const endOf = (found: { variant: Variant; criteria: Map<string, CriterionRecord> }): CriterionEndOutcome => {
      const record = found.criteria.get(named.name);
      return record ? { value: record.value, passed: record.passed } : lost('criterion', named, found.variant);
    };
    const ends = runs.map(({ range, low, high }) => ({ input: range.input, low: endOf(low), high: endOf(high) }));
    const flips = ends.flatMap((entry) => RANGE_ENDS.filter((end) => entry[end].passed !== base.passed).map((end) => ({ input: entry.input, end })));
    return { name: named.name, unit: base.unit, digits: base.digits, asRun: { value: base.value, passed: base.passed }, ends, flips };
  });
  return { runs: variants.length, inputs, results, criteria };
}

export interface SensitivityFigure {
  name: string;
  value: number | boolean;
  unit?: string;
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
        RANGE_ENDS.map((end) => ({ name: `sensitivity: "${result.name}" ${at(swing.input, end)}`, ...withUnit(swing[end], result.unit) })),
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
  ];
}
