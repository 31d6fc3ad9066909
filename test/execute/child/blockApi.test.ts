// The block API a study's blocks call (src/execute/child/blockApi.ts): results, criteria, tables, inputs, cautions.
import { describe, expect, it } from 'vitest';
import { diagnosticsOf, lineOf, runSource, studyText } from '../../support/studies.ts';

const fence = (code: string, options = '') => `\`\`\`ts${options ? ` ${options}` : ''}\n${code}\n\`\`\``;

describe('figures a block records', () => {
  it('refuses a NaN result, naming it', async () => {
    const source = studyText({ body: fence('result("broken ratio", 0 / 0);') });
    const [problem] = await diagnosticsOf(runSource(source));
    expect(problem?.code).toBe('block-non-finite');
    expect(problem?.message).toContain('broken ratio');
    expect(problem?.at?.line).toBe(lineOf(source, 'broken ratio'));
  });

  it('refuses an infinite criterion value', async () => {
    const source = studyText({ body: fence('criterion("margin", 1 / 0, { min: 0 });') });
    const [problem] = await diagnosticsOf(runSource(source));
    expect(problem?.code).toBe('block-non-finite');
  });

  it('refuses a duplicate result name', async () => {
    const source = studyText({ body: fence('result("Vr", 1);\nresult("Vr", 2);') });
    const [problem] = await diagnosticsOf(runSource(source));
    expect(problem?.code).toBe('block-result-duplicate');
    expect(problem?.at?.line).toBe(lineOf(source, 'result("Vr", 2)'));
  });

  it('refuses a NaN table cell, naming the row and column', async () => {
    const source = studyText({ body: fence('table([{ caseName: "light", vrPu: NaN }], { caption: "Cases" });') });
    const [problem] = await diagnosticsOf(runSource(source));
    expect(problem?.message).toContain('row 1');
    expect(problem?.message).toContain('vrPu');
  });

  it('records a criterion as met or not met against its limits', async () => {
    const source = studyText({
      body: fence('criterion("inside", 1.02, { min: 0.95, max: 1.05, unit: "pu" });\ncriterion("above", 1.09, { max: 1.05, unit: "pu" });'),
    });
    const product = await runSource(source);
    expect(product.results.criteria.map((c) => [c.name, c.passed])).toEqual([
      ['inside', true],
      ['above', false],
    ]);
  });

  it('reads an input in the unit the block asks for', async () => {
    const source = studyText({
      inputs: '  nominalVoltage: 400 kV',
      body: fence('result("volts", inputs.nominalVoltage.in("V"));\nresult("si", inputs.nominalVoltage.si);'),
    });
    const product = await runSource(source);
    expect(product.results.results.map((r) => r.value)).toEqual([400_000, 400_000]);
  });

  it('refuses to read an input in a unit of another dimension', async () => {
    const source = studyText({ inputs: '  nominalVoltage: 400 kV', body: fence('inputs.nominalVoltage.in("km");') });
    const [problem] = await diagnosticsOf(runSource(source));
    expect(problem?.message).toContain('nominalVoltage');
  });

  it('records cautions from blocks after the standing ones', async () => {
    const source = studyText({ body: fence('caution("Energise the reactor before closing the line breaker.");') });
    const cautions = (await runSource(source)).results.cautions;
    expect(cautions.at(-1)).toMatchObject({ text: 'Energise the reactor before closing the line breaker.', standing: false });
    expect(cautions.filter((c) => c.standing).length).toBeGreaterThanOrEqual(3);
  });
});
