// Where this kvarbook is installed: the one place that knows the installation's folder, from the sources and from the bundle alike.
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

// This module is src/installation.ts in the sources and is inlined into dist/*.mjs in the bundle: one folder below the
// installation either way, so the same relative step finds it.
export const KVARBOOK_ROOT = fileURLToPath(new URL('../', import.meta.url));

/** A file of the installation, by its path inside it (`templates/report.css`). */
export function installedPath(relativePath: string): string {
  return join(KVARBOOK_ROOT, relativePath);
}
