// The type check's outcomes kept between runs in a per-user cache folder that may be deleted at any time (resolved at the edge).
import { createHash } from 'node:crypto';
import { mkdirSync, readFileSync } from 'node:fs';
import { homedir } from 'node:os';
import { join } from 'node:path';
import { installationFiles, writeAtomically } from '../bundleRecord.ts';
import type { Diagnostic } from '../diagnostics/diagnostic.ts';
import type { TypecheckCache } from '../execute/typecheck.ts';
import { BUNDLE_FOLDER, RUNS_FROM_SOURCE, installedPath } from '../installation.ts';
import { sha256Hex } from '../seal/digest.ts';

/** KVARBOOK_CACHE, else $XDG_CACHE_HOME/kvarbook, else ~/.cache/kvarbook: never inside a study's folder. */
export function cacheFolder(env: NodeJS.ProcessEnv): string {
  return env.KVARBOOK_CACHE ?? join(env.XDG_CACHE_HOME ?? join(homedir(), '.cache'), 'kvarbook');
}

/** kvarbook's own code as it runs: the build's record of its sources; from the sources, every file under src/, which a developer may have just changed. */
export function installationCodeSha256(): string {
  return RUNS_FROM_SOURCE ? sourceTreeSha256() : sha256Hex(readFileSync(installedPath(join(BUNDLE_FOLDER, 'build-inputs.json'))));
}

/** What the check ran against, besides the study: kvarbook's version, TypeScript's, and the block API's declarations (kvarbook's code). */
function checkerIdentity(kvarbookVersion: string): string {
  const typescriptVersion = (JSON.parse(readFileSync(installedPath('node_modules/typescript/package.json'), 'utf8')) as { version: string }).version;
  return `kvarbook ${kvarbookVersion}\ntypescript ${typescriptVersion}\n${installationCodeSha256()}`;
}

function sourceTreeSha256(): string {
  const hash = createHash('sha256');
  for (const path of installationFiles('src')) hash.update(`${path}\n`).update(readFileSync(installedPath(path)));
  return hash.digest('hex');
}

/** Outcomes by the hash of the checked study and the checker; a file that cannot be read is a miss, a write that fails is skipped. */
export function typecheckCache(env: NodeJS.ProcessEnv, kvarbookVersion: string): TypecheckCache {
  const folder = join(cacheFolder(env), 'typecheck');
  let identity: string | undefined;
  const pathOf = (studyKey: string) => {
    identity ??= checkerIdentity(kvarbookVersion);
    return join(folder, `${sha256Hex(`${identity}\n${studyKey}`)}.json`);
  };
  return {
    read(studyKey) {
      try {
        return JSON.parse(readFileSync(pathOf(studyKey), 'utf8')) as Diagnostic[];
      } catch {
        return undefined;
      }
    },
    write(studyKey, diagnostics) {
      try {
        mkdirSync(folder, { recursive: true, mode: 0o700 });
        writeAtomically(pathOf(studyKey), JSON.stringify(diagnostics));
      } catch {
        // The cache only saves time: a folder that cannot be written means the next run checks again.
      }
    },
  };
}
