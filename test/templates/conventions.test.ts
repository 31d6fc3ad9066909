// What every study template keeps to: it marks its example values, so that a study started from it shows what to replace,
// and it defines every criterion its report judges.
import { readFileSync } from 'node:fs';
import { resolve } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { templateNames } from '../../src/cli/templateFiles.ts';
import { parseStudy } from '../../src/study/parse.ts';
import { type TemplateRun, runTemplate } from '../support/templateRun.ts';

describe.each(templateNames())('the %s template', (name) => {
  const file = `${name}.study.md`;
  const study = parseStudy(file, readFileSync(resolve(import.meta.dirname, '../../templates', file), 'utf8'));

  it('describes every input as "Example: …", the convention that marks a value to replace', () => {
    expect(study.inputs.length).toBeGreaterThan(0);
    expect(study.inputs.filter((input) => !input.description?.startsWith('Example: ')).map((input) => input.name)).toEqual([]);
  });

  it('says in its front matter what the example marking means', () => {
    expect(study.source.split('\n---')[0]).toMatch(/^# .*"Example:"/m);
  });

  describe('run as it stands', () => {
    let run: TemplateRun;
    beforeAll(async () => {
      run = await runTemplate(name);
    }, 240_000);

    it('states for every criterion of its report what it measures and on what basis its limit rests', () => {
      const criteria = run.product.results.criteria;
      expect(criteria.length).toBeGreaterThan(0);
      expect(criteria.filter((entry) => !entry.measures?.trim() || !entry.basis?.trim()).map((entry) => entry.name)).toEqual([]);
    });
  });
});
