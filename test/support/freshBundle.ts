// Vitest's global set-up: the bundle the CLI tests run is rebuilt first when a source changed since it was built.
import { buildKvarbook, bundleCurrent } from '../../scripts/build.ts';

export default async function freshBundle(): Promise<void> {
  if (!bundleCurrent()) await buildKvarbook();
}
