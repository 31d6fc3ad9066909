import { chmodSync, cpSync, existsSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { kvarbookInProcess, scratchFolder } from '../support/cli.ts';
import { archivedStudy, sealStudies, type SealedSet } from './sealedReports.ts';

const cli = kvarbookInProcess;

describe('the archive on one machine', () => {
  let set: SealedSet;
  const archiveArgs = (folder: string) => ['--archive', folder];
  const run = (args: string[], folder: string) => cli([...args, ...archiveArgs(folder)], set.space.folder, set.space.env);
  const objectCount = (folder: string) =>
    existsSync(join(folder, 'objects')) ? readdirSync(join(folder, 'objects'), { recursive: true }).length : 0;

  beforeAll(async () => {
    set = await sealStudies({
      'harbek.study.md': archivedStudy('HRB-01', 1, { line: 'Harbek – Osterlund 220 kV', project: 'Osterlund reinforcement', date: '2024-05-02' }),
      'harbek-b.study.md': archivedStudy('HRB-01', 2, { line: 'Harbek – Osterlund 220 kV', project: 'Osterlund reinforcement', date: '2025-01-15' }),
      'vell.study.md': archivedStudy('VEL-09', 1, { line: 'Vellmark – Dunross 400 kV', project: 'Dunross export', date: '2026-03-30' }),
    });
    writeFileSync(join(set.space.folder, 'draft.study.md'), archivedStudy('DRF-1', 1));
    expect((await cli(['run', 'draft.study.md'], set.space.folder, set.space.env)).status).toBe(0);
  }, 120_000);

  it('archives a sealed report with the files beside it and lists it', async () => {
    const folder = scratchFolder();
    const added = await run(['archive', 'add', set.reports['VEL-09-r1']!], folder);
    expect(added.stderr).toBe('');
    expect(added.stdout).toContain('archived: VEL-09  r1  2026-03-30');
    const shown = JSON.parse((await run(['archive', 'show', 'VEL-09', '--json'], folder)).stdout);
    expect(shown.files.map((file: { role: string; name: string }) => `${file.role} ${file.name}`)).toEqual([
      'report VEL-09-r1.html',
      'results VEL-09-r1.results.json',
      'seal VEL-09-r1.seal.json',
      'source vell.study.md',
    ]);
    expect(shown).toMatchObject({ studyId: 'VEL-09', revision: 1, line: 'Vellmark – Dunross 400 kV', engineer: 'Test Engineer, licence T-0' });
    expect((await run(['archive', 'list'], folder)).stdout.trim().split('\n')).toHaveLength(1);
  });

  it('stores nothing new when the same report is added twice', async () => {
    const folder = scratchFolder();
    await run(['archive', 'add', set.reports['VEL-09-r1']!], folder);
    const objects = objectCount(folder);
    const again = await run(['archive', 'add', set.reports['VEL-09-r1']!], folder);
    expect(again.status).toBe(0);
    expect(again.stdout).toContain('already archived: VEL-09');
    expect(objectCount(folder)).toBe(objects);
    expect(JSON.parse((await run(['archive', 'list', '--json'], folder)).stdout)).toHaveLength(1);
  });

  describe('with three reports archived', () => {
    let folder: string;
    beforeAll(async () => {
      folder = scratchFolder();
      expect((await run(['archive', 'add', ...Object.values(set.reports)], folder)).status).toBe(0);
    });
    const found = async (...args: string[]) =>
      (JSON.parse((await run(['archive', 'find', ...args, '--json'], folder)).stdout) as { studyId: string; revision: number }[]).map(
        (row) => `${row.studyId} r${row.revision}`,
      );

    it('finds reports by line, by engineer and by study id, any case, by part of the field', async () => {
      expect(await found('--line', 'harbek')).toEqual(['HRB-01 r1', 'HRB-01 r2']);
      expect(await found('--engineer', 'test engineer')).toHaveLength(3);
      expect(await found('--study', 'VEL')).toEqual(['VEL-09 r1']);
    });

    it('finds reports by a range of study dates, ends included', async () => {
      expect(await found('--from', '2024-05-02', '--to', '2025-01-15')).toEqual(['HRB-01 r1', 'HRB-01 r2']);
      expect(await found('--from', '2025-01-16')).toEqual(['VEL-09 r1']);
    });

    it('finds reports by free text over the titles and projects, every word required', async () => {
      expect(await found('--text', 'dunross study')).toEqual(['VEL-09 r1']);
      expect(await found('--text', 'osterlund')).toEqual(['HRB-01 r1', 'HRB-01 r2']);
    });

    it('says so, exit 1, when nothing matches', async () => {
      const none = await run(['archive', 'find', '--project', 'no such project'], folder);
      expect(none.status).toBe(1);
      expect(none.stdout).toContain('no archived report matches');
    });

    it('links a newer revision to the one it supersedes, and shows an earlier revision on request', async () => {
      const latest = JSON.parse((await run(['archive', 'show', 'HRB-01', '--json'], folder)).stdout);
      const first = JSON.parse((await run(['archive', 'show', 'HRB-01', '--revision', '1', '--json'], folder)).stdout);
      expect(latest.revision).toBe(2);
      expect(latest.supersedes).toBe(first.entrySha256);
      expect(first.supersedes).toBeNull();
    });

    it('exports a report exactly as sealed, and the check verifies the exported report', async () => {
      const out = join(scratchFolder(), 'exported');
      expect((await run(['archive', 'export', 'VEL-09', out], folder)).status).toBe(0);
      for (const name of ['VEL-09-r1.html', 'VEL-09-r1.results.json', 'VEL-09-r1.seal.json'])
        expect(readFileSync(join(out, name)).equals(readFileSync(join(set.space.folder, 'build', name)))).toBe(true);
      const check = await cli(['check', join(out, 'VEL-09-r1.html')], set.space.folder, set.space.env);
      expect(check.stdout).toContain('verdict: VERIFIED');
      expect(check.status).toBe(0);
    });

    it('rebuilds the same index from the stored files alone', async () => {
      const copy = scratchFolder();
      const before = JSON.parse((await run(['archive', 'list', '--json'], folder)).stdout);
      // Only the objects: no index file, no write-ahead log.
      cpSync(join(folder, 'objects'), join(copy, 'objects'), { recursive: true });
      const rebuilt = await run(['archive', 'reindex'], copy);
      expect(rebuilt.stdout).toContain('index rebuilt from the stored files: 3 reports');
      const after = JSON.parse((await run(['archive', 'list', '--json'], copy)).stdout);
      const withoutTimes = (rows: { archivedAt: string }[]) => rows.map(({ archivedAt: _at, ...row }) => row);
      expect(withoutTimes(after)).toEqual(withoutTimes(before));
    });
  });

  it('archives a printed report from its PDF: the PDF and the sealed HTML it carries, with the files beside them', async () => {
    writeFileSync(join(set.space.folder, 'printed.study.md'), archivedStudy('PRN-1', 1));
    const printed = await cli(['run', 'printed.study.md', '--seal', '--pdf', '--out', 'printed'], set.space.folder, set.space.env);
    expect(printed.status).toBe(0);
    const folder = scratchFolder();
    expect((await run(['archive', 'add', join(set.space.folder, 'printed', 'PRN-1-r1.pdf')], folder)).status).toBe(0);
    const shown = JSON.parse((await run(['archive', 'show', 'PRN-1', '--json'], folder)).stdout);
    expect(shown.files.map((file: { role: string; name: string }) => `${file.role} ${file.name}`)).toEqual([
      'pdf PRN-1-r1.pdf',
      'report PRN-1-r1.html',
      'results PRN-1-r1.results.json',
      'seal PRN-1-r1.seal.json',
      'source printed.study.md',
    ]);
    const out = join(scratchFolder(), 'exported');
    expect((await run(['archive', 'export', 'PRN-1', out], folder)).status).toBe(0);
    for (const name of ['PRN-1-r1.pdf', 'PRN-1-r1.html'])
      expect(readFileSync(join(out, name)).equals(readFileSync(join(set.space.folder, 'printed', name)))).toBe(true);
  }, 60_000);

  it('refuses an unsealed report, saying it is not sealed, and stores nothing', async () => {
    const folder = scratchFolder();
    const refused = await run(['archive', 'add', join(set.space.folder, 'build', 'DRF-1-r1.html')], folder);
    expect(refused.status).toBe(1);
    expect(refused.stderr).toContain('archive-refused');
    expect(refused.stderr).toContain('not sealed');
    expect(objectCount(folder)).toBe(0);
  });

  it('refuses a report edited after sealing, saying the body differs', async () => {
    const folder = scratchFolder();
    const edited = join(scratchFolder(), 'VEL-09-r1.html');
    writeFileSync(edited, readFileSync(set.reports['VEL-09-r1']!, 'utf8').replace('<dd>5.000 kV</dd>', '<dd>5.100 kV</dd>'));
    expect(readFileSync(edited, 'utf8')).toContain('5.100 kV');
    const refused = await run(['archive', 'add', edited], folder);
    expect(refused.status).toBe(1);
    expect(refused.stderr).toContain('report unchanged: the report body differs');
  });

  it('refuses a report whose signer is not in the trust folder', async () => {
    const refused = await cli(
      ['archive', 'add', set.reports['VEL-09-r1']!, '--archive', scratchFolder(), '--trust', scratchFolder()],
      set.space.folder,
      set.space.env,
    );
    expect(refused.status).toBe(1);
    expect(refused.stderr).toContain('NOT in the trust folder');
  });

  it('names a stored file that was changed, and one that is missing, without re-running anything', async () => {
    const folder = scratchFolder();
    await run(['archive', 'add', set.reports['VEL-09-r1']!], folder);
    expect((await run(['archive', 'verify'], folder)).stdout).toContain('archive intact: 1 reports, 4 files');
    const files = JSON.parse((await run(['archive', 'show', 'VEL-09', '--json'], folder)).stdout).files as { name: string; sha256: string }[];
    const pathOf = (sha: string) => join(folder, 'objects', sha.slice(0, 2), sha);
    const results = files.find((file) => file.name === 'VEL-09-r1.results.json')!;
    chmodSync(pathOf(results.sha256), 0o644);
    writeFileSync(pathOf(results.sha256), readFileSync(pathOf(results.sha256), 'utf8').replace('5', '6'));
    rmSync(pathOf(files.find((file) => file.name === 'vell.study.md')!.sha256));
    const verified = await run(['archive', 'verify'], folder);
    expect(verified.status).toBe(1);
    expect(verified.stdout).toContain('VEL-09 r1: VEL-09-r1.results.json: changed');
    expect(verified.stdout).toContain('VEL-09 r1: vell.study.md: missing from the store');
    expect(verified.stdout).toContain('ARCHIVE DAMAGED');
  });
});
