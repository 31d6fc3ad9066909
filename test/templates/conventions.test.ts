// What every study template keeps to: it marks its example values, so that a study started from it shows what to replace.
import { readFileSync } from 'node:fs';
import { resolve } from 'node:path';
import { describe, expect, it } from 'vitest';
import { templateNames } from '../../src/cli/newCommand.ts';
import { parseStudy } from '../../src/study/parse.ts';

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
});
