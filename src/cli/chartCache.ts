// Drawn charts kept between runs in the per-user cache folder, by the hash of their specification and of the code that drew them.
import { mkdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { writeAtomically } from '../bundleRecord.ts';
import type { ChartCache } from '../pipeline.ts';
import { sha256Hex } from '../seal/digest.ts';
import type { InstallationFacts } from './environment.ts';
import { cacheFolder, installationCodeSha256 } from './typecheckCache.ts';

/**
 * SVGs by the hash of the specification with what drew it: kvarbook's version and code, Node's version and the lock
 * file (which pins Vega and Vega-Lite). A file that cannot be read is a miss, a write that fails is skipped; see
 * docs/security.md for why an entry may be trusted.
 */
export function chartCache(env: NodeJS.ProcessEnv, facts: InstallationFacts): ChartCache {
  const folder = join(cacheFolder(env), 'charts');
  let identity: string | undefined;
  const pathOf = (specJson: string) => {
    identity ??= `kvarbook ${facts.kvarbookVersion}\nnode ${facts.nodeVersion}\nlock file ${facts.lockfileSha256}\n${installationCodeSha256()}`;
    return join(folder, `${sha256Hex(`${identity}\n${specJson}`)}.svg`);
  };
  return {
    read(specJson) {
      try {
        return readFileSync(pathOf(specJson), 'utf8');
      } catch {
        return undefined;
      }
    },
    write(specJson, svg) {
      try {
        mkdirSync(folder, { recursive: true, mode: 0o700 });
        writeAtomically(pathOf(specJson), svg);
      } catch {
        // The cache only saves time: a folder that cannot be written means the next run draws again.
      }
    },
  };
}
