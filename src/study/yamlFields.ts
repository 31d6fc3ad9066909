// Reading typed fields out of a YAML mapping, each problem a located diagnostic rather than a throw.
import { isMap, isScalar, type YAMLMap, type Node as YamlNode, type Pair, type Scalar } from 'yaml';
import { type Diagnostic, type SourceLocation, plainValue } from '../diagnostics/diagnostic.ts';

/** Where a YAML node sits in the study file. */
export interface YamlPlace {
  at(node: YamlNode | null | undefined, fallbackLine?: number): SourceLocation;
}

export interface FieldReader {
  place: YamlPlace;
  diagnostics: Diagnostic[];
}

export function pairsOf(map: YAMLMap): Pair<Scalar, YamlNode>[] {
  return map.items as Pair<Scalar, YamlNode>[];
}

export function keyOf(pair: Pair<Scalar, YamlNode>): string {
  return String(isScalar(pair.key) ? pair.key.value : pair.key);
}

/** Report keys the study format does not know, so a misspelt key is never silently ignored. */
export function rejectUnknownKeys(reader: FieldReader, map: YAMLMap, allowed: readonly string[], where: string): void {
  for (const pair of pairsOf(map)) {
    const key = keyOf(pair);
    if (!allowed.includes(key)) {
      reader.diagnostics.push({
        code: 'front-matter-unknown-key',
        message: `unknown key "${key}" in ${where}`,
        at: reader.place.at(pair.key),
        hint: `the keys allowed in ${where} are: ${allowed.join(', ')}`,
      });
    }
  }
}

export function nodeOf(map: YAMLMap, key: string): YamlNode | undefined {
  return map.get(key, true) as YamlNode | undefined;
}

export function readString(reader: FieldReader, map: YAMLMap, key: string, where: string, required: boolean): string | undefined {
  const node = nodeOf(map, key);
  if (node === undefined || (isScalar(node) && node.value === null)) {
    if (required) {
      reader.diagnostics.push({
        code: 'front-matter-missing-key',
        message: `${where} has no "${key}"`,
        at: reader.place.at(map),
        hint: `add "${key}: ..." to ${where}`,
      });
    }
    return undefined;
  }
  if (!isScalar(node) || typeof node.value === 'object') {
    reader.diagnostics.push({
      code: 'front-matter-type',
      message: `"${key}" in ${where} must be a single value`,
      at: reader.place.at(node),
      hint: `write "${key}: <text>" on one line`,
    });
    return undefined;
  }
  return String(node.value);
}

export function readMap(reader: FieldReader, map: YAMLMap, key: string, where: string, required: boolean): YAMLMap | undefined {
  const node = nodeOf(map, key);
  if (node === undefined) {
    if (required) {
      reader.diagnostics.push({
        code: 'front-matter-missing-key',
        message: `${where} has no "${key}"`,
        at: reader.place.at(map),
        hint: `add a "${key}:" section to ${where}`,
      });
    }
    return undefined;
  }
  if (!isMap(node)) {
    reader.diagnostics.push({
      code: 'front-matter-type',
      message: `"${key}" in ${where} must be a mapping of keys to values`,
      at: reader.place.at(node),
      hint: `indent the entries of "${key}" below it, one "name: value" per line`,
    });
    return undefined;
  }
  return node as YAMLMap;
}

export function readNumber(
  reader: FieldReader,
  map: YAMLMap,
  key: string,
  where: string,
  range: { min: number; max: number; integer?: boolean },
): number | undefined {
  const node = nodeOf(map, key);
  if (node === undefined) return undefined;
  const value = isScalar(node) ? node.value : undefined;
  const ok =
    typeof value === 'number' && Number.isFinite(value) && value >= range.min && value <= range.max && (!range.integer || Number.isInteger(value));
  if (!ok) {
    reader.diagnostics.push({
      code: 'front-matter-range',
      message: `"${key}" in ${where} is ${JSON.stringify(value ?? null)}; it must be ${range.integer ? 'a whole number' : 'a number'} from ${range.min} to ${range.max}`,
      at: reader.place.at(node),
      hint: `write e.g. "${key}: ${range.min}"`,
      quantity: key,
      expected: `${range.integer ? 'a whole number' : 'a number'} from ${range.min} to ${range.max}`,
      actual: plainValue(value ?? null),
    });
    return undefined;
  }
  return value as number;
}
