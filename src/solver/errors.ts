// Domain errors of the solver: the typed SolverDomainError and the input/output guards that raise it.

import { Problem } from '../diagnostics/diagnostic.ts';

export type SolverErrorCode =
  | 'out-of-range'
  | 'missing-quantity'
  | 'not-a-finite-number'
  | 'inconsistent-quantities'
  | 'no-operating-point'
  | 'no-convergence'
  | 'transfer-limit-exceeded'
  | 'target-unreachable'
  | 'reciprocity-violated'
  | 'degenerate-network'
  | 'non-finite-result';

export interface SolverDomainErrorDetails {
  code: SolverErrorCode;
  quantity: string;
  value: number | string | null;
  allowedRange: string;
  hint: string;
  /** The value as the sentence quotes it, when `value` is a text holding exact numbers (the diagnostic keeps those). */
  shownValue?: string;
  /** Replaces the standard "quantity = value is outside ..." sentence when the situation reads better otherwise. */
  message?: string;
}

/** A number in the sentence is rounded for the reader; the diagnostic's `actual` keeps it exact. */
function formatValue(value: number | string | null): string {
  if (value === null) return 'missing';
  if (typeof value === 'number') return forMessage(value);
  return value;
}

/** A load as an error gives it: exact for the diagnostic's value, rounded for the sentence. */
export function loadForError(pMw: number, qMvar: number): { value: string; shownValue: string } {
  return { value: `P = ${pMw} MW, Q = ${qMvar} Mvar`, shownValue: `P = ${forMessage(pMw)} MW, Q = ${forMessage(qMvar)} Mvar` };
}

/**
 * Raised for every input or result the solver cannot accept: one diagnostic, with plain fields so it survives a
 * process boundary. `value` and `allowedRange` are the diagnostic's `actual` and `expected` under the names blocks use.
 */
export class SolverDomainError extends Problem {
  override readonly name = 'SolverDomainError';
  declare readonly code: SolverErrorCode;
  override readonly quantity: string;
  readonly value: number | string | null;
  readonly allowedRange: string;
  override readonly hint: string;

  constructor(details: SolverDomainErrorDetails) {
    const sentence =
      details.message ??
      (details.value === null
        ? `${details.quantity} is missing; it must be in the allowed range ${details.allowedRange}`
        : `${details.quantity} = ${details.shownValue ?? formatValue(details.value)} is outside the allowed range ${details.allowedRange}`);
    super(
      {
        code: details.code,
        message: sentence,
        hint: details.hint,
        quantity: details.quantity,
        expected: details.allowedRange,
        actual: details.value,
      },
      { message: `${sentence}. ${details.hint}` },
    );
    this.quantity = details.quantity;
    this.value = details.value;
    this.allowedRange = details.allowedRange;
    this.hint = details.hint;
  }

  toJSON(): Omit<SolverDomainErrorDetails, 'message'> & { name: string; message: string } {
    return {
      name: this.name,
      message: this.message,
      code: this.code,
      quantity: this.quantity,
      value: this.value,
      allowedRange: this.allowedRange,
      hint: this.hint,
    };
  }
}

export interface NumericRange {
  min?: number;
  max?: number;
  /** Whether the bound itself is allowed; both bounds are inclusive unless said otherwise. */
  minInclusive?: boolean;
  maxInclusive?: boolean;
  unit?: string;
}

export function describeRange(range: NumericRange): string {
  const minInclusive = range.minInclusive ?? true;
  const maxInclusive = range.maxInclusive ?? true;
  const low = range.min === undefined ? '(-∞' : `${minInclusive ? '[' : '('}${range.min}`;
  const high = range.max === undefined ? '∞)' : `${range.max}${maxInclusive ? ']' : ')'}`;
  return `${low}, ${high}${range.unit ? ` ${range.unit}` : ''}`;
}

function isInside(value: number, range: NumericRange): boolean {
  if (range.min !== undefined) {
    if ((range.minInclusive ?? true) ? value < range.min : value <= range.min) return false;
  }
  if (range.max !== undefined) {
    if ((range.maxInclusive ?? true) ? value > range.max : value >= range.max) return false;
  }
  return true;
}

