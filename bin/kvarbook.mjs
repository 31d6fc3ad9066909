#!/usr/bin/env node
// The kvarbook executable: starts the bundle that `npm ci` (through `prepare`) or `npm run build` wrote into dist/.
import { existsSync } from 'node:fs';
import { launch } from './launch.mjs';

const bundle = new URL('../dist/kvarbook.mjs', import.meta.url);
if (!existsSync(bundle)) {
  console.error('kvarbook: the bundle is missing (dist/kvarbook.mjs); run `npm ci` or `npm run build` in the kvarbook folder');
  process.exit(2);
}
await launch(() => import(bundle.href));
