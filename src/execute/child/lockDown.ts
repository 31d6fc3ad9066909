// Closing the routes a study's code could use to reach the network, other processes or more code from the calculation child.
import Module from 'node:module';

/** Process methods that reach beyond the child: signals to other processes (including the debugger signal), identity, native code. */
const DENIED_PROCESS_METHODS = [
  'dlopen',
  'binding',
  '_linkedBinding',
  'kill',
  '_kill',
  'chdir',
  'setuid',
  'setgid',
  'seteuid',
  'setegid',
  'setgroups',
  'initgroups',
  'abort',
  '_debugProcess',
  '_debugEnd',
  '_startProfilerIdleNotifier',
  '_stopProfilerIdleNotifier',
  'loadEnvFile',
  'setSourceMapsEnabled',
] as const;

/** Globals that open connections; the network is not covered by the permission model. */
const DENIED_GLOBALS = ['fetch', 'WebSocket', 'EventSource', 'XMLHttpRequest', 'Request', 'Response', 'Headers', 'FormData'] as const;

export const DENIAL_MARK = 'kvarbook-denied';

function denial(what: string): Error {
  const error = new Error(
    `a calculation block may not use ${what}: studies are run by checkers on their own machines, so a block gets no network, files, processes or workers`,
  );
  Object.defineProperty(error, 'code', { value: DENIAL_MARK, enumerable: true });
  return error;
}

function replaceWithDenial(target: object, name: string, what: (argument: unknown) => string): void {
  if (!(name in target)) return;
  Object.defineProperty(target, name, {
    value: (argument: unknown) => {
      throw denial(what(argument));
    },
    configurable: false,
    writable: false,
  });
}

const named = (kind: string) => (request: unknown) => (typeof request === 'string' ? `the "${request}" module` : kind);

/**
 * Call once, after the child has loaded everything it needs and before the first block runs.
 * No module can be loaded afterwards, built-in or file: a list of forbidden modules would miss some
 * (`_http_client` and `_tls_wrap` open connections as well as `http` and `tls` do), and blocks need none.
 */
export function lockDown(): void {
  // Every CommonJS entry point: _load behind require and createRequire, load and _compile behind a hand-made Module.
  const loader = Module as unknown as Record<string, unknown> & { prototype: Record<string, unknown> };
  for (const name of ['_load', 'createRequire', 'runMain', '_preloadModules', 'register', '_resolveFilename', '_findPath']) {
    replaceWithDenial(loader, name, named(`module loading (Module.${name})`));
  }
  for (const name of ['require', 'load', '_compile']) replaceWithDenial(loader.prototype, name, named(`module loading (module.${name})`));
  Object.freeze(loader._extensions);
  Object.freeze(loader._cache);

  const target = process as unknown as Record<string, unknown>;
  replaceWithDenial(target, 'getBuiltinModule', named('process.getBuiltinModule'));
  for (const name of DENIED_PROCESS_METHODS) replaceWithDenial(target, name, () => `process.${name}`);
  // The report carries the environment and host details, and mainModule leads back to the loader.
  for (const name of ['report', 'mainModule']) {
    if (name in target)
      Object.defineProperty(target, name, {
        get: () => {
          throw denial(`process.${name}`);
        },
        configurable: false,
      });
  }

  const globals = globalThis as Record<string, unknown>;
  for (const name of DENIED_GLOBALS) {
    if (name in globals)
      Object.defineProperty(globals, name, {
        get: () => {
          throw denial(name);
        },
        configurable: false,
      });
  }
}