/** Reads one numeric input, rejecting absent, non-numeric, non-finite and out-of-range values. */
export function requireNumber(quantity: string, value: unknown, range: NumericRange, hint: string): number {
  const allowedRange = describeRange(range);
  if (value === undefined || value === null) {
    throw new SolverDomainError({ code: 'missing-quantity', quantity, value: null, allowedRange, hint });
  }
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    throw new SolverDomainError({
      code: 'not-a-finite-number',
      quantity,
      value: typeof value === 'number' ? String(value) : `${typeof value} ${JSON.stringify(value) ?? ''}`.trim(),
      allowedRange,
      hint,
    });
  }
  if (!isInside(value, range)) {
    throw new SolverDomainError({ code: 'out-of-range', quantity, value, allowedRange, hint });
  }
  return value;
}

/** Like requireNumber, but an absent value takes the documented default. */
export function optionalNumber(quantity: string, value: unknown, fallback: number, range: NumericRange, hint: string): number {
  return value === undefined ? fallback : requireNumber(quantity, value, range, hint);
}

export function requireChoice<T extends string>(quantity: string, value: unknown, choices: readonly T[], hint: string): T {
  const allowedRange = `one of ${choices.map((choice) => `'${choice}'`).join(', ')}`;
  if (value === undefined || value === null) {
    throw new SolverDomainError({ code: 'missing-quantity', quantity, value: null, allowedRange, hint });
  }
  if (typeof value !== 'string' || !(choices as readonly string[]).includes(value)) {
    throw new SolverDomainError({ code: 'out-of-range', quantity, value: String(value), allowedRange, hint });
  }
  return value as T;
}

export function requireObject(quantity: string, value: unknown, hint: string): Record<string, unknown> {
  if (value === null || typeof value !== 'object' || Array.isArray(value)) {
    throw new SolverDomainError({
      code: value === undefined || value === null ? 'missing-quantity' : 'out-of-range',
      quantity,
      value: value === undefined || value === null ? null : typeof value,
      allowedRange: 'an object',
      hint,
    });
  }
  return value as Record<string, unknown>;
}

export function requireArray(quantity: string, value: unknown, minLength: number, hint: string): unknown[] {
  if (!Array.isArray(value)) {
    throw new SolverDomainError({
      code: value === undefined || value === null ? 'missing-quantity' : 'out-of-range',
      quantity,
      value: value === undefined || value === null ? null : typeof value,
      allowedRange: `a list of at least ${minLength} item(s)`,
      hint,
    });
  }
  if (value.length < minLength) {
    throw new SolverDomainError({
      code: 'out-of-range',
      quantity: `${quantity}.length`,
      value: value.length,
      allowedRange: `[${minLength}, ∞)`,
      hint,
    });
  }
  return value;
}

/** Fast scan without building paths; results can hold tens of thousands of profile points. */
function containsNonFinite(value: unknown): boolean {
  if (typeof value === 'number') return !Number.isFinite(value);
  if (value === null || typeof value !== 'object') return false;
  if (Array.isArray(value)) {
    for (let index = 0; index < value.length; index += 1) {
      const item: unknown = value[index];
      if (typeof item === 'number' ? !Number.isFinite(item) : containsNonFinite(item)) return true;
    }
    return false;
  }
  const record = value as Record<string, unknown>;
  for (const key in record) if (containsNonFinite(record[key])) return true;
  return false;
}

function findNonFinite(value: unknown, path: string): { path: string; value: number } | null {
  if (typeof value === 'number') return Number.isFinite(value) ? null : { path, value };
  if (Array.isArray(value)) {
    for (let index = 0; index < value.length; index += 1) {
      const found = findNonFinite(value[index], `${path}[${index}]`);
      if (found) return found;
    }
    return null;
  }
  if (value !== null && typeof value === 'object') {
    for (const [key, inner] of Object.entries(value)) {
      const found = findNonFinite(inner, `${path}.${key}`);
      if (found) return found;
    }
  }
  return null;
}

/** Last line of every public function: a NaN or Infinity in a result is a solver defect or an ill-posed case, never data. */
export function assertFiniteResult<T>(functionName: string, result: T): T {
  const found = containsNonFinite(result) ? findNonFinite(result, functionName) : null;
  if (found) {
    throw new SolverDomainError({
      code: 'non-finite-result',
      quantity: found.path,
      value: String(found.value),
      allowedRange: 'a finite number',
      hint: 'The inputs lead to a singular or overflowing calculation; check for zero impedances, zero lengths or extreme values.',
    });
  }
  return result;
}

/** Six significant digits for computed limits quoted in messages (the exact value is still in the result or the error's value). */
export function forMessage(value: number): string {
  return String(Number(value.toPrecision(6)));
}
