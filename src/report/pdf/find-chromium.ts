// Locates the system Chromium used for printing, or says in one line how to get one.
import { accessSync, constants, statSync } from 'node:fs';

/** Places tried after KVARBOOK_CHROMIUM, in order (Debian, then Ubuntu's name). */
export const chromiumCandidatePaths = ['/usr/bin/chromium', '/usr/bin/chromium-browser'] as const;

const installHint = 'install it with `apt-get install -y chromium` or set KVARBOOK_CHROMIUM to the Chromium executable';

/** `candidates` exists for tests of the not-installed case; callers use the default. */
export function findChromium(env: NodeJS.ProcessEnv, candidates: readonly string[] = chromiumCandidatePaths): { path: string } | { error: string } {
  const configured = env.KVARBOOK_CHROMIUM;
  if (configured !== undefined && configured !== '') {
    // An explicit setting that is wrong must not silently fall back to another browser.
    return isExecutableFile(configured)
      ? { path: configured }
      : { error: `KVARBOOK_CHROMIUM=${configured} is not an executable file; ${installHint}.` };
  }
  const found = candidates.find(isExecutableFile);
  return found !== undefined ? { path: found } : { error: `Chromium not found at ${candidates.join(' or ')}; ${installHint}.` };
}

function isExecutableFile(path: string): boolean {
  try {
    accessSync(path, constants.X_OK);
    return statSync(path).isFile();
  } catch {
    return false;
  }
}
