// Smaller defects the attack review found on the way: each one reproduced as a study, each one now a located refusal
// or a correct result.
import { describe, expect, it } from 'vitest';
import { parseStudy } from '../../src/study/parse.ts';
import { diagnosticsOf, lineOf, studyText } from '../support/studies.ts';

describe('a compound unit in a range bound', () => {
  it('reads "1 km h" as a bound of "5 km h"', () => {
    const study = parseStudy('s.study.md', studyText({ inputs: '  exposure: { value: 5 km h, min: 1 km h }', body: '' }));
    expect(study.inputs[0]).toMatchObject({ given: { value: 5, unit: 'km h' }, min: { value: 1, unit: 'km h' } });
  });

  it('refuses a compound bound of another dimension with a located error, not an internal one', async () => {
    const source = studyText({ inputs: '  seriesR: { value: 0.3 ohm/km, min: 0.1 ohm km }', body: '' });
    const [problem] = await diagnosticsOf(() => parseStudy('s.study.md', source));
    expect(problem).toMatchObject({ code: 'input-unit-mismatch', at: { line: lineOf(source, 'seriesR') } });
  });
});
