// The study lines the command line prints under a located problem.
import { describe, expect, it } from 'vitest';
import { excerptAround } from '../../src/cli/excerpt.ts';

const source = ['one', 'two', 'date: 2026-13-45', 'four', 'five', 'six'].join('\n');

describe('excerptAround', () => {
  it('numbers two lines either side and marks the line of the problem', () => {
    expect(excerptAround(source, { line: 3 })).toBe(
      ['    1 | one', '    2 | two', '  > 3 | date: 2026-13-45', '    4 | four', '    5 | five'].join('\n'),
    );
  });

  it('puts one caret under the column when the end is not known', () => {
    expect(excerptAround(source, { line: 3, column: 7 }).split('\n')[3]).toBe('      |       ^');
  });

  it('spans the carets to the end when the problem ends on its own line', () => {
    expect(excerptAround(source, { line: 3, column: 7, endLine: 3, endColumn: 17 }).split('\n')[3]).toBe('      |       ^^^^^^^^^^');
  });

  it('keeps one caret when the problem runs on to a later line', () => {
    expect(excerptAround(source, { line: 3, column: 7, endLine: 5, endColumn: 2 }).split('\n')[3]).toBe('      |       ^');
  });

  it('stops at the first and last lines of the study', () => {
    expect(excerptAround(source, { line: 1 }).split('\n')).toHaveLength(3);
    expect(excerptAround(source, { line: 6 }).split('\n')).toHaveLength(3);
  });
});
