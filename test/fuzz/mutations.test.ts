import { readFileSync, readdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { kvarbook, kvarbookInProcess, scratchFolder } from '../support/cli.ts';
import { fullStages, judge, mutantArbitrary, mutantSource, mutantsReachingExecution, staticStages } from './mutate.ts';
import { minimalStudy } from './seedStudies.ts';

// Fixed seeds keep CI reproducible; `npm run fuzz` draws new ones. A failing property prints its counterexample.
const STATIC_SEED = 6;
const STATIC_COUNT = 1200;
const FULL_SEED = 60;
const FULL_COUNT = 30;
const CLI_SEED = 600;
const CLI_COUNT = 3;

describe('mutated studies', () => {
  it(`end in success or a located StudyFailure in parse, inputs and transpile (${STATIC_COUNT} mutants)`, async () => {
    await fc.assert(
      fc.asyncProperty(mutantArbitrary, async (mutant) => {
        const source = mutantSource(mutant);
        await judge(source, () => staticStages('mutant.study.md', source));
      }),
      { seed: STATIC_SEED, numRuns: STATIC_COUNT },
    );
  });

  it(`end in success without NaN in any output, or in a located StudyFailure, when run through the calculation process (${FULL_COUNT} that pass the static stages)`, async () => {
    const folder = scratchFolder('kvarbook-fuzz-');
    const file = join(folder, 'mutant.study.md');
    const mutants = mutantsReachingExecution(FULL_SEED, FULL_COUNT);
    expect(mutants).toHaveLength(FULL_COUNT);
    for (const mutant of mutants) {
      const source = mutantSource(mutant);
      writeFileSync(file, source);
      await expect(
        judge(source, () => fullStages(file, source)),
        JSON.stringify(mutant),
      ).resolves.toBeDefined();
    }
  }, 120_000);

  it(`leave no partial or temporary file and an earlier report untouched on the command line (${CLI_COUNT} mutants)`, async () => {
    const folder = scratchFolder('kvarbook-fuzz-cli-');
    const study = join(folder, 'line.study.md');
    writeFileSync(study, minimalStudy);
    // The earlier report, by the command line in this process; each mutant runs as a process of its own.
    expect((await kvarbookInProcess(['run', 'line.study.md', '--no-typecheck'], folder)).status).toBe(0);
    const build = join(folder, 'build');
    // The report files are links into build/.kvarbook; reading one follows it to the set it shows.
    const reportFiles = () => readdirSync(build).filter((name) => !name.startsWith('.'));
    const earlier = new Map(reportFiles().map((name) => [name, readFileSync(join(build, name), 'utf8')]));
    for (const mutant of fc.sample(mutantArbitrary, { seed: CLI_SEED, numRuns: CLI_COUNT })) {
      writeFileSync(study, mutantSource({ ...mutant, seedIndex: 1 }));
      const { status, stderr } = kvarbook(['run', 'line.study.md', '--no-typecheck'], folder);
      expect([0, 1], stderr).toContain(status);
      expect(stderr).not.toMatch(/\n\s+at \S|kvarbook failed unexpectedly/);
      const now = reportFiles();
      expect((readdirSync(build, { recursive: true }) as string[]).filter((name) => name.endsWith('.tmp'))).toEqual([]);
      if (status === 1) {
        expect(new Map(now.map((name) => [name, readFileSync(join(build, name), 'utf8')]))).toEqual(earlier);
      }
    }
  });
});
