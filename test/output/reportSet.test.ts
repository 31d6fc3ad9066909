import { existsSync, readFileSync, readdirSync, symlinkSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { StudyFailure } from '../../src/diagnostics/diagnostic.ts';
import { PendingSet, currentSet, openReportFolder, type ReportFolder } from '../../src/output/reportSet.ts';
import { scratchFolder } from '../support/cli.ts';

const notSealed = async () => false;

async function folder(): Promise<ReportFolder> {
  const report: ReportFolder = {
    out: join(scratchFolder('kvarbook-set-'), 'build'),
    base: 'A-r1',
    names: ['A-r1.html', 'A-r1.json', 'A-r1.pdf'],
  };
  await openReportFolder(report, notSealed);
  return report;
}

function publish(report: ReportFolder, files: Record<string, string>, keepPrevious = false): string | undefined {
  const previous = currentSet(report);
  const pending = new PendingSet(report);
  for (const [name, content] of Object.entries(files)) pending.write(name, content);
  return pending.publish(previous, keepPrevious);
}

describe('report sets', () => {
  it('shows every file of the newest set under its own name, and no file of an earlier set it lacks', async () => {
    const report = await folder();
    publish(report, { 'A-r1.html': 'first', 'A-r1.json': '{1}', 'A-r1.pdf': 'pdf 1' });
    publish(report, { 'A-r1.html': 'second', 'A-r1.json': '{2}' });
    expect(readFileSync(join(report.out, 'A-r1.html'), 'utf8')).toBe('second');
    expect(readFileSync(join(report.out, 'A-r1.json'), 'utf8')).toBe('{2}');
    expect(existsSync(join(report.out, 'A-r1.pdf'))).toBe(false);
    expect(readdirSync(join(report.out, '.kvarbook', 'sets'))).toHaveLength(1);
  });

  it('keeps an earlier set whole in a superseded folder of its own each time, never merging two', async () => {
    const report = await folder();
    for (const round of [1, 2, 3]) publish(report, { 'A-r1.html': 'same', 'A-r1.json': `{${round}}` }, true);
    const superseded = readdirSync(join(report.out, 'superseded')).sort();
    expect(superseded).toHaveLength(2);
    expect(superseded.map((name) => readFileSync(join(report.out, 'superseded', name, 'A-r1.json'), 'utf8')).sort()).toEqual(['{1}', '{2}']);
  });

  it('shows the earlier set, and leaves nothing behind, when a set being written is abandoned', async () => {
    const report = await folder();
    publish(report, { 'A-r1.html': 'first' });
    const pending = new PendingSet(report);
    pending.write('A-r1.html', 'half');
    pending.abandon();
    expect(readFileSync(join(report.out, 'A-r1.html'), 'utf8')).toBe('first');
    expect(readdirSync(join(report.out, '.kvarbook', 'sets')).filter((name) => name.endsWith('.tmp'))).toEqual([]);
  });

  it('refuses a link at a report name that kvarbook did not make', async () => {
    const report = await folder();
    const elsewhere = join(scratchFolder('kvarbook-set-elsewhere-'), 'target');
    writeFileSync(elsewhere, 'not a report');
    symlinkSync(elsewhere, join(report.out, 'A-r1.html'));
    expect(() => currentSet(report)).toThrow(StudyFailure);
    expect(readFileSync(elsewhere, 'utf8')).toBe('not a report');
  });
});
