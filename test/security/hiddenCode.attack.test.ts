// Attacks by a hide-code block on what the shown blocks mean: every object the block API hands out, and the
// sandbox's own built-ins, are frozen, so hidden code can compute values but cannot change how shown code computes.
import { describe, expect, it } from 'vitest';
import { UNSEALED_NOTICE, assembleReport } from '../../src/report/html.ts';
import { diagnosticsOf, lineOf, runSource, studyText } from '../support/studies.ts';

const fence = (code: string, options = '') => `\`\`\`ts${options ? ` ${options}` : ''}\n${code}\n\`\`\``;

/** A hidden block with `attack`, then a shown block that relies on what the attack targets. */
function hiddenThenShown(attack: string, shown: string): string {
  return studyText({
    inputs: '  lineLength: 380 km',
    body: ['# Hidden', '', fence(attack, 'hide-code'), '', '# Shown', '', fence(shown)].join('\n'),
  });
}

/** The attack must be refused at its own line; a refusal elsewhere would mean the shown block saw the change. */
async function expectRefusedAt(source: string, attackLine: string): Promise<void> {
  const [problem] = await diagnosticsOf(runSource(source));
  expect(problem?.at?.line, JSON.stringify(problem)).toBe(lineOf(source, attackLine));
  expect(problem?.message).toMatch(/read only|not extensible|Cannot (assign|add|define|redefine)|object is frozen/i);
}

describe('a hidden block cannot change what the block API hands out', () => {
  it("cannot make an input's .in() return three quarters of its value", async () => {
    const source = hiddenThenShown(
      'const inputPrototype = Object.getPrototypeOf(inputs.lineLength);\nconst original = inputPrototype.in;\ninputPrototype.in = function (unit: string) { return 0.75 * original.call(this, unit); };',
      "result('Route length', inputs.lineLength.in('km'), { unit: 'km' });",
    );
    await expectRefusedAt(source, 'inputPrototype.in = function');
  });

  it('cannot replace how a figure is written in the text', async () => {
    const source = hiddenThenShown(
      "const figurePrototype = Object.getPrototypeOf(figure(1, 'km'));\nfigurePrototype.toString = () => '285 km';",
      "const lengthFigure = result('Route length', inputs.lineLength.in('km'), { unit: 'km' });",
    );
    await expectRefusedAt(source, 'figurePrototype.toString');
  });

  it('cannot change the value of a figure an earlier block recorded', async () => {
    const source = studyText({
      body: [
        fence("const shownLength = result('Route length', 380, { unit: 'km' });"),
        fence('(shownLength as any).value = 285;', 'hide-code'),
        'Shown: {{ shownLength }}',
      ].join('\n\n'),
    });
    await expectRefusedAt(source, '(shownLength as any).value = 285');
  });

  it('cannot add its own call() to a block-API function', async () => {
    const source = hiddenThenShown('(result as any).call = () => undefined;', "result.call(undefined, 'x', 1);");
    await expectRefusedAt(source, '(result as any).call');
  });

  it('cannot swap a solver function for its own', async () => {
    const source = hiddenThenShown(
      '(solver as any).polarForm = () => ({ magnitude: 0, angleDeg: 0 });',
      "result('m', solver.polarForm({ value: { re: 3, im: 4 } }).magnitude);",
    );
    await expectRefusedAt(source, '(solver as any).polarForm =');
  });

  it('cannot add properties to a solver function', async () => {
    const source = hiddenThenShown(
      '(solver.polarForm as any).apply = () => ({ magnitude: 0 });',
      "result('m', solver.polarForm.apply(undefined, [{ value: { re: 3, im: 4 } }]).magnitude);",
    );
    await expectRefusedAt(source, '(solver.polarForm as any).apply');
  });

  it('cannot change the prototype of the solver error class', async () => {
    const source = hiddenThenShown("(solver.SolverDomainError as any).prototype.toString = () => 'all fine';", "result('one', 1);");
    await expectRefusedAt(source, '(solver.SolverDomainError as any).prototype.toString');
  });

  it('cannot change a solver result a shown block goes on to use', async () => {
    const source = studyText({
      body: [
        fence('const polar = solver.polarForm({ value: { re: 3, im: 4 } });'),
        fence('(polar as any).magnitude = 4;', 'hide-code'),
        fence("result('Magnitude', polar.magnitude);"),
      ].join('\n\n'),
    });
    await expectRefusedAt(source, '(polar as any).magnitude = 4');
  });

  it('cannot change a nested part of a solver result', async () => {
    const source = studyText({
      body: [
        fence(
          'const line = solver.lineModel({ frequencyHz: 50, seriesResistanceOhmPerKm: 0.03, seriesReactanceOhmPerKm: 0.32, shuntSusceptanceUsPerKm: 3.6, lengthKm: 380 });',
        ),
        fence('(line as any).A.re = 1;', 'hide-code'),
        fence("result('A', line.A.re);"),
      ].join('\n\n'),
    });
    await expectRefusedAt(source, '(line as any).A.re = 1');
  });

  it('cannot swap a chart builder', async () => {
    const source = hiddenThenShown('(charts as any).loadabilityChart = () => ({});', "result('one', 1);");
    await expectRefusedAt(source, '(charts as any).loadabilityChart');
  });

  it('cannot replace console.log', async () => {
    const source = hiddenThenShown('(console as any).log = () => undefined;', "console.log('shown');");
    await expectRefusedAt(source, '(console as any).log');
  });
});

