import { readFileSync, rmSync } from 'node:fs';
import { spawnSync } from 'node:child_process';
import { join, resolve } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { kvarbook, scratchFolder } from '../support/cli.ts';

const ROOT = resolve(import.meta.dirname, '../..');
const DEMO = join(ROOT, 'studies/caldera-bay-400kv.study.md');
const DEVELOPMENT = join(ROOT, 'scripts/kvarbook-dev.mjs');

describe('the bundle and the TypeScript sources', () => {
  const scratch = scratchFolder('kvarbook-bundle-');
  afterAll(() => rmSync(scratch, { recursive: true, force: true }));

  it('write byte-identical reports and results for the demo study', { timeout: 180_000 }, () => {
    const bundled = kvarbook(['run', DEMO, '--out', join(scratch, 'bundle')], scratch);
    expect(bundled.stderr).toBe('');
    expect(bundled.status).toBe(0);
    const development = spawnSync(process.execPath, [DEVELOPMENT, 'run', DEMO, '--out', join(scratch, 'sources')], {
      cwd: scratch,
      encoding: 'utf8',
      timeout: 120_000,
    });
    expect(development.stderr).toBe('');
    expect(development.status).toBe(0);
    for (const file of ['CBX-RC-001-r4.html', 'CBX-RC-001-r4.results.json']) {
      const fromBundle = readFileSync(join(scratch, 'bundle', file));
      expect(fromBundle.length).toBeGreaterThan(1000);
      expect(fromBundle.equals(readFileSync(join(scratch, 'sources', file))), file).toBe(true);
    }
  });
});
