// The one-at-a-time runs of `--sensitivity`: each range's ends run through the overrides, results sorted by effect, flips called out.
import { beforeAll, describe, expect, it } from 'vitest';
import type { RunProduct } from '../../src/pipeline.ts';
import { diagnosticsOf, lineOf, runSource, studyText } from '../support/studies.ts';
import { SHUNT_SUSCEPTANCE_US_PER_KM, lineStudy } from './lineStudy.ts';

describe('a lossless line run with its length and series reactance at the ends of their ranges', () => {
  let product: RunProduct;
  beforeAll(async () => {
    product = await runSource(lineStudy(), { sensitivity: true });
  });

  it('runs each end of each range once: four runs for two ranges', () => {
    expect(product.results.sensitivity?.runs).toBe(4);
    expect(product.results.sensitivity?.inputs.map((range) => [range.input, range.low.value, range.high.value])).toEqual([
      ['lineLength', 320 * 0.99, 320 * 1.01],
      ['seriesReactance', 0.31, 0.33],
    ]);
  });

  it("gives the open-end voltage's derivative with respect to length to within the central difference's truncation error", () => {
    // Lossless line open at the far end: V_R / V_S = 1 / cos(βl), β = sqrt(x b) (Glover, Sarma & Overbye, Power System
    // Analysis and Design, 5th ed., sec. 5.4; from memory). Its derivative in l is β sin(βl) / cos²(βl).
    const betaPerKm = Math.sqrt(0.32 * SHUNT_SUSCEPTANCE_US_PER_KM * 1e-6);
    const range = product.results.sensitivity!.inputs.find((entry) => entry.input === 'lineLength')!;
    const swing = product.results.sensitivity!.results[0]!.swings.find((entry) => entry.input === 'lineLength')!;
    const [lowKm, highKm] = [range.low.value, range.high.value];
    const centreKm = (lowKm + highKm) / 2;
    const hKm = (highKm - lowKm) / 2;
    const centralDifference = (swing.high - swing.low) / (highKm - lowKm);
    const bl = betaPerKm * centreKm;
    const analytic = (betaPerKm * Math.sin(bl)) / Math.cos(bl) ** 2;
    // (f(l+h) − f(l−h)) / 2h − f'(l) = h²/6 · f'''(ξ) for some ξ in (l−h, l+h). For f = sec(βl),
    // f''' = β³ sec(βl) tan(βl) (tan²(βl) + 5 sec²(βl)), which rises with l below βl = π/2: its largest value is at l + h.
    const thirdDerivativeAt = (lengthKm: number) => {
      const angle = betaPerKm * lengthKm;
      const [sec, tan] = [1 / Math.cos(angle), Math.tan(angle)];
      return betaPerKm ** 3 * sec * tan * (tan ** 2 + 5 * sec ** 2);
    };
    const truncationBound = (hKm ** 2 / 6) * thirdDerivativeAt(highKm);
    // Rounding: each voltage is good to a few units in the last place (2.2e-16 relative), divided by 2h.
    const roundingBound = (8 * Number.EPSILON * swing.high) / (highKm - lowKm);
    expect(Math.abs(centralDifference - analytic)).toBeLessThanOrEqual(truncationBound + roundingBound);
    // The bound is tight, not loose: the error is the truncation error, of its sign and at least its smallest size.
    expect(centralDifference - analytic).toBeGreaterThanOrEqual((hKm ** 2 / 6) * thirdDerivativeAt(lowKm) - roundingBound);
  });

  it('lists the inputs by effect, largest first, whatever order the front matter gives them', () => {
    const result = product.results.sensitivity!.results[0]!;
    expect(result.swings.map((swing) => swing.input)).toEqual(['seriesReactance', 'lineLength']);
    expect(result.swings[0]!.effect).toBeGreaterThan(result.swings[1]!.effect);
    const appendix = product.report.body.slice(product.report.body.indexOf('<section class="appendix" id="sensitivity">'));
    expect(appendix.indexOf('<td><code>seriesReactance</code></td><td class="num">1.065263 pu')).toBeLessThan(
      appendix.indexOf('<td><code>lineLength</code></td><td class="num">1.066070 pu'),
    );
  });

  it('adds a sensitivity appendix with a tornado chart before the provenance', () => {
    const body = product.report.body;
    expect(body).toContain('<h2>Appendix D. Sensitivity</h2>');
    expect(body).toContain('<h2>Appendix E. Provenance</h2>');
    expect(body).toMatch(/<figure class="chart"><svg[\s\S]*?Figure 1<\/span> Sensitivity of Open-end voltage/);
  });

  it('calls out, under the criteria summary, the criterion that fails at the high ends of both ranges', () => {
    const summary = product.report.body.slice(product.report.body.indexOf('id="summary"'), product.report.body.indexOf('<main'));
    expect(summary).toContain('Outcome not settled within the uncertainty ranges');
    expect(summary).toContain(
      '<strong>Open-end voltage limit</strong> meets as run but fails with lineLength at its high end (323.2 km), or with seriesReactance at its high end (0.33 Ω/km)',
    );
  });

  it('renders the same report byte for byte when run again, the ends running in parallel', async () => {
    const again = await runSource(lineStudy(), { sensitivity: true });
    expect(again.report.head + again.report.body).toBe(product.report.head + product.report.body);
  });
});

describe('a run without --sensitivity', () => {
  it('has no sensitivity appendix and no sensitivity figures', async () => {
    const product = await runSource(lineStudy());
    expect(product.results.sensitivity).toBeUndefined();
    expect(product.report.body).not.toContain('id="sensitivity"');
  });
});

describe('a criterion that holds across the ranges', () => {
  it('is said to keep its outcome', async () => {
    const product = await runSource(lineStudy().replace('max: 1.068', 'max: 1.1'), { sensitivity: true });
    expect(product.report.body).toContain('no followed criterion changes its outcome');
  });
});

describe('a study that fails at one end of a range', () => {
  it('is refused at the failing line, naming the input and the end', async () => {
    const source = studyText({
      frontMatter: 'sensitivity:\n  inputs:\n    lineLength: { low: -1 %, high: +1 % }\n  results: [Length]',
      inputs: '  lineLength: 320 km',
      body: '```ts\nif (inputs.lineLength.in("km") > 321) throw new Error("longer than the route survey allows");\nresult("Length", inputs.lineLength.in("km"), { unit: "km" });\n```\n',
    });
    const [problem] = await diagnosticsOf(runSource(source, { sensitivity: true }));
    expect(problem?.message).toBe('with lineLength at the high end of its sensitivity range (323.2 km): longer than the route survey allows');
    expect(problem?.at?.line).toBe(lineOf(source, 'throw new Error'));
  });
});
