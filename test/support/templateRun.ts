// Running a template in this process and reading its inputs, results and criteria by name.
import { readFileSync } from 'node:fs';
import { resolve } from 'node:path';
import type { RunProduct } from '../../src/pipeline.ts';
import { runSource } from './studies.ts';

export interface TemplateRun {
  product: RunProduct;
  source: string;
  /** An input's value in the unit the template gives it in (refused if the template uses another unit). */
  input(name: string, unit: string): number;
  result(name: string): number;
  criterionPassed(name: string): boolean;
}

export async function runTemplate(name: string): Promise<TemplateRun> {
  const source = readFileSync(resolve(import.meta.dirname, '../../templates', `${name}.study.md`), 'utf8');
  const product = await runSource(source, { file: `${name}.study.md` });
  const { inputs, results, criteria } = product.results;
  return {
    product,
    source,
    input(inputName, unit) {
      const found = inputs.find((entry) => entry.name === inputName);
      if (!found) throw new Error(`the template has no input ${inputName}`);
      if (found.unit !== unit) throw new Error(`input ${inputName} is in ${found.unit}, not ${unit}`);
      return found.value;
    },
    result(resultName) {
      const found = results.find((entry) => entry.name === resultName);
      if (!found || typeof found.value !== 'number') throw new Error(`the template has no numeric result "${resultName}"`);
      return found.value;
    },
    criterionPassed(criterionName) {
      const found = criteria.find((entry) => entry.name === criterionName);
      if (!found) throw new Error(`the template has no criterion "${criterionName}"`);
      return found.passed;
    },
  };
}
