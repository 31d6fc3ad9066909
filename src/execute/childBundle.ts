// The calculation child as one plain-JS file: bundled from src/execute/child by esbuild, cached by content hash.
import { createHash } from 'node:crypto';
import { existsSync, mkdirSync, renameSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { buildSync } from 'esbuild';
import { KVARBOOK_ROOT } from '../installation.ts';

/** Bundle the child (pure JS, no TypeScript loader: it must run under Node's permission model) and return its path. */
export function childBundlePath(): string {
  const built = buildSync({
    entryPoints: [join(KVARBOOK_ROOT, 'src/execute/child/main.ts')],
    bundle: true,
    platform: 'node',
    format: 'cjs',
    target: 'node20',
    write: false,
    logLevel: 'silent',
    legalComments: 'none',
  });
  const text = built.outputFiles[0]!.text;
  const hash = createHash('sha256').update(text).digest('hex').slice(0, 16);
  const directory = join(KVARBOOK_ROOT, 'node_modules/.cache/kvarbook');
  const path = join(directory, `calculation-child-${hash}.cjs`);
  if (!existsSync(path)) {
    mkdirSync(directory, { recursive: true });
    const temporary = `${path}.${process.pid}.tmp`;
    writeFileSync(temporary, text);
    renameSync(temporary, path);
  }
  return path;
}
