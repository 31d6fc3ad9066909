import { writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { describe, expect, it } from 'vitest';
import { kvarbook, scratchFolder } from '../support/cli.ts';
import { studyText } from '../support/studies.ts';

const PROBE = resolve(import.meta.dirname, 'liveHandlesProbe.mjs');
const PROBE_PREFIX = 'kvarbook-live-handles ';

describe('run --pdf', () => {
  it('keeps nothing alive once the PDF is written: no timer, no helper process', () => {
    const folder = scratchFolder('kvarbook-pdf-exit-');
    writeFileSync(join(folder, 'line.study.md'), studyText({ body: '```ts\nresult("x", 1);\n```\n' }));
    const run = kvarbook(['run', 'line.study.md', '--pdf', '--no-typecheck'], folder, { NODE_OPTIONS: `--import=${PROBE}` });
    expect(run.status, run.stderr).toBe(0);
    const line = run.stderr.split('\n').find((text) => text.startsWith(PROBE_PREFIX));
    expect(line, 'the probe saw the PDF announced').toBeDefined();
    const alive: { resources: string[]; holdingTimersMs: number[] } = JSON.parse(line!.slice(PROBE_PREFIX.length));
    // Pipes may still be closing and libraries arm millisecond timers meanwhile; no helper process, no
    // other resource, and no timer that would hold the process open for a second or more.
    expect(alive.resources.filter((resource) => resource !== 'PipeWrap' && resource !== 'Timeout')).toEqual([]);
    expect(alive.holdingTimersMs).toEqual([]);
  });
});
