// The sensitivity figures as the seal signs them: stable names, units, and the result's own tolerance kept.
import { describe, expect, it } from 'vitest';
import { type SensitivityOutcome, sensitivityFigures } from '../../src/sensitivity/outcome.ts';

const outcome: SensitivityOutcome = {
  runs: 2,
  inputs: [
    {
      input: 'lineLength',
      declared: '-1 % to +1 %',
      asRun: { value: 320, unit: 'km' },
      low: { value: 316.8, unit: 'km' },
      high: { value: 323.2, unit: 'km' },
    },
  ],
  results: [
    {
      name: 'Reactor rating',
      unit: 'Mvar',
      digits: 4,
      tolerance: 1e-6,
      asRun: 150,
      swings: [{ input: 'lineLength', low: 148, high: 152, effect: 4 }],
    },
  ],
  criteria: [],
  sampled: {
    samples: 10,
    seed: 1,
    results: [
      {
        name: 'Reactor rating',
        unit: 'Mvar',
        digits: 4,
        tolerance: 1e-6,
        mean: 150,
        standardDeviation: 1,
        min: 148,
        percentile5: 148,
        percentile95: 152,
        max: 152,
      },
    ],
    criteria: [],
  },
};

describe('sensitivity figures', () => {
  it("keep a result's own tolerance for a checker at each end of each range", () => {
    const figures = sensitivityFigures(outcome);
    expect(figures.find((figure) => figure.name === 'sensitivity: "Reactor rating" with lineLength at its low end')).toEqual({
      name: 'sensitivity: "Reactor rating" with lineLength at its low end',
      value: 148,
      unit: 'Mvar',
      tolerance: 1e-6,
    });
  });

  it('give the spread of a sampled run no tolerance of the result, whose values it is not', () => {
    const figures = sensitivityFigures(outcome);
    expect(figures.find((figure) => figure.name === 'sampled: "Reactor rating" standardDeviation')?.tolerance).toBeUndefined();
    expect(figures.find((figure) => figure.name === 'sampled: "Reactor rating" mean')?.tolerance).toBe(1e-6);
  });

  it('name every figure once', () => {
    const names = sensitivityFigures(outcome).map((figure) => figure.name);
    expect(new Set(names).size).toBe(names.length);
  });
});
