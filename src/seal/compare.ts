// Comparing a study's sealed results with a re-run's, figure by figure, within stated tolerances.
import { SealError } from './errors.ts';
import type { SealedResult } from './manifest.ts';

export type ResultValue = number | string | boolean;

export interface RerunResult {
  name: string;
  value: ResultValue;
  unit?: string;
}

export interface CompareOptions {
  /** Relative tolerance for numbers whose sealed result names none. */
  defaultRelativeTolerance?: number;
  /**
   * Differences up to this size always pass, whatever the relative difference. Without it a
   * sealed 0 could never match a re-run's 1e-18 rounding residue. Same rule as PEP 485's
   * `math.isclose`: |a − b| ≤ max(rel · max(|a|, |b|), abs).
   */
  absoluteToleranceNearZero?: number;
}

export type MismatchReason = 'number-moved' | 'text-or-flag-changed' | 'kind-changed' | 'unit-changed' | 'not-finite';

export interface ResultMismatch {
  name: string;
  sealed: ResultValue;
  rerun: ResultValue;
  /** rerun − sealed, for numbers; null otherwise. */
  difference: number | null;
  /** |rerun − sealed| / max(|sealed|, |rerun|), 0 when both are 0; null when not two finite numbers. */
  relativeDifference: number | null;
  /** The relative tolerance that applied; null for text and flags, which must match exactly. */
  tolerance: number | null;
  reason: MismatchReason;
  sealedUnit?: string;
  rerunUnit?: string;
}

export interface ResultComparison {
  matched: number;
  mismatches: ResultMismatch[];
  /** Sealed names the re-run did not produce. */
  missing: string[];
  /** Names the re-run produced that were not sealed. */
  extra: string[];
  /** Names given more than once on either side; the first of each is compared. */
  duplicated: string[];
}

export const DEFAULT_RELATIVE_TOLERANCE = 1e-9;
const DEFAULT_ABSOLUTE_TOLERANCE_NEAR_ZERO = 1e-12;

export function compareResults(sealed: readonly SealedResult[], rerun: readonly RerunResult[], options: CompareOptions = {}): ResultComparison {
  const defaultTolerance = checkedTolerance(options.defaultRelativeTolerance ?? DEFAULT_RELATIVE_TOLERANCE, 'defaultRelativeTolerance');
  const absoluteFloor = checkedTolerance(options.absoluteToleranceNearZero ?? DEFAULT_ABSOLUTE_TOLERANCE_NEAR_ZERO, 'absoluteToleranceNearZero');
  const duplicated = new Set<string>();
  const sealedByName = firstByName(sealed, duplicated);
  const rerunByName = firstByName(rerun, duplicated);

  const comparison: ResultComparison = { matched: 0, mismatches: [], missing: [], extra: [], duplicated: [...duplicated] };
  for (const [name, sealedResult] of sealedByName) {
    const rerunResult = rerunByName.get(name);
    if (rerunResult === undefined) {
      comparison.missing.push(name);
      continue;
    }
    const tolerance = sealedResult.tolerance === undefined ? defaultTolerance : checkedTolerance(sealedResult.tolerance, `tolerance of ${name}`);
    const mismatch = compareOne(sealedResult, rerunResult, tolerance, absoluteFloor);
    if (mismatch === null) comparison.matched += 1;
    else comparison.mismatches.push(mismatch);
  }
  for (const name of rerunByName.keys()) {
    if (!sealedByName.has(name)) comparison.extra.push(name);
  }
  return comparison;
}

function compareOne(sealed: SealedResult, rerun: RerunResult, tolerance: number, absoluteFloor: number): ResultMismatch | null {
  const base = { name: sealed.name, sealed: sealed.value, rerun: rerun.value, ...units(sealed, rerun) };
  if (typeof sealed.value !== 'number' || typeof rerun.value !== 'number') {
    const nonNumeric = { ...base, difference: null, relativeDifference: null, tolerance: null };
    if (typeof sealed.value !== typeof rerun.value) return { ...nonNumeric, reason: 'kind-changed' };
    if (sealed.unit !== rerun.unit) return { ...nonNumeric, reason: 'unit-changed' };
    return sealed.value === rerun.value ? null : { ...nonNumeric, reason: 'text-or-flag-changed' };
  }
  const numeric = numericDifference(sealed.value, rerun.value);
  const withNumbers = { ...base, difference: numeric?.difference ?? null, relativeDifference: numeric?.relativeDifference ?? null, tolerance };
  if (numeric === null) return { ...withNumbers, reason: 'not-finite' };
  if (sealed.unit !== rerun.unit) return { ...withNumbers, reason: 'unit-changed' };
  const allowed = Math.max(tolerance * numeric.scale, absoluteFloor);
  return Math.abs(numeric.difference) <= allowed ? null : { ...withNumbers, reason: 'number-moved' };
}

/** Null when either side is not finite: a NaN re-run must show as such, never as a number. */
function numericDifference(sealed: number, rerun: number): { difference: number; relativeDifference: number; scale: number } | null {
  if (!Number.isFinite(sealed) || !Number.isFinite(rerun)) return null;
  const difference = rerun - sealed;
  const scale = Math.max(Math.abs(sealed), Math.abs(rerun));
  return { difference, relativeDifference: scale === 0 ? 0 : Math.abs(difference) / scale, scale };
}

function units(sealed: SealedResult, rerun: RerunResult): { sealedUnit?: string; rerunUnit?: string } {
  return {
    ...(sealed.unit === undefined ? {} : { sealedUnit: sealed.unit }),
    ...(rerun.unit === undefined ? {} : { rerunUnit: rerun.unit }),
  };
}

function firstByName<T extends { name: string }>(items: readonly T[], duplicated: Set<string>): Map<string, T> {
  const byName = new Map<string, T>();
  for (const item of items) {
    if (byName.has(item.name)) duplicated.add(item.name);
    else byName.set(item.name, item);
  }
  return byName;
}

function checkedTolerance(tolerance: number, quantity: string): number {
  if (Number.isFinite(tolerance) && tolerance >= 0) return tolerance;
  throw new SealError({
    code: 'seal-invalid-tolerance',
    message: `The ${quantity} is ${tolerance}; a tolerance must be a finite number of at least 0.`,
    quantity,
    value: tolerance,
    allowed: '0 or more, finite (0 means exact)',
    hint: 'Give tolerances as relative fractions, e.g. 1e-6 for one part per million.',
  });
}
