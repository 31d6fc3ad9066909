// Shortening solver arguments and results for the calculation log: long arrays become their size, ends and range.

import { markInvisible } from '../execute/outputText.ts';

const KEEP_ITEMS = 3;
const MAX_DEPTH = 6;
/** A label in the log is read, not searched: longer texts are cut. */
const MAX_TEXT = 200;

export function summarise(value: unknown, depth = 0): unknown {
  if (value === null || typeof value === 'boolean') return value;
  // The log shows what was passed; invisible characters are written out so that two labels cannot look alike.
  if (typeof value === 'string') return markInvisible(value.length > MAX_TEXT ? `${value.slice(0, MAX_TEXT)}…` : value);
  // Never the text "NaN" in a report: the log says what kind of number it was.
  if (typeof value === 'number') return Number.isFinite(value) ? value : 'not a finite number';
  if (typeof value === 'bigint') return value.toString();
  if (typeof value === 'function' || typeof value === 'symbol' || value === undefined) return undefined;
  if (depth >= MAX_DEPTH) return '…';
  if (Array.isArray(value) || ArrayBuffer.isView(value)) {
    const items = Array.from(value as ArrayLike<unknown>);
    if (items.length <= KEEP_ITEMS * 2 + 1) return items.map((item) => summarise(item, depth + 1));
    return {
      items: items.length,
      first: items.slice(0, KEEP_ITEMS).map((item) => summarise(item, depth + 1)),
      last: items.slice(-KEEP_ITEMS).map((item) => summarise(item, depth + 1)),
    };
  }
  const out: Record<string, unknown> = {};
  for (const key of Object.keys(value as object)) {
    const summary = summarise((value as Record<string, unknown>)[key], depth + 1);
    if (summary !== undefined) out[key] = summary;
  }
  return out;
}
