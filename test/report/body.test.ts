import { describe, expect, it } from 'vitest';
import { UNSEALED_NOTICE, assembleReport } from '../../src/report/html.ts';
import { diagnosticsOf, lineOf, runSource, studyText, TEST_STYLESHEET } from '../support/studies.ts';

async function reportOf(source: string): Promise<string> {
  const product = await runSource(source);
  return assembleReport(product.report, UNSEALED_NOTICE);
}

/** The study body as the report renders it, between <main> and </main>. */
function mainOf(html: string): string {
  return html.slice(html.indexOf('<main'), html.indexOf('</main>'));
}

function sectionOf(html: string, id: string): string {
  const start = html.indexOf(`id="${id}"`);
  return html.slice(start, html.indexOf('</section>', start));
}

const calculation = studyText({
  inputs: '  angleLimit: { value: 30 deg, quantity: angle, description: Largest angle across the line }',
  body: [
    '# Line data',
    '',
    '```ts',
    'result("Surge impedance", 255.2, { unit: "ohm" });',
    'table([{ what: "first", lengthKm: 50 }, { what: "second", lengthKm: 100 }], { caption: "Sections", columns: [{ key: "what", label: "Section" }, { key: "lengthKm", label: "Length", unit: "km", digits: 3 }] });',
    'result("Electrical length", 23.04, { unit: "deg", digits: 3 });',
    'criterion("Angle across the line", 21.5, { max: inputs.angleLimit.in("deg"), unit: "deg", digits: 3, measures: "the angle between the sending- and receiving-end voltages at the peak", basis: "planning standard TS-4, clause 3 (invented for this test)" });',
    '```',
    '',
    'Between the blocks.',
    '',
    '```ts',
    'result("Shunt susceptance", 4.331, { unit: "uS/km" });',
    'table([{ a: 0.978, b: 50 }, { a: 1.15, b: 100 }, { a: 1.0412, b: 7.5 }], { caption: "Mixed", columns: [{ key: "a", label: "Voltage", unit: "pu", digits: 3 }, { key: "b", label: "Rating", unit: "Mvar", digits: 3 }] });',
    'table([{ what: "resistance", value: 0.01615 }, { what: "distance", value: 14.49 }], { columns: [{ key: "what", label: "Quantity" }, { key: "value", label: "Value" }] });',
    'table([{ r: 0.2691, x: 0.3 }, { r: 0.01646, x: 0.4 }], { columns: [{ key: "r", label: "R", unit: "ohm/km" }, { key: "x", label: "X", unit: "ohm/km" }] });',
    'result("Capacitor voltage at rated current", 54.4, { unit: "kV rms" });',
    'result("Varistor protective level", 176.9, { unit: "kV peak" });',
    '```',
  ].join('\n'),
});

describe('the outputs of a block', async () => {
  const html = await reportOf(calculation);
  const main = mainOf(html);

  it('appear in the order the block produced them, not grouped by kind', () => {
    const first = main.indexOf('Surge impedance');
    const table = main.indexOf('<span class="label">Table 1</span>');
    const second = main.indexOf('Electrical length');
    expect(first).toBeGreaterThan(0);
    expect(first).toBeLessThan(table);
    expect(table).toBeLessThan(second);
  });
});

describe('a table column', async () => {
  const html = await reportOf(calculation);

  it('writes every number of one column with the same decimals, set by the column’s values and its digits', () => {
    const mixed = html.slice(html.indexOf('Mixed</'), html.indexOf('</table>', html.indexOf('Mixed</')));
    const cells = [...mixed.matchAll(/<td class="num">([^<]*)<\/td>/g)].map((match) => match[1]);
    // Rows alternate the two columns: voltage, rating. 7.5 keeps two figures, so the ratings take one decimal.
    expect(cells).toEqual(['0.98', '50.0', '1.15', '100.0', '1.04', '7.5']);
  });

  it('keeps each value’s own figures in a column that spans several decades', () => {
    expect(html).toContain('<td class="num">0.01615</td>');
    expect(html).toContain('<td class="num">14.49</td>');
  });

  it('keeps the significant figures of a column whose largest value is small', () => {
    expect(html).toContain('<td class="num">0.2691</td><td class="num">0.3000</td>');
    expect(html).toContain('<td class="num">0.0165</td><td class="num">0.4000</td>');
  });
});

