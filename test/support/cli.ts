// Running the kvarbook executable as a user would, in a scratch folder.
import { spawnSync } from 'node:child_process';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';

export const KVARBOOK_BIN = resolve(import.meta.dirname, '../../bin/kvarbook.mjs');

export function scratchFolder(prefix = 'kvarbook-cli-'): string {
  return mkdtempSync(join(tmpdir(), prefix));
}

export function kvarbook(args: string[], cwd: string, env: NodeJS.ProcessEnv = {}): { status: number | null; stdout: string; stderr: string } {
  const run = spawnSync(process.execPath, [KVARBOOK_BIN, ...args], { cwd, encoding: 'utf8', env: { ...process.env, ...env }, timeout: 120_000 });
  return { status: run.status, stdout: run.stdout, stderr: run.stderr };
}
