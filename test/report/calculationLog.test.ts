// The calculation log: every value of every solver call in full, long arrays pointed to in results.json, which holds every call whole.
import { describe, expect, it } from 'vitest';
import { diagnosticsOf, lineOf, runSource, studyText } from '../support/studies.ts';

const longLabel = `Northmoor – Caldera Bay ${'section '.repeat(40)}end`;
const source = studyText({
  body: [
    '```ts',
    `const line = solver.lineModel({ frequencyHz: 50, seriesResistanceOhmPerKm: 0.03, seriesReactanceOhmPerKm: 0.33, shuntSusceptanceUsPerKm: 3.5, lengthKm: 300, model: "distributed", label: ${JSON.stringify(longLabel)} });`,
    'const curve = solver.pvCurve({ network: line, sendingVoltageKv: 400, powerFactor: 0.95, powerFactorSense: "lagging", pointCount: 20 });',
    'result("Nose", curve.nose.pMw, { unit: "MW" });',
    '```',
  ].join('\n'),
});

describe('the calculation log', async () => {
  const product = await runSource(source);
  const html = product.report.body;
  const log = html.slice(html.indexOf('id="calculation-log"'), html.indexOf('id="provenance"'));
  const calls = product.run.outcome.blocks.flatMap((block) => block.records).filter((record) => record.kind === 'solver-call');

  it('never cuts a text: a long label is shown whole', () => {
    expect(log).toContain(longLabel);
    expect(log).not.toContain('…');
  });

  it('gives every number a solver returned to 15 significant figures, a two-port it made with its ABCD parameters', () => {
    const lineCall = calls[0] as { returnedSummary: { A: { re: number } } };
    const exact = lineCall.returnedSummary.A.re;
    expect(String(exact).length).toBeGreaterThan(8);
    expect(log).toContain(String(Number(exact.toPrecision(15))));
  });

  it('names a long array by its size and the place results.json holds it whole, never by its ends', () => {
    expect(log).not.toMatch(/\d+ values: /);
    const pointer = /\((\d+) items, in full in results\.json: solverCallLog step (\d+), returned\.upperBranch\)/.exec(log);
    expect(pointer).not.toBeNull();
    const [, count, step] = pointer!;
    const entry = product.results.solverCallLog.find((call) => call.step === Number(step));
    expect(entry?.functionName).toBe('pvCurve');
    expect((entry!.returned as { upperBranch: unknown[] }).upperBranch).toHaveLength(Number(count));
  });

  it('keeps the full arrays in the solver calls it records, for results and checkers alike', () => {
    const curveCall = calls[1] as { returnedSummary: { upperBranch: unknown[] } };
    expect(Array.isArray(curveCall.returnedSummary.upperBranch)).toBe(true);
    expect(curveCall.returnedSummary.upperBranch.length).toBeGreaterThan(7);
  });
});

describe('a value the calculation log cannot record whole', () => {
  it('is refused at the solver call with a located error, not cut', async () => {
    const looped = studyText({
      body: [
        '```ts',
        'const options: Record<string, unknown> = { frequencyHz: 50, seriesResistanceOhmPerKm: 0.03, seriesReactanceOhmPerKm: 0.3, shuntSusceptanceUsPerKm: 4, lengthKm: 100 };',
        'options.self = options;',
        'solver.lineModel(options as never);',
        '```',
      ].join('\n'),
    });
    const [problem] = await diagnosticsOf(runSource(looped));
    expect(problem).toMatchObject({ code: 'block-output-limit', at: { line: lineOf(looped, 'solver.lineModel') } });
    expect(problem?.message).toContain('solver.lineModel: the calculation log records every value in full, and its arguments cannot be recorded');
  });
});
