// The calculation child as one plain-JS file: built into dist/ by the build; from the sources, built once and kept while its inputs are unchanged.
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { type BuildOptions, buildSync, stop } from 'esbuild';
import { inputHashes, inputsUnchanged, readInputHashes, writeAtomically } from '../bundleRecord.ts';
import { BUNDLE_PARTS, KVARBOOK_ROOT, RUNS_FROM_SOURCE, bundledPath, installedPath } from '../installation.ts';
import { sha256Hex } from '../seal/digest.ts';

/** Pure JS, no TypeScript loader: the child must run under Node's permission model. The build uses the same options. */
export const CHILD_BUILD_OPTIONS: BuildOptions = {
  entryPoints: [BUNDLE_PARTS.child.source],
  absWorkingDir: KVARBOOK_ROOT,
  bundle: true,
  platform: 'node',
  format: 'cjs',
  target: 'node20',
  logLevel: 'silent',
  legalComments: 'none',
};

/** The path of the child's bundle. */
export function childBundlePath(): string {
  return RUNS_FROM_SOURCE ? sourceChildBundle() : bundledPath('child');
}

const CACHE_FOLDER = installedPath('node_modules/.cache/kvarbook');
const RECORD = join(CACHE_FOLDER, 'calculation-child.json');

/** From the sources (tests, development): built when a source it is made of changed since the last build, else reused. */
function sourceChildBundle(): string {
  const recorded = readInputHashes(RECORD);
  const cached = recorded ? join(CACHE_FOLDER, bundleName(recorded)) : undefined;
  if (cached && existsSync(cached) && inputsUnchanged(recorded)) return cached;
  try {
    const built = buildSync({ ...CHILD_BUILD_OPTIONS, write: false, metafile: true });
    const inputs = inputHashes(built.metafile);
    const path = join(CACHE_FOLDER, bundleName(inputs));
    if (!existsSync(path)) writeAtomically(path, built.outputFiles[0]!.text);
    writeAtomically(RECORD, JSON.stringify(inputs));
    return path;
  } finally {
    // esbuild's synchronous calls keep a worker and its service process (about 100 MB) until stopped.
    void stop();
  }
}

function bundleName(inputs: Record<string, string>): string {
  return `calculation-child-${sha256Hex(JSON.stringify(inputs)).slice(0, 16)}.cjs`;
}
