#!/usr/bin/env node
// The kvarbook executable: narrows the environment helper processes inherit, loads the TypeScript sources through tsx, and hands over to the command line.
import { register } from 'tsx/esm/api';

// kvarbook reads its own settings (KVARBOOK_*, XDG_CONFIG_HOME, NO_COLOR, the passphrase) from the
// environment it was started with, handed to main below. Every process started after this point
// (tsx's and kvarbook's esbuild, Chromium, the calculation process) inherits only these variables,
// so no passphrase or token of the user's reaches one.
const HELPER_ENVIRONMENT = ['PATH', 'HOME', 'TMPDIR', 'LANG', 'LC_ALL', 'TZ'];
const launchEnvironment = { ...process.env };
for (const name of Object.keys(process.env)) if (!HELPER_ENVIRONMENT.includes(name)) delete process.env[name];

register();
const { main } = await import('../src/cli/main.ts');
process.exitCode = await main(process.argv.slice(2), launchEnvironment);
