// Guards refactoring: the demo and every template render to exactly the report and results they rendered before.
import { readFileSync } from 'node:fs';
import { basename, relative, resolve } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runStudy } from '../../src/pipeline.ts';
import { UNSEALED_NOTICE, assembleReport } from '../../src/report/html.ts';
import { resultsJsonText } from '../../src/cli/reportFiles.ts';
import { reportStylesheet } from '../../src/cli/environment.ts';

const ROOT = resolve(import.meta.dirname, '../..');
const STUDIES = [
  'studies/caldera-bay-400kv.study.md',
  'templates/blank.study.md',
  'templates/light-load.study.md',
  'templates/peak-load.study.md',
  'templates/series-compensation.study.md',
  'templates/options.study.md',
];
// Fixed facts in place of the installation's, so the expected files do not change with a version bump.
const ENVIRONMENT = { kvarbookVersion: 'golden', nodeVersion: 'golden', lockfileSha256: '0'.repeat(64) };

// A deliberate change of the report is accepted with `npx vitest run test/golden -u` and reviewed in the diff.
describe.each(STUDIES)('%s', (study) => {
  const name = basename(study, '.study.md');
  it('renders the report byte for byte as recorded', { timeout: 120_000 }, async () => {
    const product = await runStudy({
      file: relative(ROOT, resolve(ROOT, study)),
      source: readFileSync(resolve(ROOT, study), 'utf8'),
      overrides: [],
      typecheck: true,
      environment: ENVIRONMENT,
      stylesheet: reportStylesheet(),
    });
    await expect(assembleReport(product.report, UNSEALED_NOTICE)).toMatchFileSnapshot(`./expected/${name}.html`);
    await expect(resultsJsonText(product)).toMatchFileSnapshot(`./expected/${name}.results.json`);
  });
});
