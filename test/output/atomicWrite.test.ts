import { mkdtempSync, mkdirSync, readFileSync, readdirSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { writeFilesAtomically } from '../../src/output/atomicWrite.ts';

describe('writing report files atomically', () => {
  it('replaces every file of the set', () => {
    const folder = mkdtempSync(join(tmpdir(), 'kvarbook-atomic-'));
    writeFileSync(join(folder, 'a.html'), 'old');
    writeFilesAtomically([{ path: join(folder, 'a.html'), content: 'new' }, { path: join(folder, 'a.json'), content: '{}' }]);
    expect(readFileSync(join(folder, 'a.html'), 'utf8')).toBe('new');
    expect(readdirSync(folder).sort()).toEqual(['a.html', 'a.json']);
  });

  it('leaves the old files and no temporary file when one file of the set cannot be written', () => {
    const folder = mkdtempSync(join(tmpdir(), 'kvarbook-atomic-'));
    writeFileSync(join(folder, 'a.html'), 'old');
    mkdirSync(join(folder, 'blocked'));
    writeFileSync(join(folder, 'blocked', 'x'), '');
    // A file whose parent is a regular file cannot be created.
    expect(() =>
      writeFilesAtomically([{ path: join(folder, 'a.html'), content: 'new' }, { path: join(folder, 'blocked', 'x', 'b.json'), content: '{}' }]),
    ).toThrow();
    expect(readFileSync(join(folder, 'a.html'), 'utf8')).toBe('old');
    expect(readdirSync(folder).sort()).toEqual(['a.html', 'blocked']);
  });
});
