import { readFileSync } from 'node:fs';
import { resolve } from 'node:path';
import { describe, expect, it } from 'vitest';
import { diagnosticsOf, runSource, studyText } from '../support/studies.ts';

const readme = readFileSync(resolve(import.meta.dirname, '../../README.md'), 'utf8');
const examples = [...readme.matchAll(/```ts\n([\s\S]*?)```/g)].map((match) => match[1]!);
const INPUTS = '  lineLength: { value: 380 km, quantity: length }\n  nominalVoltage: { value: 400 kV, quantity: voltage }';

/** What an example says a call does, as a comment: `e.g. <call> throws:` and the message on the next comment line. */
const statedErrors = examples.flatMap((code) =>
  [...code.matchAll(/e\.g\. (solver\.\w+\(.*\)) throws:\n\s*\/\/\s+(.+)\n/g)].map((match) => ({ code, call: match[1]!, message: match[2]! })),
);

describe('the README examples', () => {
  it('has calculation examples to run', () => {
    expect(examples.length).toBeGreaterThanOrEqual(2);
  });

  it.each(examples.map((code, index) => [index + 1, code]))('example %i type-checks and runs as a calculation block', async (_index, code) => {
    const source = studyText({
      inputs: INPUTS,
      body: `\`\`\`ts\n${code}\`\`\`\n`,
    });
    const product = await runSource(source, { typecheck: true });
    expect(product.results.provenance.typeChecked).toBe(true);
  });

  it('states at least one result to compare', () => {
    expect(statedErrors.length).toBeGreaterThanOrEqual(1);
  });

  it.each(statedErrors.map((stated) => [stated.call, stated]))('%s throws the message the README states', async (_call, stated) => {
    const source = studyText({ inputs: INPUTS, body: `\`\`\`ts\n${stated.code}${stated.call};\n\`\`\`\n` });
    const [problem] = await diagnosticsOf(runSource(source));
    expect(problem?.message).toContain(stated.message);
  });
});
