// The sampled run: a given number of samples drawn uniformly within the ranges from a fixed seed, the same on every run.
import { beforeAll, describe, expect, it } from 'vitest';
import type { RunProduct } from '../../src/pipeline.ts';
import { samplesOf } from '../../src/sensitivity/variants.ts';
import { parseStudy } from '../../src/study/parse.ts';
import { effectiveInputs } from '../../src/study/inputs.ts';
import { runSource } from '../support/studies.ts';
import { DEFAULT_SENSITIVITY, SHUNT_SUSCEPTANCE_US_PER_KM, lineStudy } from './lineStudy.ts';

const sampledStudy = (seed: number) => lineStudy(`${DEFAULT_SENSITIVITY}\n  samples: 12\n  seed: ${seed}`);

function drawn(seed: number) {
  const study = parseStudy('line.study.md', sampledStudy(seed));
  return samplesOf(study.sensitivity!, effectiveInputs(study.inputs, []));
}

describe('the samples of a sampled run', () => {
  it('draw every ranged input inside its range, once per sample', () => {
    const samples = drawn(7);
    expect(samples).toHaveLength(12);
    for (const sample of samples) {
      const [length, reactance] = sample.quantities;
      expect(length!.input).toBe('lineLength');
      expect(length!.quantity.value).toBeGreaterThanOrEqual(320 * 0.99);
      expect(length!.quantity.value).toBeLessThan(320 * 1.01);
      expect(reactance!.quantity.value).toBeGreaterThanOrEqual(0.31);
      expect(reactance!.quantity.value).toBeLessThan(0.33);
    }
  });

  it('are the same for the same seed and differ for another', () => {
    expect(drawn(7)).toEqual(drawn(7));
    expect(drawn(8)[0]!.quantities[0]!.quantity.value).not.toBe(drawn(7)[0]!.quantities[0]!.quantity.value);
  });
});

describe('a sampled run of the lossless line', () => {
  let product: RunProduct;
  beforeAll(async () => {
    product = await runSource(sampledStudy(7), { sensitivity: true });
  });

  it("gives each followed result's spread inside the values at the ends of the ranges", () => {
    const sampled = product.results.sensitivity!.sampled!;
    const [spread] = sampled.results;
    // The open-end voltage 1/cos(βl), β = sqrt(x b), rises with both length and reactance (Glover, Sarma & Overbye, 5th ed.,
    // sec. 5.4; from memory), so no sample can lie beyond the corners where both inputs are at their low or their high ends.
    const rise = (lengthKm: number, reactanceOhmPerKm: number) =>
      1 / Math.cos(Math.sqrt(reactanceOhmPerKm * SHUNT_SUSCEPTANCE_US_PER_KM * 1e-6) * lengthKm);
    expect(spread!.min).toBeGreaterThanOrEqual(rise(320 * 0.99, 0.31));
    expect(spread!.max).toBeLessThanOrEqual(rise(320 * 1.01, 0.33));
    expect(spread!.min).toBeLessThanOrEqual(spread!.percentile5);
    expect(spread!.percentile5).toBeLessThanOrEqual(spread!.mean);
    expect(spread!.mean).toBeLessThanOrEqual(spread!.percentile95);
    expect(spread!.percentile95).toBeLessThanOrEqual(spread!.max);
    expect(spread!.standardDeviation).toBeGreaterThan(0);
  });

  it('gives the probability that each followed criterion is met as the share of samples that meet it', () => {
    const [criterion] = product.results.sensitivity!.sampled!.criteria;
    expect(criterion!.probability).toBe(criterion!.met / 12);
    expect(criterion!.met).toBeGreaterThan(0);
    expect(criterion!.met).toBeLessThan(12);
    expect(product.report.body).toContain(`<td class="num">${criterion!.met} of 12</td>`);
  });

  it('renders the same report and results byte for byte when run again', async () => {
    const again = await runSource(sampledStudy(7), { sensitivity: true });
    expect(again.report.head + again.report.body).toBe(product.report.head + product.report.body);
    expect(JSON.stringify(again.results)).toBe(JSON.stringify(product.results));
  });
});
