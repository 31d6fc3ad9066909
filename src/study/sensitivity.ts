// The front matter's `sensitivity:` section: uncertain inputs and their ranges, checked against the inputs, and the ends of each range.
import { isMap, isScalar, isSeq, type Document, type YAMLMap, type YAMLSeq, type Node as YamlNode } from 'yaml';
import type { Diagnostic, SourceLocation } from '../diagnostics/diagnostic.ts';
import type { InputSpec, NamedFigure, SensitivityPlan, SensitivityRange, SensitivitySpread } from './model.ts';
import { allowedRange, describe, outOfRange } from './inputs.ts';
import { type FieldReader, type YamlPlace, keyOf, nodeOf, pairsOf, readMap, readNumber, rejectUnknownKeys } from './yamlFields.ts';
import { type ParsedQuantity, UnitProblem, parseQuantity, sameDimension } from './units.ts';

const SECTION_KEYS = ['inputs', 'results', 'criteria', 'samples', 'seed'] as const;
/** Each end and each sample is a whole run of the study (and `check` makes them again): a bound on the work one front matter can ask for. */
export const MAX_SAMPLES = 1000;
const MAX_RUNS = 1200;
const MAX_SEED = 2 ** 32 - 1;
const RANGE_KEYS = ['low', 'high', 'factor'] as const;
const PERCENT = /^([+-]?(?:\d+\.?\d*|\.\d+))\s*%$/;
/** A factor beyond this is no longer an uncertainty but another study. */
const MAX_FACTOR = 100;
const EXAMPLE = 'sensitivity:\n  inputs:\n    lineLength: { low: -1 %, high: +1 % }\n  results: [Open-end voltage]';

export function readSensitivity(
  document: Document.Parsed,
  place: YamlPlace,
  diagnostics: Diagnostic[],
  inputs: readonly InputSpec[],
): SensitivityPlan | undefined {
  const reader: FieldReader = { place, diagnostics };
  const root = document.contents as YAMLMap;
  const section = readMap(reader, root, 'sensitivity', 'the front matter', false);
  if (!section) return undefined;
  const before = diagnostics.length;
  rejectUnknownKeys(reader, section, SECTION_KEYS, '"sensitivity"');
  const inputsMap = readMap(reader, section, 'inputs', '"sensitivity"', true);
  const ranges: SensitivityRange[] = [];
  const byName = new Map(inputs.map((spec) => [spec.name, spec]));
  for (const pair of inputsMap ? pairsOf(inputsMap) : []) {
    const name = keyOf(pair);
    const at = place.at(pair.key);
    const spec = byName.get(name);
    if (!spec) {
      diagnostics.push({
        code: 'sensitivity-unknown-input',
        message: `"sensitivity" names the input "${name}", which the study does not declare`,
        at,
        hint: inputs.length ? `the inputs are: ${inputs.map((input) => input.name).join(', ')}` : 'declare it under "inputs" first',
      });
      continue;
    }
    const range = readRange(reader, name, pair.value as YamlNode | null, at, spec);
    if (range) ranges.push(range);
  }
  if (inputsMap && pairsOf(inputsMap).length === 0) {
    diagnostics.push({
      code: 'sensitivity-range',
      message: '"sensitivity" names no inputs',
      at: place.at(inputsMap),
      hint: `write e.g.\n${EXAMPLE}`,
    });
  }
  const results = readNames(reader, section, 'results', true);
  const criteria = readNames(reader, section, 'criteria', false);
  const samples = readNumber(reader, section, 'samples', '"sensitivity"', { min: 2, max: MAX_SAMPLES, integer: true });
  const seed = readNumber(reader, section, 'seed', '"sensitivity"', { min: 0, max: MAX_SEED, integer: true });
  const [givenSamples, givenSeed] = [nodeOf(section, 'samples') !== undefined, nodeOf(section, 'seed') !== undefined];
  if (givenSamples !== givenSeed) {
    diagnostics.push({
      code: 'front-matter-missing-key',
      message: `"sensitivity" gives ${givenSamples ? '"samples" but no "seed"' : '"seed" but no "samples"'}`,
      at: place.at(section),
      hint: 'a sampled run needs both, so that it draws the same samples every time: e.g. "samples: 200" and "seed: 1"',
    });
  }
  const runs = 2 * ranges.length + (samples ?? 0);
  if (runs > MAX_RUNS) {
    diagnostics.push({
      code: 'front-matter-range',
      message: `"sensitivity" asks for ${runs} runs of the study (two per range${samples ? ', one per sample' : ''}); a study may ask for at most ${MAX_RUNS}`,
      at: place.at(section),
      hint: 'follow fewer inputs, or draw fewer samples',
      quantity: 'sensitivity runs',
      expected: `at most ${MAX_RUNS}`,
      actual: runs,
    });
  }
  if (diagnostics.length > before) return undefined;
  return {
    ranges,
    results,
    criteria,
    ...(samples !== undefined && seed !== undefined ? { sampling: { samples, seed } } : {}),
    at: place.at(nodeOf(root, 'sensitivity')),
  };
}

