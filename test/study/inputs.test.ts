import { describe, expect, it } from 'vitest';
import { parseStudy } from '../../src/study/parse.ts';
import { effectiveInputs, parseOverrideArguments } from '../../src/study/inputs.ts';
import { diagnosticsOf, lineOf, studyText } from '../support/studies.ts';

const parse = (inputs: string) => parseStudy('s.study.md', studyText({ inputs, body: '' }));

describe('study inputs', () => {
  it('parses quantities with units to SI', () => {
    const study = parse('  lineLength: 320 km\n  seriesR: 0.031 ohm/km\n  shuntB: 3.9 uS/km\n  nominalVoltage: { value: 400 kV, quantity: voltage }');
    expect(study.inputs.map((input) => [input.name, input.given.value, input.given.unit, input.given.si])).toEqual([
      ['lineLength', 320, 'km', 320_000],
      ['seriesR', 0.031, 'ohm/km', 0.000031],
      ['shuntB', 3.9, 'uS/km', 3.9e-9],
      ['nominalVoltage', 400, 'kV', 400_000],
    ]);
  });

  it('refuses a voltage given in MW, naming the input and its line', async () => {
    const source = studyText({ inputs: '  nominalVoltage: { value: 400 MW, quantity: voltage }', body: '' });
    const [problem] = await diagnosticsOf(() => parseStudy('s.study.md', source));
    expect(problem).toMatchObject({ code: 'input-unit-mismatch', at: { line: lineOf(source, 'nominalVoltage') } });
    expect(problem?.message).toContain('nominalVoltage');
    expect(problem?.message).toContain('MW');
  });

  it('refuses an unknown unit', async () => {
    const [problem] = await diagnosticsOf(() => parse('  lineLength: 320 furlongz'));
    expect(problem?.code).toBe('input-unit');
    expect(problem?.message).toContain('lineLength');
  });

  it('refuses a value outside its declared range, stating the range', async () => {
    const [problem] = await diagnosticsOf(() => parse('  lineLength: { value: 1200 km, min: 10 km, max: 800 km }'));
    expect(problem?.code).toBe('input-out-of-range');
    expect(problem?.message).toMatch(/800 km/);
  });

  it('refuses a range bound of another dimension than the value', async () => {
    const [problem] = await diagnosticsOf(() => parse('  lineLength: { value: 300 km, max: 800 kV }'));
    expect(problem?.code).toBe('input-unit-mismatch');
  });

  it('applies a command-line override and marks it overridden', () => {
    const study = parse('  lineLength: { value: 320 km, min: 10 km, max: 800 km }');
    const [input] = effectiveInputs(study.inputs, parseOverrideArguments(['lineLength=280km']));
    expect(input).toMatchObject({ value: 280, unit: 'km', si: 280_000, source: 'overridden', givenText: '320 km' });
  });

  it('refuses an override of another dimension', async () => {
    const study = parse('  lineLength: 320 km');
    const [problem] = await diagnosticsOf(() => effectiveInputs(study.inputs, parseOverrideArguments(['lineLength=280kV'])));
    expect(problem?.code).toBe('override-unit-mismatch');
  });

  it('refuses an override outside the declared range', async () => {
    const study = parse('  lineLength: { value: 320 km, max: 800 km }');
    const [problem] = await diagnosticsOf(() => effectiveInputs(study.inputs, parseOverrideArguments(['lineLength=900 km'])));
    expect(problem?.code).toBe('override-out-of-range');
  });

  it('refuses an override of an input the study does not declare, listing the inputs', async () => {
    const study = parse('  lineLength: 320 km');
    const [problem] = await diagnosticsOf(() => effectiveInputs(study.inputs, parseOverrideArguments(['length=280km'])));
    expect(problem).toMatchObject({ code: 'override-unknown-input' });
    expect(problem?.hint).toContain('lineLength');
  });
});
