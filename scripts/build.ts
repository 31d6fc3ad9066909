// `npm run build` (and `npm ci`, through `prepare`): kvarbook's parts bundled by esbuild into dist/, with a record of the sources they came from.
import { rmSync } from 'node:fs';
import { join } from 'node:path';
import { build, stop } from 'esbuild';
import { inputHashes, inputsUnchanged, readInputHashes, writeAtomically } from '../src/bundleRecord.ts';
import { BUNDLE_FOLDER, BUNDLE_PARTS, type BundlePart, installedPath } from '../src/installation.ts';
import { CHILD_BUILD_OPTIONS } from '../src/execute/childBundle.ts';

const RECORD = installedPath(join(BUNDLE_FOLDER, 'build-inputs.json'));
/** Besides the bundles' own sources, the bundle depends on how it is built. */
const BUILD_FILES = ['scripts/build.ts', 'package.json'];
/** Loaded from node_modules at run time: native binaries, the compiler (used only by the type check), the browser driver, and the PDF library whose internals decodeBudget.ts patches by path. */
const EXTERNAL = ['esbuild', 'typescript', 'puppeteer-core', 'pdf-lib', 'tsx', 'tsx/*'];
const ESM_PARTS: readonly BundlePart[] = ['cli', 'workerEntry', 'typecheckWorker', 'chartWorker'];

/** True when dist/ holds a bundle built from the sources as they are now. */
export function bundleCurrent(): boolean {
  return inputsUnchanged(readInputHashes(RECORD));
}

export async function buildKvarbook(): Promise<void> {
  const folder = installedPath(BUNDLE_FOLDER);
  rmSync(folder, { recursive: true, force: true });
  try {
    // One call with code splitting: a command's code (and Chromium's driver) is loaded only when that command runs.
    const modules = await build({
      absWorkingDir: installedPath('.'),
      entryPoints: Object.fromEntries(ESM_PARTS.map((part) => [BUNDLE_PARTS[part].bundle.replace(/\.mjs$/, ''), BUNDLE_PARTS[part].source])),
      outdir: folder,
      outExtension: { '.js': '.mjs' },
      // Chunks sit beside the entries: src/installation.ts finds the installation one folder above the file it is in.
      chunkNames: 'chunk-[hash]',
      bundle: true,
      splitting: true,
      platform: 'node',
      format: 'esm',
      target: 'node20',
      external: EXTERNAL,
      // The CommonJS dependencies bundled into ES modules still call require() for Node's built-ins.
      banner: { js: "import { createRequire as kvarbookCreateRequire } from 'node:module'; const require = kvarbookCreateRequire(import.meta.url);" },
      legalComments: 'none',
      logLevel: 'warning',
      metafile: true,
    });
    const child = await build({ ...CHILD_BUILD_OPTIONS, outfile: join(folder, BUNDLE_PARTS.child.bundle), metafile: true, logLevel: 'warning' });
    const inputs = { ...inputHashes(modules.metafile, BUILD_FILES), ...inputHashes(child.metafile, BUILD_FILES) };
    writeAtomically(RECORD, JSON.stringify(inputs, null, 1));
  } finally {
    await stop();
  }
}

if (import.meta.url === `file://${process.argv[1]}`) {
  if (process.argv.includes('--if-stale') && bundleCurrent()) process.exit(0);
  await buildKvarbook();
}
