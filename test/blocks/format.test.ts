import { describe, expect, it } from 'vitest';
import { columnFormat, displayUnit, formatQuantity } from '../../src/blocks/format.ts';

describe('columnFormat', () => {
  const column = (values: number[], digits: number) => values.map(columnFormat(values, digits));

  it('gives a column the decimals of its largest value at the column’s digits', () => {
    expect(column([0.978, 1.15, 1.0412], 3)).toEqual(['0.98', '1.15', '1.04']);
  });

  it('counts the digits of the largest value after rounding, so 9.996 to three figures takes one decimal', () => {
    expect(column([9.996, 5.5], 3)).toEqual(['10.0', '5.5']);
  });

  it('writes a value that rounds to zero without a minus sign', () => {
    // At one significant figure a value a tenth of the largest may keep none.
    expect(column([-0.04, 1], 1)).toEqual(['0.0', '1.0']);
  });

  it('keeps each value’s own figures in a column that spans several decades', () => {
    expect(column([0.01615, 14.49], 4)).toEqual(['0.01615', '14.49']);
  });

  it('keeps each value’s own figures when the column needs exponent form', () => {
    expect(column([2e9, 3], 3)).toEqual(['2.00×10^9', '3.00']);
  });
});

describe('displayUnit', () => {
  it.each([
    ['ohm', 'Ω'],
    ['ohm/km', 'Ω/km'],
    ['kohm', 'kΩ'],
    ['uS/km', 'µS/km'],
    ['uF', 'µF'],
    ['deg', '°'],
    ['deg/km', '°/km'],
    ['kV rms', 'kV rms'],
    ['kV peak', 'kV peak'],
    ['Mvar', 'Mvar'],
    ['pu', 'pu'],
  ])('writes %s as %s', (typed, shown) => {
    expect(displayUnit(typed)).toBe(shown);
  });

  it('puts the degree sign of an angle right after the number, and a space before every other unit', () => {
    expect(formatQuantity(30, 'deg', 2)).toBe('30°');
    expect(formatQuantity(0.06044, 'deg/km', 4)).toBe('0.06044 °/km');
    expect(formatQuantity(12, '%', 2)).toBe('12 %');
  });
});
