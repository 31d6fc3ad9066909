import { describe, expect, it } from 'vitest';
import { runSource, studyText } from '../support/studies.ts';

// Bugs the attack probes and the fuzzer turned up, kept as plain examples.
const fence = (code: string) => `\`\`\`ts\n${code}\n\`\`\``;

describe('found by probing', () => {
  it('runs a block that declares a variable without a value, alone or last in a list', async () => {
    // Once rewritten to `(total);= undefined;`, a SyntaxError pointing at no line of the study.
    const source = studyText({ body: fence("let total: number;\nlet first = 1, last;\ntotal = first + 1;\nlast = total;\nresult('total', last);") });
    expect((await runSource(source)).results.results).toMatchObject([{ name: 'total', value: 2 }]);
  });
});
