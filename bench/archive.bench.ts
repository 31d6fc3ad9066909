// Benchmark: a recheck of archived studies (100 by default), one at a time against the pool of one per core, in one run.
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { availableParallelism, tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { addReport } from '../src/archive/archive.ts';
import { recheckArchive } from '../src/archive/recheck.ts';
import { openArchive } from '../src/cli/archiveCommand.ts';
import { rerunFrom } from '../src/cli/checkCommand.ts';
import { installationFacts, reportStylesheet } from '../src/cli/environment.ts';
import { launchEnvironment } from '../src/cli/launchEnvironment.ts';
import { typecheckCache } from '../src/cli/typecheckCache.ts';
import { runStudy } from '../src/pipeline.ts';
import { createSigningKey, unlockSigningKey } from '../src/seal/keys.ts';
import { buildManifest, signManifest } from '../src/seal/manifest.ts';
import { reportBodySha256, sealSubject, sealedReportHtml } from '../src/seal/sealedReport.ts';

export interface ArchiveBenchResult {
  studies: number;
  workers: number;
  sequentialMs: number;
  poolMs: number;
  ratio: number;
}

/** An invented study per index: a line length and its charging from the solver's line model. */
function benchStudy(index: number): string {
  return `---
title: Charging of the invented line ${index}
project: Archive benchmark
id: BENCH-${String(index).padStart(3, '0')}
revision: 1
date: 2026-11-20
engineer: { name: Mara Quillan, licence: PE-90001, jurisdiction: Invented Engineering Board }
inputs:
  lineLength: ${150 + index} km
---
# Line

\`\`\`ts
const polar = solver.polarForm({ value: { re: inputs.lineLength.in("km"), im: 40 } });
result("Magnitude", polar.magnitude, { unit: "km" });
\`\`\`
`;
}

export async function runArchiveBench(count = 100): Promise<ArchiveBenchResult> {
  const scratch = mkdtempSync(join(tmpdir(), 'kvarbook-archive-bench-'));
  // The sealing runs and both rechecks share one type-check cache of their own (the re-run reads the launch environment):
  // each study is type-checked once, when it is sealed, so the two rechecks time the same work.
  const environment = launchEnvironment();
  const cacheBefore = environment.KVARBOOK_CACHE;
  environment.KVARBOOK_CACHE = join(scratch, 'cache');
  const cache = typecheckCache(environment, installationFacts().kvarbookVersion);
  try {
    const created = createSigningKey({
      name: 'Mara Quillan',
      licence: 'PE-90001',
      jurisdiction: 'Invented Engineering Board',
      passphrase: 'benchmark passphrase only',
      scrypt: { N: 2 ** 10, r: 8, p: 1 },
    });
    const privateKey = unlockSigningKey(created.encryptedPrivateKeyPem, 'benchmark passphrase only');
    const archive = await openArchive(join(scratch, 'archive'));
    const workers = availableParallelism();
    try {
      // Sealed as `run --seal` seals, several at once to keep the set-up short.
      for (let from = 0; from < count; from += workers) {
        await Promise.all(
          Array.from({ length: Math.min(workers, count - from) }, async (_, offset) => {
            const index = from + offset;
            const file = join(scratch, `bench-${index}.study.md`);
            writeFileSync(file, benchStudy(index));
            const product = await runStudy({
              file,
              source: benchStudy(index),
              overrides: [],
              typecheck: true,
              environment: installationFacts(),
              stylesheet: reportStylesheet(),
              typecheckCache: cache,
            });
            const envelope = signManifest(
              buildManifest(sealSubject(product.results, reportBodySha256(product.report))),
              privateKey,
              created.identity,
            );
            const html = sealedReportHtml(product.report, envelope);
            await addReport(
              archive,
              { path: file, html, htmlName: `BENCH-${index}-r1.html`, siblings: [] },
              [created.identity],
              '2026-12-01T00:00:00Z',
            );
          }),
        );
      }
      const recheck = async (concurrency: number) => {
        const started = performance.now();
        const summary = await recheckArchive(archive, {
          selection: { all: true },
          concurrency,
          trusted: [created.identity],
          defaultRelativeTolerance: 1e-9,
          environment: installationFacts(),
          rerun: rerunFrom(undefined, undefined),
          now: () => new Date().toISOString(),
        });
        if (summary.counts.reproduced !== count) throw new Error(`the recheck reproduced ${summary.counts.reproduced} of ${count} studies`);
        return performance.now() - started;
      };
      const sequentialMs = await recheck(1);
      const poolMs = await recheck(workers);
      return { studies: count, workers, sequentialMs, poolMs, ratio: sequentialMs / poolMs };
    } finally {
      await archive.index.close();
    }
  } finally {
    if (cacheBefore === undefined) delete environment.KVARBOOK_CACHE;
    else environment.KVARBOOK_CACHE = cacheBefore;
    rmSync(scratch, { recursive: true, force: true });
  }
}

export function archiveRow(result: ArchiveBenchResult): string {
  return `archive recheck, ${result.studies} studies  one at a time ${(result.sequentialMs / 1000).toFixed(1)} s   pool of ${result.workers} ${(result.poolMs / 1000).toFixed(1)} s   ratio ${result.ratio.toFixed(2)} (target 1.7 on 2 cores)`;
}

if (process.argv[1] && resolve(process.argv[1]) === resolve(import.meta.filename)) {
  console.log(archiveRow(await runArchiveBench(Number(process.argv[2] ?? 100))));
}
