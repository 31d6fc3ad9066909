// Study inputs: quantities with units from front matter, dimension- and range-checked, with command-line overrides.
import { isMap, isScalar, type Document, type YAMLMap, type Node as YamlNode } from 'yaml';
import { type Diagnostic, type SourceLocation, StudyFailure, formatLocation } from '../diagnostics/diagnostic.ts';
import type { InputSpec } from './model.ts';
import { type FieldReader, type YamlPlace, keyOf, pairsOf, readString, rejectUnknownKeys, nodeOf } from './yamlFields.ts';
import { QUANTITY_KINDS, type ParsedQuantity, type QuantityKind, UnitProblem, describeKinds, parseQuantity, sameDimension } from './units.ts';

const INPUT_KEYS = ['value', 'quantity', 'min', 'max', 'description'] as const;
const INPUT_NAME = /^[A-Za-z_][A-Za-z0-9_]*$/;

/** An input as the blocks see it: its value and where it came from, with what it was declared as. */
export interface EffectiveInput extends Omit<InputSpec, 'given'> {
  value: number;
  unit: string;
  si: number;
  source: 'given' | 'overridden';
}

export interface InputOverride {
  name: string;
  text: string;
}

export function readInputs(document: Document.Parsed, place: YamlPlace, diagnostics: Diagnostic[]): InputSpec[] {
  const reader: FieldReader = { place, diagnostics };
  const root = document.contents as YAMLMap;
  const section = nodeOf(root, 'inputs');
  if (section === undefined || (isScalar(section) && section.value === null)) return [];
  if (!isMap(section)) {
    diagnostics.push({
      code: 'front-matter-type',
      message: '"inputs" must be a mapping of input names to quantities',
      at: place.at(section),
      hint: 'write e.g.\ninputs:\n  lineLength: 320 km',
    });
    return [];
  }
  const specs: InputSpec[] = [];
  for (const pair of pairsOf(section as YAMLMap)) {
    const name = keyOf(pair);
    const at = place.at(pair.key);
    if (!INPUT_NAME.test(name)) {
      diagnostics.push({
        code: 'input-name',
        message: `input name "${name}" is not usable in a calculation block`,
        at,
        hint: 'use letters, digits and _ only, starting with a letter, e.g. lineLength',
      });
      continue;
    }
    const spec = readOneInput(reader, name, pair.value as YamlNode | null, at);
    if (spec) specs.push(spec);
  }
  return specs;
}

function readOneInput(reader: FieldReader, name: string, node: YamlNode | null, at: SourceLocation): InputSpec | undefined {
  const where = `input "${name}"`;
  const problemAt = (target: YamlNode | null | undefined) => reader.place.at(target, at.line);
  let valueNode: YamlNode | null | undefined = node;
  let map: YAMLMap | undefined;
  if (isMap(node)) {
    map = node as YAMLMap;
    rejectUnknownKeys(reader, map, INPUT_KEYS, where);
    valueNode = nodeOf(map, 'value');
    if (valueNode === undefined) {
      reader.diagnostics.push({ code: 'input-missing-value', message: `${where} has no "value"`, at, hint: 'add e.g. "value: 320 km"' });
      return undefined;
    }
  }
  const given = quantityFrom(reader, valueNode, where, 'value', problemAt(valueNode));
  if (!given) return undefined;
  const spec: InputSpec = { name, given: given.quantity, givenText: given.text, at };
  if (map) {
    const kindText = readString(reader, map, 'quantity', where, false);
    if (kindText !== undefined) {
      if (!(kindText in QUANTITY_KINDS)) {
        reader.diagnostics.push({
          code: 'input-quantity-unknown',
          message: `${where} declares the unknown quantity "${kindText}"`,
          at: problemAt(nodeOf(map, 'quantity')),
          hint: `known quantities: ${describeKinds()}`,
        });
        return undefined;
      }
      spec.kind = kindText as QuantityKind;
      if (!sameDimension(given.quantity.unit, QUANTITY_KINDS[spec.kind])) {
        reader.diagnostics.push({
          code: 'input-unit-mismatch',
          message: `${where} is a ${spec.kind} but "${given.text}" is not: ${given.quantity.unit || 'a plain number'} is not a unit of ${spec.kind}`,
          at: problemAt(valueNode),
          hint: `give it in a unit of ${spec.kind}, e.g. ${exampleFor(spec.kind)}`,
        });
        return undefined;
      }
    }
    for (const bound of ['min', 'max'] as const) {
      const boundNode = nodeOf(map, bound);
      if (boundNode === undefined) continue;
      const parsed = quantityFrom(reader, boundNode, where, bound, problemAt(boundNode));
      if (!parsed) return undefined;
      if (!sameDimension(parsed.quantity.unit, given.quantity.unit)) {
        reader.diagnostics.push({
          code: 'input-unit-mismatch',
          message: `${where}: ${bound} "${parsed.text}" and value "${given.text}" are different kinds of quantity`,
          at: problemAt(boundNode),
          hint: `give ${bound} in a unit of the same kind as ${given.quantity.unit || 'the value'}`,
        });
        return undefined;
      }
      spec[bound] = parsed.quantity;
    }
    const description = readString(reader, map, 'description', where, false);
    if (description !== undefined) spec.description = description;
    if (spec.min && spec.max && spec.min.si > spec.max.si) {
      reader.diagnostics.push({ code: 'input-range', message: `${where}: min is greater than max`, at, hint: 'swap min and max' });
      return undefined;
    }
  }
  const rangeProblem = outOfRange(spec, given.quantity);
  if (rangeProblem) {
    reader.diagnostics.push({
      code: 'input-out-of-range',
      message: `${where} = ${given.text} ${rangeProblem}`,
      at: problemAt(valueNode),
      hint: 'correct the value, or widen min/max if the study really covers it',
      quantity: name,
      expected: allowedRange(spec),
      actual: given.text,
    });
    return undefined;
  }
  return spec;
}

