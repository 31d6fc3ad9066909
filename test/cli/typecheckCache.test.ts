import { existsSync, mkdirSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { kvarbook, scratchFolder } from '../support/cli.ts';
import { studyText } from '../support/studies.ts';

const STUDY_BODY = (value: string) =>
  `# Study\n\n\`\`\`ts\nconst lengthKm: number = ${value};\nresult('length', lengthKm, { unit: 'km' });\n\`\`\`\n`;

describe('the type check cache', () => {
  const scratch = scratchFolder('kvarbook-typecheck-cache-');
  const cache = join(scratch, 'cache');
  const studyFolder = join(scratch, 'study');
  const study = join(studyFolder, 'cached.study.md');
  const run = () => kvarbook(['run', study, '--out', join(scratch, 'out')], scratch, { KVARBOOK_CACHE: cache });
  const entries = () => (existsSync(join(cache, 'typecheck')) ? readdirSync(join(cache, 'typecheck')).sort() : []);
  afterAll(() => rmSync(scratch, { recursive: true, force: true }));

  it('keeps one outcome per checked study, outside the study folder, and reuses it', { timeout: 120_000 }, () => {
    rmSync(studyFolder, { recursive: true, force: true });
    mkdirSync(studyFolder, { recursive: true });
    writeFileSync(study, studyText({ body: STUDY_BODY('380') }));
    expect(run().status).toBe(0);
    const first = entries();
    expect(first).toHaveLength(1);
    expect(run().status).toBe(0);
    expect(entries()).toEqual(first);
    expect(readdirSync(studyFolder)).toEqual(['cached.study.md']);
    // The same study under another name and folder (as a checker re-runs it from a scratch folder) is the same check.
    const elsewhere = join(scratch, 'elsewhere', 'renamed.study.md');
    mkdirSync(join(scratch, 'elsewhere'));
    writeFileSync(elsewhere, studyText({ body: STUDY_BODY('380') }));
    expect(kvarbook(['run', elsewhere, '--out', join(scratch, 'out-elsewhere')], scratch, { KVARBOOK_CACHE: cache }).status).toBe(0);
    expect(entries()).toEqual(first);
  });

  it('checks a changed study anew, and gives a cached failure as the first run gave it', { timeout: 120_000 }, () => {
    writeFileSync(study, studyText({ body: STUDY_BODY("'380 km'") }));
    const failed = run();
    expect(failed.status).toBe(1);
    expect(failed.stderr).toContain('[type-2322]');
    expect(entries()).toHaveLength(2);
    const again = run();
    expect(again.status).toBe(1);
    expect(again.stderr).toBe(failed.stderr);
  });

  it('works as before after the cache folder is deleted', { timeout: 120_000 }, () => {
    rmSync(cache, { recursive: true, force: true });
    const failed = run();
    expect(failed.status).toBe(1);
    expect(failed.stderr).toContain('[type-2322]');
    expect(entries()).toHaveLength(1);
  });
});
