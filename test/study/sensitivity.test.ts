// The front matter's sensitivity section: each mistake refused where it is written, with what is allowed.
import { describe, expect, it } from 'vitest';
import { diagnosticsOf, lineOf, runSource, studyText } from '../support/studies.ts';
import { lineStudy } from '../sensitivity/lineStudy.ts';

const section = (inputs: string, results = 'Open-end voltage', criteria?: string) =>
  ['  inputs:', inputs, `  results: [${results}]`, ...(criteria ? [`  criteria: [${criteria}]`] : [])].join('\n');

describe('the sensitivity section of the front matter', () => {
  it('refuses an input the study does not declare, at its name', async () => {
    const source = lineStudy(section('    lineLenght: { low: -1 %, high: +1 % }'));
    const [problem] = await diagnosticsOf(runSource(source));
    expect(problem?.code).toBe('sensitivity-unknown-input');
    expect(problem?.at?.line).toBe(lineOf(source, 'lineLenght:'));
    expect(problem?.hint).toContain('lineLength, seriesReactance');
  });

  it("refuses a range that reaches outside the input's own min and max, naming the allowed range", async () => {
    const source = lineStudy(section('    seriesReactance: { low: 0.31 ohm/km, high: 0.6 ohm/km }'));
    const [problem] = await diagnosticsOf(runSource(source));
    expect(problem?.code).toBe('sensitivity-out-of-range');
    expect(problem?.at?.line).toBe(lineOf(source, 'high: 0.6 ohm/km'));
    expect(problem?.quantity).toBe('seriesReactance');
    expect(problem?.expected).toBe('0.2 ohm/km to 0.5 ohm/km');
    expect(problem?.actual).toBe('0.6 ohm/km');
  });

  it('refuses a per-cent range that takes the input past its minimum', async () => {
    const source = lineStudy(section('    lineLength: { low: -80 %, high: +1 % }'));
    const [problem] = await diagnosticsOf(runSource(source));
    expect(problem?.code).toBe('sensitivity-out-of-range');
    expect(problem?.message).toContain('low end 64 km');
  });

  it('refuses a low end above the high end', async () => {
    const source = lineStudy(section('    seriesReactance: { low: 0.33 ohm/km, high: 0.31 ohm/km }'));
    const [problem] = await diagnosticsOf(runSource(source));
    expect(problem?.code).toBe('sensitivity-range');
    expect(problem?.at?.line).toBe(lineOf(source, 'low: 0.33 ohm/km'));
    expect(problem?.message).toContain('is not below its high end');
  });

  it('refuses a per-cent low end above the per-cent high end', async () => {
    const source = lineStudy(section('    lineLength: { low: +2 %, high: -2 % }'));
    const [problem] = await diagnosticsOf(runSource(source));
    expect(problem?.code).toBe('sensitivity-range');
    expect(problem?.actual).toBe('+2 % to -2 %');
  });

  it('refuses an end in a unit of another quantity', async () => {
    const source = lineStudy(section('    lineLength: { low: 310 kV, high: 330 km }'));
    const [problem] = await diagnosticsOf(runSource(source));
    expect(problem?.code).toBe('sensitivity-range');
    expect(problem?.at?.line).toBe(lineOf(source, 'low: 310 kV'));
  });

  it('refuses a range with both a factor and ends', async () => {
    const source = lineStudy(section('    lineLength: { factor: 2, low: -1 % }'));
    const [problem] = await diagnosticsOf(runSource(source));
    expect(problem?.code).toBe('sensitivity-range');
    expect(problem?.message).toContain('needs both "low" and "high", or "factor" alone');
  });

  it('refuses a result the run never produced, at its name in the front matter', async () => {
    const source = lineStudy(section('    lineLength: { low: -1 %, high: +1 % }', 'Open end voltage'));
    const [problem] = await diagnosticsOf(runSource(source));
    expect(problem?.code).toBe('sensitivity-unknown-result');
    expect(problem?.at?.line).toBe(lineOf(source, '[Open end voltage]'));
    expect(problem?.hint).toContain('"Open-end voltage"');
  });

  it('refuses a criterion the run never stated', async () => {
    const source = lineStudy(section('    lineLength: { low: -1 %, high: +1 % }', 'Open-end voltage', 'Voltage limit'));
    const [problem] = await diagnosticsOf(runSource(source));
    expect(problem?.code).toBe('sensitivity-unknown-result');
    expect(problem?.message).toContain('criterion "Voltage limit"');
  });

  it('refuses a followed result that is not a number', async () => {
    const source = lineStudy(section('    lineLength: { low: -1 %, high: +1 % }', 'Line label'));
    const [problem] = await diagnosticsOf(runSource(source));
    expect(problem?.code).toBe('sensitivity-result-not-number');
  });

  it('spreads a factor either way: from the value divided by it to the value times it', async () => {
    const source = lineStudy(section('    lineLength: { factor: 1.25 }'));
    const product = await runSource(source, { sensitivity: true });
    const range = product.results.sensitivity!.inputs[0]!;
    expect([range.low.value, range.high.value]).toEqual([256, 400]);
    expect(range.declared).toBe('÷ 1.25 to × 1.25');
  });

  it('refuses samples without a seed, so that a sampled run always draws the same samples', async () => {
    const source = lineStudy(`${section('    lineLength: { low: -1 %, high: +1 % }')}\n  samples: 20`);
    const [problem] = await diagnosticsOf(runSource(source));
    expect(problem?.code).toBe('front-matter-missing-key');
    expect(problem?.message).toBe('"sensitivity" gives "samples" but no "seed"');
  });

  it('refuses more samples than a study may ask for, at the number', async () => {
    const source = lineStudy(`${section('    lineLength: { low: -1 %, high: +1 % }')}\n  samples: 5000\n  seed: 1`);
    const [problem] = await diagnosticsOf(runSource(source));
    expect(problem?.code).toBe('front-matter-range');
    expect(problem?.at?.line).toBe(lineOf(source, 'samples: 5000'));
    expect(problem?.expected).toBe('a whole number from 2 to 1000');
  });

  it('refuses a section that asks for more runs of the study than a study may', async () => {
    const names = Array.from({ length: 101 }, (_, index) => `length${index}`);
    const source = studyText({
      frontMatter: `sensitivity:\n  inputs:\n${names.map((name) => `    ${name}: { low: -1 %, high: +1 % }`).join('\n')}\n  results: [Length]\n  samples: 1000\n  seed: 1`,
      inputs: names.map((name) => `  ${name}: 320 km`).join('\n'),
      body: '```ts\nresult("Length", 1, { unit: "km" });\n```\n',
    });
    const [problem] = await diagnosticsOf(runSource(source));
    expect(problem?.code).toBe('front-matter-range');
    expect(problem?.actual).toBe(1202);
    expect(problem?.expected).toBe('at most 1200');
  });

  it('refuses --sensitivity for a study without a sensitivity section', async () => {
    const source = lineStudy().replace(/sensitivity:\n( {2}.*\n)+/, '');
    const [problem] = await diagnosticsOf(runSource(source, { sensitivity: true }));
    expect(problem?.code).toBe('sensitivity-no-plan');
  });

  it('refuses a --set value about which the range no longer fits, at the range', async () => {
    const source = lineStudy(section('    lineLength: { low: -1 %, high: +1 % }'));
    const [problem] = await diagnosticsOf(runSource(source, { sensitivity: true, overrides: [{ name: 'lineLength', text: '499 km' }] }));
    expect(problem?.code).toBe('sensitivity-out-of-range');
    expect(problem?.at?.line).toBe(lineOf(source, 'lineLength: { low: -1 %'));
  });
});
