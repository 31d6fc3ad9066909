import { spawnSync } from 'node:child_process';
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { buildSync } from 'esbuild';
import { describe, expect, it } from 'vitest';
import { KVARBOOK_ROOT } from '../../../src/installation.ts';
import { childEnvironment, childExecArguments } from '../../../src/execute/session.ts';
import { DENIAL_MARK } from '../../../src/execute/child/lockDown.ts';
import { scratchFolder } from '../../support/cli.ts';

/**
 * The second wall: suppose a block did get hold of the child's `process` (the first wall, no code from
 * strings and frozen host prototypes, is tested in isolation.test.ts). Each route below runs in a child
 * started with the session's own flags after lockDown(), and must end in a denial, not a module or handle.
 */
const ROUTES: Record<string, string> = {
  'require of net through process.mainModule': "process.mainModule.require('net')",
  'Module._load of http': "Module._load('http')",
  'a require made by Module.createRequire': "Module.createRequire(__filename)('dgram')",
  'process.getBuiltinModule of tls': "process.getBuiltinModule('tls')",
  'process.getBuiltinModule of _http_client, a second door to http': "process.getBuiltinModule('_http_client')",
  'process.getBuiltinModule of os': "process.getBuiltinModule('os')",
  'loading a file as a module by hand': "new Module('x').load(__filename)",
  // Sent to the child itself: were it ever let through, the parent (the test runner) would open a debugger port.
  'the debugger signal (SIGUSR1 opens a debugger port in a Node process)': 'process._debugProcess(process.pid)',
  'a signal to the parent process': "process.kill(process.ppid, 'SIGTERM')",
  'native bindings': "process.binding('tcp_wrap')",
  'the internal bindings': "process._linkedBinding('tcp_wrap')",
  'a native add-on': "process.dlopen({ exports: {} }, '/nonexistent.node')",
  'the diagnostic report with environment and host details': 'process.report.getReport()',
  fetch: "fetch('http://127.0.0.1:9/')",
  'a change of user': 'process.setuid(0)',
  'a require of fs by code loaded before lockDown': "require('fs')",
};

function routeProbe(): string {
  const lines = [
    "import Module from 'node:module';",
    `import { lockDown } from ${JSON.stringify(join(KVARBOOK_ROOT, 'src/execute/child/lockDown.ts'))};`,
    'lockDown();',
    'const outcomes: Record<string, string> = {};',
    ...Object.entries(ROUTES).map(
      ([name, expression]) =>
        `try { const got: any = ${expression}; outcomes[${JSON.stringify(name)}] = 'open: ' + typeof got; } catch (error: any) { outcomes[${JSON.stringify(name)}] = error?.code === '${DENIAL_MARK}' || error?.code === 'ERR_ACCESS_DENIED' || error?.code === 'ERR_DLOPEN_DISABLED' ? 'denied' : 'failed: ' + String(error?.message); }`,
    ),
    'process.stdout.write(JSON.stringify(outcomes));',
  ];
  return lines.join('\n');
}

function runProbe(): Record<string, string> {
  const folder = scratchFolder('kvarbook-lockdown-');
  const bundle = join(folder, 'probe.cjs');
  const built = buildSync({
    stdin: { contents: routeProbe(), loader: 'ts', resolveDir: KVARBOOK_ROOT },
    bundle: true,
    platform: 'node',
    format: 'cjs',
    target: 'node20',
    write: false,
    logLevel: 'silent',
  });
  writeFileSync(bundle, built.outputFiles[0]!.text);
  const run = spawnSync(process.execPath, [...childExecArguments(folder, bundle, 64), bundle], {
    encoding: 'utf8',
    env: childEnvironment(),
    timeout: 30_000,
  });
  if (run.status !== 0) throw new Error(`the probe failed: ${run.stderr}`);
  return JSON.parse(run.stdout) as Record<string, string>;
}

describe('the calculation child after lockDown, with process in hand', () => {
  const outcomes = runProbe();
  for (const name of Object.keys(ROUTES)) {
    it(`denies ${name}`, () => {
      expect(outcomes[name]).toBe('denied');
    });
  }
});

describe("the calculation child's environment", () => {
  it('holds no environment variable of the checker but locale and time zone', () => {
    const saved = { ...process.env };
    Object.assign(process.env, { KVARBOOK_TEST_TOKEN: 'secret', NODE_OPTIONS: '--require=/nonexistent.cjs', LANG: 'C.UTF-8' });
    try {
      expect(Object.keys(childEnvironment())).toEqual(['LANG']);
    } finally {
      for (const name of Object.keys(process.env)) if (!(name in saved)) delete process.env[name];
      Object.assign(process.env, saved);
    }
  });
});
