import { describe, expect, it } from 'vitest';
import { StudyFailure } from '../../src/diagnostics/diagnostic.ts';
import { plainData, sanitizeErrorReport, sanitizeRecords } from '../../src/execute/sanitize.ts';
import { OUTPUT_LIMITS } from '../../src/execute/limits.ts';
import { parseStudy } from '../../src/study/parse.ts';
import { studyText } from '../support/studies.ts';

// What the parent accepts from the calculation child, which a study controls: every message is untrusted data.
const study = parseStudy('forged.study.md', studyText({ body: 'No blocks.' }));
const at = { file: 'forged.study.md', line: 9 };

describe('chart specifications and solver summaries from the child', () => {
  it('lose every key that reaches a prototype, at any depth', () => {
    const forged = JSON.parse(
      '{"mark": "point", "__proto__": {"polluted": 1}, "config": {"constructor": {"prototype": {"polluted": 1}}, "axis": {"__proto__": {"polluted": 1}, "grid": false}}}',
    );
    expect(plainData(forged)).toEqual({ mark: 'point', config: { axis: { grid: false } } });
  });

  it('turn non-finite numbers into null rather than passing them on', () => {
    expect(plainData({ values: [1, Number.NaN, Number.POSITIVE_INFINITY] })).toEqual({ values: [1, null, null] });
  });

  it('keep a chart record whose specification is clean, with the specification copied', () => {
    const spec = { mark: 'line', data: { values: [{ x: 1 }] } };
    const [record] = sanitizeRecords([{ kind: 'chart', caption: 'c', spec }], study, at);
    expect(record).toEqual({ kind: 'chart', caption: 'c', spec });
    expect((record as { spec: unknown }).spec).not.toBe(spec);
  });
});

describe('records from the child', () => {
  it('refuse a result without a finite value as a located diagnostic', () => {
    expect(() => sanitizeRecords([{ kind: 'result', name: 'x', value: null, unit: '', digits: 4 }], study, at)).toThrow(StudyFailure);
  });

  it('drop a position that is not a whole line and column', () => {
    const [record] = sanitizeRecords([{ kind: 'text', text: 't', position: { blockIndex: 0, line: -3, column: 0.5 } }], study, at);
    expect(record).toEqual({ kind: 'text', text: 't' });
  });

  it('ignore anything that is not a list of records', () => {
    expect(sanitizeRecords({ length: 1, 0: { kind: 'text', text: 't' } }, study, at)).toEqual([]);
  });
});

describe('error reports from the child', () => {
  it('become well-formed when forged with the wrong shapes', () => {
    expect(sanitizeErrorReport({ name: 7, message: { text: 'x' }, code: ['c'], positions: 'everywhere' })).toEqual({
      name: 'Error',
      message: 'the calculation process reported a failure without a message',
      positions: [],
    });
  });

  it('become well-formed when missing altogether', () => {
    expect(sanitizeErrorReport(undefined)).toMatchObject({ name: 'Error', positions: [] });
  });

  it('keep only positions with whole-number lines and columns', () => {
    const report = sanitizeErrorReport({
      name: 'Error',
      message: 'm',
      positions: [
        { blockIndex: 0, line: 2, column: 5 },
        { blockIndex: 0, line: 0, column: 1 },
        { blockIndex: 'x', line: 1, column: 1 },
      ],
    });
    expect(report.positions).toEqual([{ blockIndex: 0, line: 2, column: 5 }]);
  });

  it('cut an overlong message so a diagnostic stays readable', () => {
    expect(sanitizeErrorReport({ name: 'Error', message: 'x'.repeat(100_000), positions: [] }).message.length).toBeLessThan(5000);
  });
});

describe('records from a child that skipped the checks of the block API', () => {
  const refusal = (records: unknown[], budget = { characters: 0 }) => {
    try {
      sanitizeRecords(records, study, at, budget);
    } catch (error) {
      if (error instanceof StudyFailure) return error.diagnostics[0];
    }
    throw new Error('the forged records were accepted');
  };

  it('refuse a caution longer than a report holds, at the block', () => {
    expect(refusal([{ kind: 'caution', text: 'x'.repeat(OUTPUT_LIMITS.textCharacters + 1) }])).toMatchObject({ code: 'block-output-limit', at });
  });

  it('refuse a result name with a direction override', () => {
    expect(refusal([{ kind: 'result', name: 'Vr \u202ekcehc', value: 1, unit: '', digits: 4 }])).toMatchObject({ code: 'block-text-characters' });
  });

  it('refuse a table cell that says NaN', () => {
    expect(refusal([{ kind: 'table', columns: [{ key: 'a', label: 'a', unit: '', digits: 4 }], rows: [['NaN']] }])).toMatchObject({
      code: 'block-non-finite',
    });
  });

  it('refuse a table of more cells than a report table holds', () => {
    const rows = Array.from({ length: OUTPUT_LIMITS.tableCells + 1 }, () => [1]);
    expect(refusal([{ kind: 'table', columns: [{ key: 'a', label: 'a', unit: '', digits: 4 }], rows }])).toMatchObject({
      code: 'block-output-limit',
    });
  });

  it('refuse records once the study has written its allowance across blocks', () => {
    const budget = { characters: OUTPUT_LIMITS.studyOutputBytes - 10 };
    expect(refusal([{ kind: 'text', text: 'twenty-one characters' }], budget)).toMatchObject({ code: 'block-output-limit' });
  });
});