describe("a hidden block cannot change the sandbox's built-ins", () => {
  it('cannot replace Math.sqrt', async () => {
    const source = hiddenThenShown('(Math as any).sqrt = () => 2;', "result('root', Math.sqrt(9));");
    await expectRefusedAt(source, '(Math as any).sqrt');
  });

  it('cannot replace the Math object itself', async () => {
    const source = hiddenThenShown('(globalThis as any).Math = { sqrt: () => 2 };', "result('root', Math.sqrt(9));");
    await expectRefusedAt(source, '(globalThis as any).Math');
  });

  it('cannot change Array.prototype.map', async () => {
    const source = hiddenThenShown(
      '(Array.prototype as any).map = function () { return [0]; };',
      "result('sum', [1, 2].map((x) => x * 2).reduce((a, b) => a + b, 0));",
    );
    await expectRefusedAt(source, '(Array.prototype as any).map');
  });

  it('cannot change Number.prototype.toFixed', async () => {
    const source = hiddenThenShown("(Number.prototype as any).toFixed = () => '0';", "result('text', (1.5).toFixed(1));");
    await expectRefusedAt(source, '(Number.prototype as any).toFixed');
  });

  it('cannot change the prototype of async functions', async () => {
    const source = hiddenThenShown('(Object.getPrototypeOf(async () => {}) as any).extra = 1;', "result('one', 1);");
    await expectRefusedAt(source, 'Object.getPrototypeOf(async () => {})');
  });

  it('still lets a block compute with built-ins and its own classes', async () => {
    const source = studyText({
      body: fence(
        [
          'class Section { constructor(readonly lengthKm: number) {} toString() { return `${this.lengthKm} km`; } }',
          'const sections = [new Section(120), new Section(260)];',
          'const lengths = new Map(sections.map((section) => [String(section), section.lengthKm]));',
          "result('Total length', [...lengths.values()].reduce((sum, value) => sum + value, 0), { unit: 'km' });",
          "result('Longest', Math.max(...sections.map((section) => section.lengthKm)), { unit: 'km' });",
        ].join('\n'),
      ),
    });
    const product = await runSource(source);
    expect(product.results.results.map((entry) => entry.value)).toEqual([380, 260]);
  });
});

describe('the report says where hidden code is', () => {
  it('states in the title block how many blocks hide their code, and at which lines', async () => {
    const source = studyText({
      body: [fence('const a = 1;', 'hide-code'), fence("result('shown', a);"), fence('const b = 2;', 'hide-code')].join('\n\n'),
    });
    const product = await runSource(source);
    const html = assembleReport(product.report, UNSEALED_NOTICE);
    const titleBlock = html.slice(html.indexOf('class="title-block"'), html.indexOf('</header>'));
    const fences = source.split('\n').flatMap((line, index) => (line === '```ts hide-code' ? [index + 1] : []));
    expect(titleBlock).toContain(`2 calculation blocks hide their code (study lines ${fences[0]} and ${fences[1]})`);
    expect(titleBlock).toContain('carried in this report');
  });

  it('states that no code is hidden when every block shows its code', async () => {
    const product = await runSource(studyText({ body: fence("result('shown', 1);") }));
    const html = assembleReport(product.report, UNSEALED_NOTICE);
    expect(html.slice(html.indexOf('class="title-block"'), html.indexOf('</header>'))).toContain('none: every calculation block shows its code');
  });
});