function quantityFrom(
  reader: FieldReader,
  node: YamlNode | null | undefined,
  where: string,
  field: string,
  at: SourceLocation,
): { quantity: ParsedQuantity; text: string } | undefined {
  const raw = isScalar(node) ? node.value : undefined;
  if (typeof raw !== 'number' && typeof raw !== 'string') {
    reader.diagnostics.push({
      code: 'input-not-quantity',
      message: `${where}: ${field} must be a number with a unit, like "320 km"`,
      at,
      hint: 'write the number and its unit on one line',
    });
    return undefined;
  }
  try {
    return { quantity: parseQuantity(raw), text: String(raw) };
  } catch (error) {
    const problem = error instanceof UnitProblem ? error : new UnitProblem(String(error), '');
    reader.diagnostics.push({ code: 'input-unit', message: `${where}: ${field} ${problem.message}`, at, hint: problem.hint });
    return undefined;
  }
}

export function allowedRange(spec: Pick<InputSpec, 'min' | 'max'>): string {
  return `${spec.min ? describe(spec.min) : '-inf'} to ${spec.max ? describe(spec.max) : '+inf'}`;
}

export function outOfRange(spec: Pick<InputSpec, 'min' | 'max'>, quantity: ParsedQuantity): string | undefined {
  const range = `allowed ${allowedRange(spec)}`;
  if (spec.min && quantity.si < spec.min.si) return `is below its minimum (${range})`;
  if (spec.max && quantity.si > spec.max.si) return `is above its maximum (${range})`;
  return undefined;
}

export function describe(quantity: Pick<ParsedQuantity, 'value' | 'unit'>): string {
  return quantity.unit ? `${quantity.value} ${quantity.unit}` : String(quantity.value);
}

function exampleFor(kind: QuantityKind): string {
  return `"1 ${QUANTITY_KINDS[kind]}"`;
}

/** Parse `name=value` texts from the command line. */
export function parseOverrideArguments(texts: readonly string[]): InputOverride[] {
  return texts.map((text) => {
    const equals = text.indexOf('=');
    if (equals <= 0) {
      throw new StudyFailure([{ code: 'override-syntax', message: `--set "${text}" is not name=value`, hint: 'write e.g. --set lineLength=280km' }]);
    }
    return { name: text.slice(0, equals).trim(), text: text.slice(equals + 1).trim() };
  });
}

/** The inputs the blocks will see: front-matter values, replaced by overrides that pass the same checks. */
export function effectiveInputs(specs: readonly InputSpec[], overrides: readonly InputOverride[]): EffectiveInput[] {
  const diagnostics: Diagnostic[] = [];
  const byName = new Map(specs.map((spec) => [spec.name, spec]));
  const overridden = new Map<string, ParsedQuantity>();
  for (const override of overrides) {
    const spec = byName.get(override.name);
    if (!spec) {
      diagnostics.push({
        code: 'override-unknown-input',
        message: `--set names "${override.name}", which is not an input of this study`,
        hint: specs.length ? `the inputs are: ${specs.map((s) => s.name).join(', ')}` : 'this study declares no inputs',
      });
      continue;
    }
    const where = `--set ${override.name}=${override.text} (input declared at ${formatLocation(spec.at)})`;
    let parsed: ParsedQuantity;
    try {
      parsed = parseQuantity(override.text);
    } catch (error) {
      diagnostics.push({ code: 'override-unit', message: `${where}: ${(error as Error).message}`, hint: (error as UnitProblem).hint });
      continue;
    }
    if (!sameDimension(parsed.unit, spec.given.unit)) {
      diagnostics.push({
        code: 'override-unit-mismatch',
        message: `${where}: ${parsed.unit || 'a plain number'} is not the same kind of quantity as the declared ${spec.givenText}`,
        hint: `give ${override.name} in a unit like ${spec.given.unit || 'a plain number'}`,
      });
      continue;
    }
    const rangeProblem = outOfRange(spec, parsed);
    if (rangeProblem) {
      diagnostics.push({
        code: 'override-out-of-range',
        message: `${where} ${rangeProblem}`,
        hint: 'choose a value inside the declared range',
        quantity: spec.name,
        expected: allowedRange(spec),
        actual: describe(parsed),
      });
      continue;
    }
    overridden.set(spec.name, parsed);
  }
  if (diagnostics.length > 0) throw new StudyFailure(diagnostics);
  return specs.map((spec) => {
    const chosen = overridden.get(spec.name) ?? spec.given;
    return {
      name: spec.name,
      value: chosen.value,
      unit: chosen.unit,
      si: chosen.si,
      source: overridden.has(spec.name) ? 'overridden' : 'given',
      givenText: spec.givenText,
      ...(spec.kind ? { kind: spec.kind } : {}),
      ...(spec.min ? { min: spec.min } : {}),
      ...(spec.max ? { max: spec.max } : {}),
      ...(spec.description ? { description: spec.description } : {}),
      at: spec.at,
    };
  });
}
