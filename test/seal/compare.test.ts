// Specification of comparing sealed results with a re-run's.
import { describe, expect, it } from 'vitest';
import { compareResults, type RerunResult } from '../../src/seal/compare.ts';
import type { SealedResult } from '../../src/seal/manifest.ts';
import { sealErrorOf } from './fixtures.ts';

const sealed: SealedResult[] = [
  { name: 'reactorRatingMvar', value: 150, unit: 'Mvar' },
  { name: 'receivingEndVoltagePu', value: 1.0412, unit: 'pu', tolerance: 1e-3 },
  { name: 'reactorArrangement', value: 'two line reactors' },
  { name: 'withinVoltageLimits', value: true },
];

function rerunOf(results: readonly SealedResult[]): RerunResult[] {
  return results.map(({ name, value, unit }) => (unit === undefined ? { name, value } : { name, value, unit }));
}

function withValue(name: string, value: RerunResult['value']): RerunResult[] {
  return rerunOf(sealed).map((result) => (result.name === name ? { ...result, value } : result));
}

describe('compareResults', () => {
  it('matches every result of an identical re-run', () => {
    expect(compareResults(sealed, rerunOf(sealed))).toEqual({ matched: 4, mismatches: [], missing: [], extra: [], duplicated: [] });
  });

  it('passes a number that moved by less than the default relative tolerance of 1e-9', () => {
    expect(compareResults(sealed, withValue('reactorRatingMvar', 150 * (1 + 5e-10))).mismatches).toEqual([]);
  });

  it('reports a moved figure by name with both values and the difference', () => {
    const [mismatch] = compareResults(sealed, withValue('reactorRatingMvar', 151.5)).mismatches;
    expect(mismatch).toMatchObject({ name: 'reactorRatingMvar', sealed: 150, rerun: 151.5, reason: 'number-moved', tolerance: 1e-9 });
    expect(mismatch!.difference).toBeCloseTo(1.5, 12);
    expect(mismatch!.relativeDifference).toBeCloseTo(1.5 / 151.5, 12);
  });

  it('honours a per-result tolerance looser than the default', () => {
    // 0.05 % move against the sealed 1e-3 tolerance: passes, though the default would fail it.
    const moved = withValue('receivingEndVoltagePu', 1.0412 * 1.0005);
    expect(compareResults(sealed, moved).mismatches).toEqual([]);
  });

  it('honours a per-result tolerance tighter than the default', () => {
    // A 1e-12 relative move (1.5e-10 Mvar) passes the default 1e-9 and clears the 1e-12 near-zero floor.
    const exact: SealedResult[] = [{ name: 'reactorRatingMvar', value: 150, tolerance: 0 }];
    expect(compareResults([{ name: 'reactorRatingMvar', value: 150 }], [{ name: 'reactorRatingMvar', value: 150 * (1 + 1e-12) }]).mismatches).toEqual(
      [],
    );
    const moved = compareResults(exact, [{ name: 'reactorRatingMvar', value: 150 * (1 + 1e-12) }]);
    expect(moved.mismatches[0]).toMatchObject({ name: 'reactorRatingMvar', tolerance: 0 });
  });

  it('fails a per-result tolerance that is exceeded', () => {
    const moved = withValue('receivingEndVoltagePu', 1.0412 * 1.002);
    expect(compareResults(sealed, moved).mismatches[0]).toMatchObject({ name: 'receivingEndVoltagePu', tolerance: 1e-3 });
  });

  it('lets the default tolerance be changed by the caller', () => {
    const moved = withValue('reactorRatingMvar', 150 * (1 + 1e-7));
    expect(compareResults(sealed, moved, { defaultRelativeTolerance: 1e-6 }).mismatches).toEqual([]);
  });

  it('passes a sealed zero against a re-run rounding residue below the near-zero absolute tolerance', () => {
    const zero: SealedResult[] = [{ name: 'sendingEndReactiveMvar', value: 0, unit: 'Mvar' }];
    expect(compareResults(zero, [{ name: 'sendingEndReactiveMvar', value: 3e-17, unit: 'Mvar' }]).mismatches).toEqual([]);
  });

  it('fails a sealed zero against a re-run value above the near-zero absolute tolerance', () => {
    const zero: SealedResult[] = [{ name: 'sendingEndReactiveMvar', value: 0, unit: 'Mvar' }];
    const [mismatch] = compareResults(zero, [{ name: 'sendingEndReactiveMvar', value: 1e-6, unit: 'Mvar' }]).mismatches;
    expect(mismatch).toMatchObject({ difference: 1e-6, relativeDifference: 1, reason: 'number-moved' });
  });

  it('compares text exactly', () => {
    const [mismatch] = compareResults(sealed, withValue('reactorArrangement', 'two line reactors ')).mismatches;
    expect(mismatch).toMatchObject({ name: 'reactorArrangement', reason: 'text-or-flag-changed', difference: null, tolerance: null });
  });

  it('compares pass/fail flags exactly', () => {
    expect(compareResults(sealed, withValue('withinVoltageLimits', false)).mismatches[0]).toMatchObject({
      name: 'withinVoltageLimits',
      sealed: true,
      rerun: false,
    });
  });

  it('reports a figure that turned from a number into text', () => {
    expect(compareResults(sealed, withValue('reactorRatingMvar', '150')).mismatches[0]!.reason).toBe('kind-changed');
  });

  it('reports a figure whose unit changed even when the number did not', () => {
    const rerun = rerunOf(sealed).map((result) => (result.name === 'reactorRatingMvar' ? { ...result, unit: 'MVA' } : result));
    expect(compareResults(sealed, rerun).mismatches[0]).toMatchObject({ reason: 'unit-changed', sealedUnit: 'Mvar', rerunUnit: 'MVA' });
  });

  it('reports a re-run that produced NaN as not finite, without a numeric difference', () => {
    const [mismatch] = compareResults(sealed, withValue('reactorRatingMvar', Number.NaN)).mismatches;
    expect(mismatch).toMatchObject({ reason: 'not-finite', difference: null, relativeDifference: null });
  });

  it('lists sealed names the re-run did not produce and names it produced that were not sealed', () => {
    const rerun = rerunOf(sealed).filter((result) => result.name !== 'withinVoltageLimits');
    rerun.push({ name: 'sendingEndVoltagePu', value: 1, unit: 'pu' });
    const comparison = compareResults(sealed, rerun);
    expect(comparison.missing).toEqual(['withinVoltageLimits']);
    expect(comparison.extra).toEqual(['sendingEndVoltagePu']);
    expect(comparison.matched).toBe(3);
  });

  it('lists a name the re-run gave twice', () => {
    const rerun = [...rerunOf(sealed), { name: 'reactorRatingMvar', value: 1, unit: 'Mvar' }];
    expect(compareResults(sealed, rerun).duplicated).toEqual(['reactorRatingMvar']);
  });

  it.each([-1e-9, Number.NaN, Number.POSITIVE_INFINITY])('refuses a default tolerance of %s', (defaultRelativeTolerance) => {
    const error = sealErrorOf(() => compareResults(sealed, rerunOf(sealed), { defaultRelativeTolerance }));
    expect(error.code).toBe('seal-invalid-tolerance');
    expect(error.quantity).toBe('defaultRelativeTolerance');
  });
});