describe('units in the report', async () => {
  const html = await reportOf(calculation);
  const main = mainOf(html);

  it('are written as the trade writes them: Ω, µS/km and °', () => {
    expect(main).toContain('255.2 Ω');
    expect(main).toContain('4.331 µS/km');
    expect(main).toContain('23.0°');
    expect(main).toContain('R<span class="unit">Ω/km</span>');
    expect(main).not.toMatch(/\bohm|\buS\b|\bdeg\b/);
  });

  it('show an input’s unit the same way in the inputs table', () => {
    expect(sectionOf(html, 'inputs')).toContain('<td class="num">30°</td>');
  });

  it('say rms or peak where a result states which it is', () => {
    expect(main).toContain('54.40 kV rms');
    expect(main).toContain('176.9 kV peak');
  });

  it('refuse rms or peak on a unit that is neither a voltage nor a current', async () => {
    const source = studyText({ body: ['```ts', 'result("Transfer", 1100, { unit: "MW peak" });', '```'].join('\n') });
    const [problem] = await diagnosticsOf(runSource(source));
    expect(problem?.code).toBe('block-unit');
    expect(problem?.message).toContain('"MW peak"');
  });
});

describe('the calculation code', async () => {
  const html = await reportOf(calculation);
  const main = mainOf(html);
  const appendix = sectionOf(html, 'calculations');

  it('is in an appendix by default, the body keeping the outputs and a reference to the code', () => {
    expect(main).not.toContain('<pre class="calc">');
    expect(main).toContain('Surge impedance');
    expect(main).toContain(`Calculation A1, study line ${lineOf(calculation, '```ts')}: code in Appendix A`);
    expect(main).toContain('Calculation A2, study line');
  });

  it('lists every block in the appendix with its number and study line', () => {
    expect(appendix).toContain('Appendix A. Calculations');
    expect(appendix).toContain(`Calculation A1</span> study line ${lineOf(calculation, '```ts')}`);
    expect(appendix).toContain('result(&quot;Surge impedance&quot;, 255.2, { unit: &quot;ohm&quot; });');
    expect(appendix).toContain('Calculation A2</span> study line');
    expect(html).toContain('<a href="#calculations">Appendix A. Calculations</a>');
    expect(main).toContain('href="#calculation-A1"');
    expect(appendix).toContain('id="calculation-A1"');
  });

  it('stays beside its outputs with report: { code: inline }', async () => {
    const inline = await reportOf(calculation.replace('---\n# Line data', 'report: { code: inline }\n---\n# Line data'));
    expect(mainOf(inline)).toContain('<pre class="calc"><code>result(&quot;Surge impedance&quot;');
    expect(inline).not.toContain('id="calculations"');
  });

  it('refuses an unknown place for the code, at its line in the front matter', async () => {
    const source = calculation.replace('---\n# Line data', 'report: { code: sideways }\n---\n# Line data');
    const [problem] = await diagnosticsOf(runSource(source));
    expect(problem?.code).toBe('front-matter-range');
    expect(problem?.message).toContain('"sideways"');
    expect(problem?.hint).toContain('appendix');
    expect(problem?.at?.line).toBe(lineOf(source, 'code: sideways'));
  });
});

describe('the design criteria section', async () => {
  const html = await reportOf(calculation);
  const criteria = sectionOf(html, 'criteria');

  it('defines each criterion: what it measures, its limits and its basis', () => {
    expect(criteria).toContain('the angle between the sending- and receiving-end voltages at the peak');
    expect(criteria).toContain('at most 30°');
    expect(criteria).toContain('planning standard TS-4, clause 3 (invented for this test)');
  });

  it('says so where a criterion states neither what it measures nor its basis', async () => {
    const bare = await reportOf(studyText({ body: ['```ts', 'criterion("Voltage", 1.01, { max: 1.05, unit: "pu" });', '```'].join('\n') }));
    expect(sectionOf(bare, 'criteria')).toContain(
      '<tr><td>Voltage</td><td><span class="quiet">not stated</span></td><td>at most 1.05 pu</td><td><span class="quiet">not stated</span></td></tr>',
    );
  });
});

describe('page breaks', async () => {
  const html = await reportOf(calculation);

  it('keep a table and its caption in one figure', () => {
    expect(html).toMatch(/<figure class="table"><figcaption><span class="label">Table 1<\/span> Sections<\/figcaption><table class="data">/);
  });

  it('are avoided inside figures, the contents and the title block, and after headings and captions', () => {
    const rule = (selector: string) => new RegExp(`${selector.replace(/[.*]/g, '\\$&')}[^{]*\\{[^}]*break-inside: avoid`);
    expect(TEST_STYLESHEET).toMatch(rule('figure.table'));
    expect(TEST_STYLESHEET).toMatch(rule('.contents'));
    expect(TEST_STYLESHEET).toMatch(rule('.title-block'));
    expect(TEST_STYLESHEET).toMatch(/h1, h2, h3, h4, h5, h6 \{[^}]*break-after: avoid/);
  });
});
