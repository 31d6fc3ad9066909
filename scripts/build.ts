// `npm run build` (and `npm ci`, through `prepare`): kvarbook's parts bundled by esbuild into dist/, with a record of the sources they came from.
import { readFileSync, rmSync } from 'node:fs';
import { dirname, join, relative } from 'node:path';
import { generateDtsBundle } from 'dts-bundle-generator';
import { type Plugin, build, stop } from 'esbuild';
import { inputHashes, inputsUnchanged, installationFiles, readInputHashes, writeAtomically } from '../src/bundleRecord.ts';
import { BLOCK_API_DECLARATIONS, BUNDLE_FOLDER, BUNDLE_PARTS, type BundlePart, installedPath } from '../src/installation.ts';
import { CHILD_BUILD_OPTIONS } from '../src/execute/childBundle.ts';
import { SCHEMA_DEFINITIONS_READ } from '../src/report/chart/vegaLiteNames.ts';

const RECORD = installedPath(join(BUNDLE_FOLDER, 'build-inputs.json'));
/** Besides the bundles' own sources, the bundle depends on how it is built. */
const BUILD_FILES = ['scripts/build.ts', 'package.json'];
/** Loaded from node_modules at run time: native binaries, the PostgreSQL driver and job queue (whose optional native driver a bundle cannot resolve), the compiler (used only by the type check), the browser driver, and the PDF library whose internals decodeBudget.ts patches by path. */
const EXTERNAL = ['better-sqlite3', 'pg', 'pg-boss', 'esbuild', 'typescript', 'puppeteer-core', 'pdf-lib', 'tsx', 'tsx/*'];
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
      plugins: [vegaLiteSchemaNames],
    });
    const child = await build({ ...CHILD_BUILD_OPTIONS, outfile: join(folder, BUNDLE_PARTS.child.bundle), metafile: true, logLevel: 'warning' });
    writeAtomically(installedPath(BLOCK_API_DECLARATIONS), blockApiDeclarations());
    // The declarations come from type-only imports too, which esbuild never reads: every source file counts.
    const everySource = [...BUILD_FILES, ...installationFiles('src')];
    const inputs = { ...inputHashes(modules.metafile, everySource), ...inputHashes(child.metafile) };
    writeAtomically(RECORD, JSON.stringify(inputs, null, 1));
  } finally {
    await stop();
  }
}

/** Vega-Lite's JSON schema as the chart worker reads it: only the definitions `src/report/chart/vegaLiteNames.ts` names. */
const vegaLiteSchemaNames: Plugin = {
  name: 'vega-lite-schema-names',
  setup(builder) {
    builder.onLoad({ filter: /[\\/]vega-lite-schema\.json$/ }, ({ path }) => {
      const { definitions } = JSON.parse(readFileSync(path, 'utf8')) as { definitions: Record<string, unknown> };
      const read = Object.fromEntries(SCHEMA_DEFINITIONS_READ.map((name) => [name, definitions[name]]));
      return { contents: JSON.stringify({ definitions: read }), loader: 'json' };
    });
  },
};

const GLOBALS_ENTRY = 'src/execute/blockGlobals.d.ts';

/**
 * One flat declaration file of the block API for the type check: the modules that src/execute/blockGlobals.d.ts imports
 * (and what they import) inlined as namespaces of the same names, then its `declare global` block. No chart-library or
 * mathjs typings come along: the type check reads this file and TypeScript's own library, nothing else.
 */
function blockApiDeclarations(): string {
  const globals = readFileSync(installedPath(GLOBALS_ENTRY), 'utf8');
  const imports = [...globals.matchAll(/^import type \* as (\w+) from '([^']+)';$/gm)];
  // Outside node_modules, where the compiler would take the sources for a dependency's and not emit their declarations.
  const folder = installedPath('.cache/block-api');
  const entry = join(folder, 'entry.ts');
  const fromEntry = (path: string) =>
    relative(folder, join(installedPath(dirname(GLOBALS_ENTRY)), path))
      .split('\\')
      .join('/');
  writeAtomically(entry, imports.map(([, name, path]) => `export type * as ${name} from '${fromEntry(path!)}';\n`).join(''));
  const config = join(folder, 'tsconfig.json');
  writeAtomically(
    config,
    JSON.stringify({
      extends: relative(folder, installedPath('tsconfig.json')),
      compilerOptions: { noEmit: false, declaration: true, emitDeclarationOnly: true, rewriteRelativeImportExtensions: true },
      include: ['entry.ts'],
      exclude: [],
    }),
  );
  const [bundled] = generateDtsBundle([{ filePath: entry, output: { noBanner: true, exportReferencedTypes: false } }], {
    preferredConfigPath: config,
  });
  const body = globals.replace(/^import type .*\n/gm, '');
  const text = `// The block API's declarations, flat: generated by scripts/build.ts from ${GLOBALS_ENTRY}; do not edit.\n${bundled}\n${body}`;
  return text;
}

if (import.meta.url === `file://${process.argv[1]}`) {
  if (process.argv.includes('--if-stale') && bundleCurrent()) process.exit(0);
  await buildKvarbook();
}
