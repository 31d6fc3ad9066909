// Solver arguments and results as the calculation log records them: in full, as plain data, whatever a study passed.

import { markInvisible } from '../execute/outputText.ts';

/** Deeper than any solver data nests; a structure past it (a circular one, say) cannot be recorded. */
export const MAX_LOGGED_DEPTH = 32;

/** Thrown for a value the log cannot record whole; the block API turns it into the study's error. */
export class UnloggableValue extends Error {
  override readonly name = 'UnloggableValue';
}

/**
 * `value` as plain data, nothing cut: every text whole (invisible characters written out, so that two labels cannot
 * look alike), every number as it is (a non-finite one said in words, never NaN), every array item. Functions and
 * symbols are left out: they are not values. The whole counts against the study's output allowance where it is emitted.
 */
export function recordedValue(value: unknown, depth = 0): unknown {
  if (value === null || typeof value === 'boolean') return value;
  if (typeof value === 'string') return markInvisible(value);
  if (typeof value === 'number') return Number.isFinite(value) ? value : 'not a finite number';
  if (typeof value === 'bigint') return value.toString();
  if (typeof value === 'function' || typeof value === 'symbol' || value === undefined) return undefined;
  if (depth >= MAX_LOGGED_DEPTH) throw new UnloggableValue(`it nests deeper than ${MAX_LOGGED_DEPTH} levels (a structure that refers to itself?)`);
  if (Array.isArray(value) || ArrayBuffer.isView(value))
    return Array.from(value as ArrayLike<unknown>, (item) => recordedValue(item, depth + 1) ?? null);
  const out: Record<string, unknown> = {};
  for (const key of Object.keys(value as object)) {
    const item = recordedValue((value as Record<string, unknown>)[key], depth + 1);
    if (item !== undefined) out[key] = item;
  }
  return out;
}
