#!/usr/bin/env node
// The kvarbook executable: loads the TypeScript sources through tsx and hands over to the command line.
import { register } from 'tsx/esm/api';

register();
const { main } = await import('../src/cli/main.ts');
process.exitCode = await main(process.argv.slice(2));
