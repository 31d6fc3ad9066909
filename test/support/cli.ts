// Running the kvarbook command line as a user would: as its own process, or through the same edge in this process; in scratch folders removed after each test file.
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
// esbuild starts its service processes in the working folder it found when it was loaded, and they live until this process
// exits: loaded here, before any in-process run changes folder, so that none is left behind in a study's folder.
import 'esbuild';
import { afterAll } from 'vitest';

export const KVARBOOK_BIN = resolve(import.meta.dirname, '../../bin/kvarbook.mjs');

export interface CliOutcome {
  status: number | null;
  stdout: string;
  stderr: string;
}

const scratchFolders: string[] = [];
afterAll(() => {
  for (const folder of scratchFolders.splice(0)) rmSync(folder, { recursive: true, force: true, maxRetries: 3 });
});

/** A fresh folder under the temporary folder, removed with everything in it when the test file ends. */
export function scratchFolder(prefix = 'kvarbook-cli-'): string {
  const folder = mkdtempSync(join(tmpdir(), prefix));
  scratchFolders.push(folder);
  return folder;
}

/** A path beside the scratch folders (a copy of one, say), removed with them. */
export function scratchPath(path: string): string {
  scratchFolders.push(path);
  return path;
}

/** The executable as its own process: for what only a process shows (exit status, its environment, being killed, its memory). */
export function kvarbook(args: string[], cwd: string, env: NodeJS.ProcessEnv = {}): CliOutcome {
  const run = spawnSync(process.execPath, [KVARBOOK_BIN, ...args], { cwd, encoding: 'utf8', env: { ...process.env, ...env }, timeout: 120_000 });
  return { status: run.status, stdout: run.stdout, stderr: run.stderr };
}

/**
 * The same command line in this process: src/cli's `main` with the arguments, working folder and environment a process
 * would have, and what it writes to stdout and stderr captured. It skips only what bin/kvarbook.mjs adds (tsx, the
 * narrowed environment, setting the exit status), and the seconds of start-up a process pays; calls must not overlap.
 */
export async function kvarbookInProcess(args: string[], cwd: string, env: NodeJS.ProcessEnv = {}): Promise<CliOutcome> {
  const written = { stdout: '', stderr: '' };
  const capture = (stream: NodeJS.WriteStream, key: keyof typeof written) => {
    const original = stream.write;
    stream.write = ((chunk: string | Uint8Array) => {
      written[key] += typeof chunk === 'string' ? chunk : Buffer.from(chunk).toString('utf8');
      return true;
    }) as typeof stream.write;
    return () => {
      stream.write = original;
    };
  };
  const { main } = await import('../../src/cli/main.ts');
  const previousFolder = process.cwd();
  const restoreOut = capture(process.stdout, 'stdout');
  const restoreErr = capture(process.stderr, 'stderr');
  try {
    process.chdir(cwd);
    const status = await main(args, { ...process.env, ...env });
    return { status, ...written };
  } finally {
    process.chdir(previousFolder);
    restoreOut();
    restoreErr();
  }
}
