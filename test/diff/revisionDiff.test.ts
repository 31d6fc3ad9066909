import { beforeAll, describe, expect, it } from 'vitest';
import { resultsJsonText } from '../../src/cli/reportFiles.ts';
import { reportPayload, type ReportPayload } from '../../src/diff/payload.ts';
import { revisionDiff } from '../../src/diff/revisionDiff.ts';
import { UNSEALED_NOTICE, assembleReport } from '../../src/report/html.ts';
import type { InputOverride } from '../../src/study/inputs.ts';
import { diagnosticsOf, runSource, studyText } from '../support/studies.ts';

const BLOCK_ONE =
  'const chargingMvar = 0.4 * inputs.lineLength.in("km");\nresult("Charging", chargingMvar, { unit: "Mvar" });\nresult("Steady", 42, { unit: "kV" });';
const blockTwo = (cautionText: string) => `criterion("Charging limit", chargingMvar, { max: 130, unit: "Mvar" });\ncaution("${cautionText}");`;

function study(options: { revision: number; lengthKm: number; cautionText: string; extraBlock?: string }): string {
  const blocks = [BLOCK_ONE, ...(options.extraBlock ? [options.extraBlock] : []), blockTwo(options.cautionText)];
  return studyText({
    inputs: `  lineLength: ${options.lengthKm} km`,
    body: blocks.map((code) => `\n\`\`\`ts\n${code}\n\`\`\`\n`).join('\nSome prose.\n'),
  }).replace('revision: 1', `revision: ${options.revision}`);
}

async function payloadOf(source: string, path: string, overrides: InputOverride[] = []): Promise<ReportPayload> {
  const product = await runSource(source, { file: 'line.study.md', overrides });
  return reportPayload({
    path,
    html: assembleReport(product.report, UNSEALED_NOTICE),
    results: { text: resultsJsonText(product), from: `${path} results` },
  });
}

/** The same payload with some figures changed, as another run could have given them. */
function withResults(payload: ReportPayload, values: Record<string, number | string>): ReportPayload {
  const results = payload.figures.results.map((result) => (result.name in values ? { ...result, value: values[result.name]! } : result));
  return { ...payload, figures: { ...payload.figures, results } };
}