function readRange(reader: FieldReader, name: string, node: YamlNode | null, at: SourceLocation, spec: InputSpec): SensitivityRange | undefined {
  const where = `the sensitivity range of "${name}"`;
  if (!isMap(node)) {
    reader.diagnostics.push({
      code: 'sensitivity-range',
      message: `${where} must be a mapping with "low" and "high", or with "factor"`,
      at: reader.place.at(node, at.line),
      hint: 'write e.g. "{ low: -3 %, high: +3 % }", "{ low: 0.31 ohm/km, high: 0.33 ohm/km }" or "{ factor: 2 }"',
    });
    return undefined;
  }
  const map = node as YAMLMap;
  const before = reader.diagnostics.length;
  rejectUnknownKeys(reader, map, RANGE_KEYS, where);
  const hasFactor = nodeOf(map, 'factor') !== undefined;
  const hasEnds = nodeOf(map, 'low') !== undefined || nodeOf(map, 'high') !== undefined;
  if (hasFactor === hasEnds || (hasEnds && (nodeOf(map, 'low') === undefined || nodeOf(map, 'high') === undefined))) {
    reader.diagnostics.push({
      code: 'sensitivity-range',
      message: `${where} needs both "low" and "high", or "factor" alone`,
      at: reader.place.at(map),
      hint: 'write e.g. "{ low: -3 %, high: +3 % }" or "{ factor: 2 }"',
    });
    return undefined;
  }
  let spread: SensitivitySpread | undefined;
  let declared: string;
  if (hasFactor) {
    const factor = readNumber(reader, map, 'factor', where, { min: 1, max: MAX_FACTOR });
    if (factor === undefined) return undefined;
    spread = { kind: 'factor', factor };
    declared = `÷ ${factor} to × ${factor}`;
  } else {
    const low = readEnd(reader, map, 'low', where, spec);
    const high = readEnd(reader, map, 'high', where, spec);
    if (!low || !high) return undefined;
    if (low.kind !== high.kind) {
      reader.diagnostics.push({
        code: 'sensitivity-range',
        message: `${where} gives one end in per cent and the other as a quantity`,
        at: reader.place.at(map),
        hint: 'give both ends in per cent of the value ("-3 %", "+3 %") or both as quantities ("0.31 ohm/km", "0.33 ohm/km")',
      });
      return undefined;
    }
    if (low.kind === 'percent' && high.kind === 'percent' && !(low.percent < high.percent)) {
      reader.diagnostics.push({
        code: 'sensitivity-range',
        message: `${where}: its low end ${low.text} is not below its high end ${high.text}`,
        at: reader.place.at(map),
        hint: 'swap "low" and "high"',
        quantity: name,
        expected: 'low end below high end',
        actual: `${low.text} to ${high.text}`,
      });
      return undefined;
    }
    spread =
      low.kind === 'percent' && high.kind === 'percent'
        ? { kind: 'percent', lowPercent: low.percent, highPercent: high.percent }
        : { kind: 'ends', low: (low as { quantity: ParsedQuantity }).quantity, high: (high as { quantity: ParsedQuantity }).quantity };
    declared = `${low.text} to ${high.text}`;
  }
  if (reader.diagnostics.length > before) return undefined;
  const range: SensitivityRange = { input: name, spread, declared, at };
  // The range must make sense at the value the study gives; a --set value is checked again when the ends are run.
  const problem = endsProblem(range, spec.given, spec);
  if (problem) {
    reader.diagnostics.push({ ...problem, at: reader.place.at(map) });
    return undefined;
  }
  return range;
}

type End = { kind: 'percent'; percent: number; text: string } | { kind: 'quantity'; quantity: ParsedQuantity; text: string };

function readEnd(reader: FieldReader, map: YAMLMap, key: 'low' | 'high', where: string, spec: InputSpec): End | undefined {
  const node = nodeOf(map, key);
  const at = reader.place.at(node);
  const raw = isScalar(node) ? node.value : undefined;
  if (typeof raw !== 'number' && typeof raw !== 'string') {
    reader.diagnostics.push({
      code: 'sensitivity-range',
      message: `${where}: "${key}" must be a per cent or a quantity`,
      at,
      hint: 'write e.g. "-3 %" or "310 km"',
    });
    return undefined;
  }
  const text = String(raw).trim();
  const percent = PERCENT.exec(text);
  if (percent) {
    const value = Number(percent[1]);
    if (value <= -100) {
      reader.diagnostics.push({
        code: 'sensitivity-range',
        message: `${where}: "${key}" is ${text}, which would take the input to zero or past it`,
        at,
        hint: 'a per-cent end lies above -100 %',
        quantity: `${spec.name} ${key}`,
        expected: 'above -100 %',
        actual: text,
      });
      return undefined;
    }
    return { kind: 'percent', percent: value, text };
  }
  let quantity: ParsedQuantity;
  try {
    quantity = parseQuantity(raw);
  } catch (error) {
    const problem = error instanceof UnitProblem ? error : new UnitProblem(String(error), '');
    reader.diagnostics.push({
      code: 'sensitivity-range',
      message: `${where}: "${key}" ${problem.message}`,
      at,
      hint: problem.hint || 'write e.g. "-3 %" or "310 km"',
    });
    return undefined;
  }
  if (!sameDimension(quantity.unit, spec.given.unit)) {
    reader.diagnostics.push({
      code: 'sensitivity-range',
      message: `${where}: "${key}" ${text} is not the same kind of quantity as the input's ${spec.givenText}`,
      at,
      hint: `give it in a unit like ${spec.given.unit || 'a plain number'}, or in per cent of the value`,
    });
    return undefined;
  }
  return { kind: 'quantity', quantity, text };
}

