import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { build, stop } from 'esbuild';
import { beforeAll, describe, expect, it } from 'vitest';
import { scratchFolder } from '../support/cli.ts';
import { addReport, type Archive } from '../../src/archive/archive.ts';
import { recheckArchive, type RecheckOptions } from '../../src/archive/recheck.ts';
import { openArchive } from '../../src/cli/archiveCommand.ts';
import { rerunFrom } from '../../src/cli/checkCommand.ts';
import { readReport } from '../../src/cli/readReport.ts';
import { installationFacts } from '../../src/cli/environment.ts';
import { CHILD_BUILD_OPTIONS } from '../../src/execute/childBundle.ts';
import { loadTrustedIdentities } from '../../src/seal/trust.ts';
import { archivedStudy, sealStudies, type SealedSet } from './sealedReports.ts';

/** The calculation child built with one solver function changed: |z| comes out 2 % high. Reaches the pipeline only as an argument. */
async function childWithChangedSolver(): Promise<string> {
  const outfile = join(scratchFolder(), 'changed-calculation-child.cjs');
  let changed = false;
  try {
    await build({
      ...CHILD_BUILD_OPTIONS,
      outfile,
      plugins: [
        {
          name: 'magnitude-two-percent-high',
          setup(builder) {
            builder.onLoad({ filter: /[\\/]src[\\/]solver[\\/]complex\.ts$/ }, (args) => {
              const original = readFileSync(args.path, 'utf8');
              const contents = original.replace('magnitude: magnitudeOf(value)', 'magnitude: magnitudeOf(value) * 1.02');
              changed = contents !== original;
              return { contents, loader: 'ts' };
            });
          },
        },
      ],
    });
  } finally {
    await stop();
  }
  if (!changed) throw new Error('the solver change was not made: polarForm in src/solver/complex.ts no longer reads as expected');
  return outfile;
}

describe('rechecking the archive', () => {
  let set: SealedSet;
  beforeAll(async () => {
    set = await sealStudies({
      'one.study.md': archivedStudy('RCK-1', 1),
      'two.study.md': archivedStudy('RCK-2', 1, { scale: 2 }),
      'three.study.md': archivedStudy('RCK-3', 1, { scale: 3 }),
    });
  }, 120_000);

  async function filledArchive(): Promise<Archive> {
    const archive = await openArchive(join(scratchFolder(), 'archive'));
    const trusted = loadTrustedIdentities(set.space.trustFolder).identities;
    for (const path of Object.values(set.reports)) {
      const { html } = await readReport(path);
      await addReport(archive, { path, html, htmlName: path.split('/').pop()!, siblings: [] }, trusted, '2026-12-01T00:00:00Z');
    }
    return archive;
  }

  const options = (overrides: Partial<RecheckOptions> = {}): RecheckOptions => ({
    selection: { all: true },
    concurrency: 2,
    trusted: loadTrustedIdentities(set.space.trustFolder).identities,
    defaultRelativeTolerance: 1e-9,
    environment: installationFacts(),
    rerun: rerunFrom(undefined, undefined),
    now: () => '2026-12-02T10:00:00.000Z',
    ...overrides,
  });

  it('finds every figure a changed solver moved, with its sealed and new values and its relative change, and records the verdicts', async () => {
    const archive = await filledArchive();
    try {
      const summary = await recheckArchive(archive, options({ rerun: rerunFrom(undefined, undefined, await childWithChangedSolver()) }));
      expect(summary.counts).toEqual({ reproduced: 0, moved: 3, 'failed-to-run': 0, 'signature-problem': 0 });
      const two = summary.moved.find((figure) => figure.study === 'RCK-2')!;
      expect(two).toMatchObject({ name: 'Magnitude', sealed: 10, unit: 'kV' });
      expect(two.rerun).toBeCloseTo(10.2, 12);
      expect(two.relativeChange).toBeCloseTo(0.02, 12);
      expect((await archive.index.all()).map((row) => row.lastVerdict)).toEqual(['moved', 'moved', 'moved']);
    } finally {
      await archive.index.close();
    }
  }, 120_000);

  it('gives the command line no way to choose another calculation child: no call of the re-run passes one', () => {
    const sources = join(import.meta.dirname, '../../src');
    const calls = readdirSync(sources, { recursive: true, encoding: 'utf8' })
      .filter((path) => path.endsWith('.ts'))
      .flatMap((path) => [...readFileSync(join(sources, path), 'utf8').matchAll(/(?<!function )rerunFrom\(([^)]*)\)/g)].map((match) => match[1]!));
    expect(calls.length).toBeGreaterThan(0);
    for (const args of calls) expect(args.split(',')).toHaveLength(2);
  });

  it('takes an interrupted recheck up where it stopped, re-running no study twice', async () => {
    const archive = await filledArchive();
    try {
      const rerunStudies: string[] = [];
      const counting: RecheckOptions['rerun'] = async (request) => {
        rerunStudies.push(request.studyFile);
        return rerunFrom(undefined, undefined)(request);
      };
      const stop = new AbortController();
      const first = await recheckArchive(
        archive,
        options({ concurrency: 1, rerun: counting, signal: stop.signal, onProgress: (done) => done >= 1 && stop.abort() }),
      );
      expect(first).toMatchObject({ interrupted: true, resumed: false, total: 3 });
      expect(rerunStudies).toHaveLength(1);
      const second = await recheckArchive(archive, options({ rerun: counting }));
      expect(second).toMatchObject({ runId: first.runId, resumed: true, doneBefore: 1, interrupted: false });
      expect(second.counts.reproduced).toBe(3);
      expect([...rerunStudies].sort()).toEqual(['one.study.md', 'three.study.md', 'two.study.md']);
      expect((await archive.index.itemsOf(first.runId)).every((item) => item.state === 'done' && item.verdict === 'reproduced')).toBe(true);
    } finally {
      await archive.index.close();
    }
  }, 120_000);
});
