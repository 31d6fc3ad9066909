#!/usr/bin/env node
// kvarbook from its TypeScript sources through tsx, for development: `node scripts/kvarbook-dev.mjs run <study>`.
import { launch } from '../bin/launch.mjs';

await launch(async () => {
  const { register } = await import('tsx/esm/api');
  register();
  return import('../src/cli/main.ts');
});
