// Attacks through the type check, which runs in the host: a study may make the compiler see only the study itself
// and the block API's declarations, never another file of the checker's machine.
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { scratchFolder } from '../support/cli.ts';
import { diagnosticsOf, lineOf, runSource, studyText } from '../support/studies.ts';

const SECRET = 's3cr3t-token-of-the-checker';

/** A file outside the study folder whose contents a type error would quote. */
function secretFile(): string {
  const folder = join(scratchFolder('kvarbook-typecheck-attack-'), 'private');
  mkdirSync(folder);
  const path = join(folder, 'keys.ts');
  writeFileSync(path, `export type Secret = "${SECRET}";\nexport declare const secretValue: "${SECRET}";\n`);
  return path;
}

const fence = (code: string) => `\`\`\`ts\n${code}\n\`\`\``;

async function refusal(code: string, needle: string) {
  const source = studyText({ body: fence(code) });
  const problems = await diagnosticsOf(runSource(source, { typecheck: true }));
  expect(JSON.stringify(problems)).not.toContain(SECRET);
  expect(problems[0], JSON.stringify(problems)).toMatchObject({ code: 'type-module-refused', at: { line: lineOf(source, needle) } });
  return problems[0]!;
}

describe('the type check reads no file of the checker', () => {
  it('refuses `import type` of a file elsewhere on the machine, at the import, without quoting the file', async () => {
    const path = secretFile();
    const problem = await refusal(
      `import type { Secret } from ${JSON.stringify(path)};\nconst leaked: Secret = 1 as unknown as number;`,
      'import type',
    );
    expect(problem.message).toContain(path);
    expect(problem.hint).toContain('block API');
  });

  it('refuses a type query through import()', async () => {
    await refusal(
      `type Leak = typeof import(${JSON.stringify(secretFile())});\nconst leaked: Leak['secretValue'] = 1 as unknown as number;`,
      'typeof import',
    );
  });

  it('refuses a dynamic import() the type check would resolve', async () => {
    await refusal(`const module = await import(${JSON.stringify(secretFile())});`, 'await import');
  });

  it('refuses import-equals with require', async () => {
    await refusal(
      `import leak = require(${JSON.stringify(secretFile())});\nconst leaked: typeof leak.secretValue = 1 as unknown as number;`,
      'import leak',
    );
  });

  it('refuses a re-export from another file', async () => {
    await refusal(`export type { Secret } from ${JSON.stringify(secretFile())};`, 'export type');
  });

  it("refuses a module of kvarbook's own installation, which is not the block API", async () => {
    await refusal("import type { StoredKey } from './src/seal/keystore.ts';\nconst key: StoredKey = 1 as unknown as number;", 'import type');
  });

  it('refuses a triple-slash reference to a file', async () => {
    await refusal(`/// <reference path=${JSON.stringify(secretFile())} />\nconst one = 1;`, '/// <reference');
  });

  it('refuses a triple-slash reference to type packages and libraries', async () => {
    await refusal('/// <reference types="node" />\nconst one = 1;', '/// <reference');
    await refusal('/// <reference lib="dom" />\nconst one = 1;', '/// <reference');
  });

  it('still type-checks blocks that use the block API and the solver', async () => {
    const source = studyText({
      inputs: '  lineLength: 380 km',
      body: fence(
        "const polar = solver.polarForm({ value: { re: 3, im: 4 } });\nresult('Magnitude', polar.magnitude);\nresult('Length', inputs.lineLength.in('km'), { unit: 'km' });",
      ),
    });
    const product = await runSource(source, { typecheck: true });
    expect(product.results.results.map((entry) => entry.value)).toEqual([5, 380]);
  });
});
