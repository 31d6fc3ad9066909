// Attacks through quantity text, which the host reads itself: front-matter values and --set values are a number and
// a unit, read by the unit parser only, never evaluated as expressions.
import { describe, expect, it } from 'vitest';
import { parseStudy } from '../../src/study/parse.ts';
import { effectiveInputs, parseOverrideArguments } from '../../src/study/inputs.ts';
import { diagnosticsOf, lineOf, studyText } from '../support/studies.ts';

const parse = (inputs: string) => parseStudy('s.study.md', studyText({ inputs, body: '' }));

async function refusedInFrontMatter(value: string) {
  const source = studyText({ inputs: `  nominalVoltage: ${value}`, body: '' });
  const [problem] = await diagnosticsOf(() => parseStudy('s.study.md', source));
  expect(problem, `${value} was accepted`).toMatchObject({ code: 'input-unit', at: { line: lineOf(source, 'nominalVoltage') } });
  expect(problem?.message).toContain('nominalVoltage');
  expect(problem?.hint).toMatch(/a number and a unit/);
  return problem!;
}

describe('front-matter quantities are never evaluated', () => {
  it('refuses arithmetic in a value: "(1+2)*100 kV" is not 300 kV', async () => {
    await refusedInFrontMatter('"(1+2)*100 kV"');
  });

  it('refuses a sum of quantities', async () => {
    await refusedInFrontMatter('"100 kV + 300 kV"');
  });

  it('refuses a function call', async () => {
    await refusedInFrontMatter('"sqrt(160000) kV"');
  });

  it('refuses a matrix expression, which the evaluator would compute at length in the host', async () => {
    await refusedInFrontMatter('"det(ones(400, 400) + diag(ones(400))) * 1 kV"');
  });

  it('refuses a unit conversion expression', async () => {
    await refusedInFrontMatter('"400000 V to kV"');
  });

  it('refuses an assignment', async () => {
    await refusedInFrontMatter('"kV = 2 V"');
  });

  it('refuses a quantity text longer than any quantity needs', async () => {
    const problem = await refusedInFrontMatter(`"400 ${'kV '.repeat(200)}"`);
    expect(problem.message).toMatch(/characters/);
  });
});

describe('--set quantities are never evaluated', () => {
  it('refuses arithmetic in an override', async () => {
    const study = parse('  nominalVoltage: 400 kV');
    const [problem] = await diagnosticsOf(() => effectiveInputs(study.inputs, parseOverrideArguments(['nominalVoltage=(1+2)*100 kV'])));
    expect(problem?.code).toBe('override-unit');
    expect(problem?.message).toContain('--set nominalVoltage=(1+2)*100 kV');
  });

  it('refuses a function call in an override', async () => {
    const study = parse('  nominalVoltage: 400 kV');
    const [problem] = await diagnosticsOf(() => effectiveInputs(study.inputs, parseOverrideArguments(['nominalVoltage=max(400, 800) kV'])));
    expect(problem?.code).toBe('override-unit');
  });
});

describe('every plain quantity still reads as before', () => {
  it.each([
    ['0.031 ohm/km', 0.031, 'ohm/km', 0.000031],
    ['3.9 uS/km', 3.9, 'uS/km', 3.9e-9],
    ['3.9 µS/km', 3.9, 'uS/km', 3.9e-9],
    ['150 Mvar', 150, 'Mvar', 150e6],
    ['1.05 pu', 1.05, 'pu', 1.05],
    ['30 deg', 30, 'deg', Math.PI / 6],
    ['380km', 380, 'km', 380_000],
    ['-12.5 deg', -12.5, 'deg', (-12.5 * Math.PI) / 180],
    ['1e3 km', 1000, 'km', 1_000_000],
    ['15000 MVA', 15000, 'MVA', 15e9],
    ['22 kA', 22, 'kA', 22_000],
    ['10 Ω', 10, 'ohm', 10],
    ['0.95', 0.95, '', 0.95],
    ['2.5 m/s^2', 2.5, 'm/s^2', 2.5],
  ])('reads %s', (text, value, unit, si) => {
    const [input] = parse(`  quantity: "${text}"`).inputs;
    expect(input?.given.value).toBe(value);
    expect(input?.given.unit).toBe(unit);
    expect(input?.given.si).toBeCloseTo(si, 12);
  });
});