function readNames(reader: FieldReader, section: YAMLMap, key: 'results' | 'criteria', required: boolean): NamedFigure[] {
  const node = nodeOf(section, key);
  if (node === undefined) {
    if (required) {
      reader.diagnostics.push({
        code: 'front-matter-missing-key',
        message: `"sensitivity" has no "${key}"`,
        at: reader.place.at(section),
        hint: `name the headline ${key} to follow, e.g. "${key}: [Open-end voltage]"`,
      });
    }
    return [];
  }
  const items = isSeq(node) ? (node as YAMLSeq<YamlNode>).items : undefined;
  const names: NamedFigure[] = [];
  for (const item of items ?? []) {
    if (!isScalar(item) || typeof item.value !== 'string' || item.value === '') {
      reader.diagnostics.push({
        code: 'front-matter-type',
        message: `each entry of "${key}" in "sensitivity" must be the name of a ${key === 'results' ? 'result' : 'criterion'}`,
        at: reader.place.at(item as YamlNode),
        hint: 'write the name as the block gives it, e.g. "Open-end voltage"',
      });
      continue;
    }
    names.push({ name: item.value, at: reader.place.at(item) });
  }
  if (!items || (required && items.length === 0)) {
    reader.diagnostics.push({
      code: 'front-matter-type',
      message: `"${key}" in "sensitivity" must be a list of names`,
      at: reader.place.at(node),
      hint: `write e.g. "${key}: [Open-end voltage]"`,
    });
  }
  return names;
}

/** The two ends of a range about the input's value as run, in the value's own unit, as texts the override mechanism reads. */
export function rangeEnds(range: SensitivityRange, base: ParsedQuantity): { low: ParsedQuantity; high: ParsedQuantity } {
  const inUnit = (value: number) => parseQuantity(base.unit ? `${value} ${base.unit}` : String(value));
  switch (range.spread.kind) {
    case 'percent':
      // Per cent of a negative value: the ends are still the lower and the higher quantity.
      return orderedEnds(inUnit(base.value * (1 + range.spread.lowPercent / 100)), inUnit(base.value * (1 + range.spread.highPercent / 100)));
    case 'factor':
      return orderedEnds(inUnit(base.value / range.spread.factor), inUnit(base.value * range.spread.factor));
    case 'ends':
      return { low: range.spread.low, high: range.spread.high };
  }
}

function orderedEnds(first: ParsedQuantity, second: ParsedQuantity): { low: ParsedQuantity; high: ParsedQuantity } {
  return first.si <= second.si ? { low: first, high: second } : { low: second, high: first };
}

/** Why a range cannot be run about `base`: its low end not below its high end, or an end outside the input's own range. */
export function endsProblem(
  range: SensitivityRange,
  base: ParsedQuantity,
  bounds: Pick<InputSpec, 'min' | 'max'>,
): Omit<Diagnostic, 'at'> | undefined {
  const where = `the sensitivity range of "${range.input}" (${range.declared})`;
  const { low, high } = rangeEnds(range, base);
  if (!(low.si < high.si)) {
    return {
      code: 'sensitivity-range',
      message: `${where}: its low end ${describe(low)} is not below its high end ${describe(high)}`,
      hint: range.spread.kind === 'factor' ? 'a factor above 1 spreads a value that is not zero' : 'swap "low" and "high"',
      quantity: range.input,
      expected: 'low end below high end',
      actual: `${describe(low)} to ${describe(high)}`,
    };
  }
  for (const [end, quantity] of [
    ['low', low],
    ['high', high],
  ] as const) {
    const outside = outOfRange(bounds, quantity);
    if (outside) {
      return {
        code: 'sensitivity-out-of-range',
        message: `${where}: its ${end} end ${describe(quantity)} ${outside}`,
        hint: "narrow the range, or widen the input's min/max if the study really covers it",
        quantity: range.input,
        expected: allowedRange(bounds),
        actual: describe(quantity),
      };
    }
  }
  return undefined;
}
