import { describe, expect, it } from 'vitest';
import { STANDING_CAUTIONS } from '../../src/report/cautions.ts';
import { UNSEALED_NOTICE, assembleReport } from '../../src/report/html.ts';
import { embeddedStudySource } from '../../src/report/embed.ts';
import { TEST_STYLESHEET, runSource, studyText } from '../support/studies.ts';

const source = studyText({
  inputs: '  lineLength: { value: 320 km, min: 10 km, max: 800 km, description: Route length }',
  body: [
    '# Light load',
    '',
    'The line is {{ inputs.lineLength }} long.',
    '',
    '```ts',
    'const lengthKm = inputs.lineLength.in("km");',
    'result("Route length", lengthKm, { unit: "km" });',
    'table([{ caseName: "light", vrPu: 1.0412 }], { caption: "Cases", columns: [{ key: "caseName", label: "Case" }, { key: "vrPu", label: "Vr", unit: "pu", digits: 3 }] });',
    'criterion("Receiving-end voltage", 1.09, { max: 1.05, unit: "pu" });',
    '```',
    '',
    '```ts hide-code',
    'const secret = "hidden code";',
    'result("Shown anyway", 2);',
    '```',
    '',
    '```text',
    'plain <listing>',
    '```',
  ].join('\n'),
});

describe('the HTML report', async () => {
  const product = await runSource(source, { overrides: [{ name: 'lineLength', text: '280 km' }] });
  const html = assembleReport(product.report, UNSEALED_NOTICE);
  // What a reader sees: the report without the study source it carries for checkers.
  const visible = html.replace(/<script[\s\S]*?<\/script>/g, '');

  it('is self-contained: no executable scripts, no external stylesheets, no fetched resources', () => {
    expect(html.match(/<script[^>]*>/g)).toEqual(['<script type="application/json" id="kvarbook-study-source">']);
    expect(html).not.toMatch(/<link |src=["']http|url\(http|@import/);
    expect(html).toContain('<style>');
  });

  it('carries its own study source, byte for byte', () => {
    expect(embeddedStudySource(html)).toBe(source);
  });

  it('opens with the title block and the criteria summary before the study body', () => {
    expect(html.indexOf('class="title-block"')).toBeLessThan(html.indexOf('id="summary"'));
    expect(html.indexOf('id="summary"')).toBeLessThan(html.indexOf('<main'));
    expect(html).toContain('1 of 1 criterion not met');
  });

  it('splices inline values and shows overridden inputs as such', () => {
    expect(html).toContain('<span class="value">280 km</span>');
    expect(html).toContain('overridden (study gives 320 km)');
  });

  it('shows a block’s code and outputs, but hides the code of a hide-code block', () => {
    expect(html).toContain('const lengthKm = inputs.lineLength.in(&quot;km&quot;);');
    expect(visible).not.toContain('hidden code');
    expect(html).toContain('Shown anyway');
  });

  it('escapes what the study writes', () => {
    expect(html).toContain('plain &lt;listing&gt;');
  });

  it('numbers tables and gives column units', () => {
    expect(html).toContain('<span class="label">Table 1</span> Cases');
    expect(html).toContain('Vr<span class="unit">pu</span>');
    expect(html).toContain('<td class="num">1.04</td>');
  });

  it('always carries the standing cautions', () => {
    for (const caution of STANDING_CAUTIONS) expect(html).toContain(caution.text);
  });

  it('lists every result, criterion and solver call in the calculation log with its line', () => {
    const log = html.slice(html.indexOf('id="calculation-log"'), html.indexOf('id="provenance"'));
    expect(log).toContain('result <strong>Route length</strong>');
    expect(log).toContain('criterion <strong>Receiving-end voltage</strong>');
  });

  it('records provenance: versions, hashes and limits', () => {
    const provenance = html.slice(html.indexOf('id="provenance"'));
    expect(provenance).toContain(`<code class="hash">${product.run.study.sourceSha256.match(/.{16}/g)!.join('<wbr>')}</code>`);
    expect(provenance).toContain('0.0.0-test');
    expect(provenance).toContain('s per block');
  });

  it('lets a hash break only between groups of 16 characters', () => {
    expect(TEST_STYLESHEET).toMatch(/\.hash \{[^}]*word-break: keep-all/);
    expect(TEST_STYLESHEET).not.toMatch(/\.hash \{[^}]*break-all/);
  });

  it('never prints NaN or Infinity', () => {
    expect(html).not.toMatch(/NaN|Infinity/);
  });
});

describe('determinism', () => {
  it('gives byte-identical report and results for the same study run twice', async () => {
    const first = await runSource(source);
    const second = await runSource(source);
    expect(assembleReport(second.report, UNSEALED_NOTICE)).toBe(assembleReport(first.report, UNSEALED_NOTICE));
    expect(JSON.stringify(second.results)).toBe(JSON.stringify(first.results));
  });
});
