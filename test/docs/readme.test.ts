import { readFileSync } from 'node:fs';
import { resolve } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runSource, studyText } from '../support/studies.ts';

const readme = readFileSync(resolve(import.meta.dirname, '../../README.md'), 'utf8');
const examples = [...readme.matchAll(/```ts\n([\s\S]*?)```/g)].map((match) => match[1]!);

describe('the README examples', () => {
  it('has calculation examples to run', () => {
    expect(examples.length).toBeGreaterThanOrEqual(2);
  });

  it.each(examples.map((code, index) => [index + 1, code]))('example %i type-checks and runs as a calculation block', async (_index, code) => {
    const source = studyText({
      inputs: '  lineLength: { value: 380 km, quantity: length }\n  nominalVoltage: { value: 400 kV, quantity: voltage }',
      body: `\`\`\`ts\n${code}\`\`\`\n`,
    });
    const product = await runSource(source, { typecheck: true });
    expect(product.results.provenance.typeChecked).toBe(true);
  });
});
