// Where this kvarbook is installed, and whether it runs from its TypeScript sources or from the bundle built from them.
import { join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

// This module is src/installation.ts in the sources and is inlined into dist/*.mjs in the bundle: one folder below the
// installation either way, so the same relative step finds it.
export const KVARBOOK_ROOT = fileURLToPath(new URL('../', import.meta.url));

/** True when kvarbook runs from its TypeScript sources (tsx, the tests), false when it runs from dist/. */
export const RUNS_FROM_SOURCE = import.meta.url.endsWith('.ts');

/** Where `npm run build` (and `npm ci`, through `prepare`) writes the bundle; gitignored. */
export const BUNDLE_FOLDER = 'dist';

/**
 * The parts kvarbook runs as separate code, each bundled from one source entry: the command line, the calculation
 * child, the first code of a limited worker and the module each worker answers with.
 */
export const BUNDLE_PARTS = {
  cli: { source: 'src/cli/main.ts', bundle: 'kvarbook.mjs' },
  child: { source: 'src/execute/child/main.ts', bundle: 'calculation-child.cjs' },
  workerEntry: { source: 'src/execute/limitedWorkerEntry.mjs', bundle: 'limited-worker-entry.mjs' },
  typecheckWorker: { source: 'src/execute/typecheck.ts', bundle: 'typecheck-worker.mjs' },
  chartWorker: { source: 'src/report/chart/render.ts', bundle: 'chart-worker.mjs' },
} as const;

export type BundlePart = keyof typeof BUNDLE_PARTS;

/** The block API's flat declarations, which the type check reads; written by the build. */
export const BLOCK_API_DECLARATIONS = `${BUNDLE_FOLDER}/block-api.d.ts`;

/** A file of the installation, by its path inside it (`templates/report.css`). */
export function installedPath(relativePath: string): string {
  return join(KVARBOOK_ROOT, relativePath);
}

/** The built file of one part, in the bundle folder. */
export function bundledPath(part: BundlePart): string {
  return installedPath(join(BUNDLE_FOLDER, BUNDLE_PARTS[part].bundle));
}

/** The code of one part as this kvarbook runs it: its source from the sources, its bundle from the bundle. */
export function partModule(part: BundlePart): URL {
  return pathToFileURL(RUNS_FROM_SOURCE ? installedPath(BUNDLE_PARTS[part].source) : bundledPath(part));
}
