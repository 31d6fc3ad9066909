// Starts kvarbook's command line: narrows the environment helper processes inherit, then hands over to main.
// bin/kvarbook.mjs starts the bundle; scripts/kvarbook-dev.mjs starts the TypeScript sources through tsx.

// kvarbook reads its own settings (KVARBOOK_*, XDG_CONFIG_HOME, NO_COLOR, the passphrase) from the
// environment it was started with, handed to main below. Every process started after this point
// (kvarbook's esbuild, Chromium, the calculation process, tsx's in development) inherits only these variables,
// so no passphrase or token of the user's reaches one.
const HELPER_ENVIRONMENT = ['PATH', 'HOME', 'TMPDIR', 'LANG', 'LC_ALL', 'TZ'];

/** Narrows the environment, then loads the command line with `loadMain` (after the narrowing) and runs it. */
export async function launch(loadMain) {
  const launchEnvironment = { ...process.env };
  for (const name of Object.keys(process.env)) if (!HELPER_ENVIRONMENT.includes(name)) delete process.env[name];
  const { main } = await loadMain();
  process.exitCode = await main(process.argv.slice(2), launchEnvironment);
}