describe('the revision diff of two report payloads', () => {
  let first: ReportPayload;
  let second: ReportPayload;
  beforeAll(async () => {
    first = await payloadOf(study({ revision: 1, lengthKm: 320, cautionText: 'Old caution' }), 'r1.html');
    second = await payloadOf(study({ revision: 2, lengthKm: 340, cautionText: 'New caution' }), 'r2.html');
  });

  it('is empty for a report against itself', () => {
    const diff = revisionDiff(first, first);
    expect(diff.differences).toBe(0);
    expect({ ...diff, old: null, new: null }).toEqual({
      format: 'kvarbook-diff/1',
      old: null,
      new: null,
      differences: 0,
      frontMatter: [],
      inputs: [],
      results: [],
      criteria: [],
      cautions: { added: [], removed: [] },
      blocks: [],
      environment: [],
    });
  });

  it('lists the changed input once, with its value as given, unit and source on each side', () => {
    expect(revisionDiff(first, second).inputs).toEqual([
      {
        name: 'lineLength',
        change: 'changed',
        old: { given: '320 km', value: 320, unit: 'km', source: 'given' },
        new: { given: '340 km', value: 340, unit: 'km', source: 'given' },
      },
    ]);
  });

  it('lists the moved result once with both values and its absolute and relative change, and not the unchanged one', () => {
    const [charging, ...others] = revisionDiff(first, second).results;
    expect(others).toEqual([]);
    expect(charging).toMatchObject({
      name: 'Charging',
      change: 'moved',
      reason: 'number-moved',
      old: { value: 128, unit: 'Mvar' },
      new: { value: 136, unit: 'Mvar' },
    });
    expect(charging!.difference).toBeCloseTo(8, 12);
    expect(charging!.relativeDifference).toBeCloseTo(8 / 136, 12);
  });

  it('lists the criterion whose outcome flipped once', () => {
    expect(revisionDiff(first, second).criteria).toEqual([
      {
        name: 'Charging limit',
        change: 'flipped',
        old: { value: 128, unit: 'Mvar', passed: true, limits: 'at most 130 Mvar' },
        new: { value: 136, unit: 'Mvar', passed: false, limits: 'at most 130 Mvar' },
      },
    ]);
  });

  it('lists the edited block once, with a line diff of its code', () => {
    const { blocks } = revisionDiff(first, second);
    expect(blocks).toHaveLength(1);
    expect(blocks[0]).toMatchObject({ change: 'changed', old: { position: 2 }, new: { position: 2 } });
    expect(blocks[0]!.hunks.flatMap((hunk) => hunk.lines)).toEqual([
      ' criterion("Charging limit", chargingMvar, { max: 130, unit: "Mvar" });',
      '-caution("Old caution");',
      '+caution("New caution");',
    ]);
  });

  it('lists the cautions added and removed', () => {
    expect(revisionDiff(first, second).cautions).toEqual({ added: ['New caution'], removed: ['Old caution'] });
  });

  it('lists the revision among the front-matter changes', () => {
    expect(revisionDiff(first, second).frontMatter).toEqual([{ field: 'revision', old: '1', new: '2' }]);
  });

  it('counts every entry in its differences', () => {
    // revision, lineLength, Charging, Charging limit, one caution added and one removed, one block.
    expect(revisionDiff(first, second).differences).toBe(7);
  });

  it('shows a block put in between others as added, leaving the blocks around it unchanged', async () => {
    const inserted = await payloadOf(
      study({ revision: 1, lengthKm: 320, cautionText: 'Old caution', extraBlock: 'result("Extra", 1);' }),
      'r1b.html',
    );
    const { blocks, results } = revisionDiff(first, inserted);
    expect(blocks).toEqual([
      {
        change: 'added',
        old: null,
        new: { position: 2, fenceLine: expect.any(Number), options: [] },
        hunks: [expect.objectContaining({ lines: ['+result("Extra", 1);'] })],
      },
    ]);
    expect(results).toMatchObject([{ name: 'Extra', change: 'added', old: null, new: { value: 1 } }]);
  });

  it('lists a block whose code is unchanged but whose options changed, with no line diff', async () => {
    const source = study({ revision: 1, lengthKm: 320, cautionText: 'Old caution' });
    const hidden = await payloadOf(source.replace(/```ts\n(criterion)/, '```ts hide-code\n$1'), 'hidden.html');
    expect(revisionDiff(first, hidden).blocks).toEqual([
      {
        change: 'changed',
        old: expect.objectContaining({ position: 2, options: [] }),
        new: expect.objectContaining({ position: 2, options: ['hide-code'] }),
        hunks: [],
      },
    ]);
  });

  it('shows an overridden input with the value used and the value the front matter gives', async () => {
    const overridden = await payloadOf(study({ revision: 1, lengthKm: 320, cautionText: 'Old caution' }), 'variant.html', [
      { name: 'lineLength', text: '300 km' },
    ]);
    expect(revisionDiff(first, overridden).inputs).toEqual([
      {
        name: 'lineLength',
        change: 'changed',
        old: { given: '320 km', value: 320, unit: 'km', source: 'given' },
        new: { given: '320 km', value: 300, unit: 'km', source: 'overridden' },
      },
    ]);
  });

  it('does not list a figure that moved within its tolerance, as the check would not', () => {
    const nudged = withResults(first, { Charging: 128 * (1 + 1e-12) });
    expect(revisionDiff(first, nudged).results).toEqual([]);
    expect(revisionDiff(first, nudged, { defaultRelativeTolerance: 1e-15 }).results).toHaveLength(1);
  });

  it('sorts moved figures by relative change, largest first, with changed texts after them', () => {
    const moved = withResults(first, { Charging: 129, Steady: 84 });
    expect(revisionDiff(first, moved).results.map((change) => change.name)).toEqual(['Steady', 'Charging']);
    const retitled = withResults(first, { Charging: 'none', Steady: 43 });
    expect(revisionDiff(first, retitled).results.map((change) => [change.name, change.reason])).toEqual([
      ['Steady', 'number-moved'],
      ['Charging', 'kind-changed'],
    ]);
  });

  it('refuses, with its code, a report whose results come from another study source', async () => {
    const product = await runSource(study({ revision: 1, lengthKm: 320, cautionText: 'Old caution' }), { file: 'line.study.md' });
    const other = await runSource(study({ revision: 2, lengthKm: 340, cautionText: 'New caution' }), { file: 'line.study.md' });
    const problems = await diagnosticsOf(() =>
      reportPayload({
        path: 'mixed.html',
        html: assembleReport(product.report, UNSEALED_NOTICE),
        results: { text: resultsJsonText(other), from: 'other.json' },
      }),
    );
    expect(problems).toMatchObject([{ code: 'diff-figures-mismatch', message: expect.stringContaining('mixed.html') }]);
  });

  it('refuses, with its code and the member, a results document of the wrong shape', async () => {
    const product = await runSource(study({ revision: 1, lengthKm: 320, cautionText: 'Old caution' }), { file: 'line.study.md' });
    const document = JSON.parse(resultsJsonText(product));
    document.results[0].value = null;
    const problems = await diagnosticsOf(() =>
      reportPayload({
        path: 'r1.html',
        html: assembleReport(product.report, UNSEALED_NOTICE),
        results: { text: JSON.stringify(document), from: 'r1.results.json' },
      }),
    );
    expect(problems).toMatchObject([
      { code: 'diff-figures-malformed', message: expect.stringContaining('r1.results.json is not a kvarbook results document: results.0.value') },
    ]);
  });
});
