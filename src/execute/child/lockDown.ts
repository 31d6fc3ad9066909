// Closing the routes a study's code could use to reach the network or other processes from the calculation child.
import Module from 'node:module';

/** Built-in modules a study has no business with; the permission model covers files, not the network. */
export const DENIED_MODULES = [
  'net', 'http', 'https', 'http2', 'dgram', 'tls', 'dns', 'dns/promises', 'worker_threads', 'child_process', 'cluster',
  'inspector', 'inspector/promises', 'repl', 'vm', 'v8', 'wasi', 'module', 'fs', 'fs/promises', 'process',
] as const;

export const DENIAL_MARK = 'kvarbook-denied';

function denial(what: string): Error {
  const error = new Error(
    `a calculation block may not use ${what}: studies are run by checkers on their own machines, so a block gets no network, files, processes or workers`,
  );
  (error as Error & { code: string }).code = DENIAL_MARK;
  return error;
}

/** Call once, after the child has loaded everything it needs and before the first block runs. */
export function lockDown(): void {
  const denied = new Set<string>(DENIED_MODULES);
  const isDenied = (request: string) => denied.has(request.replace(/^node:/, ''));
  type Loader = (request: string, ...rest: unknown[]) => unknown;
  const moduleInternals = Module as unknown as { _load: Loader };
  const originalLoad = moduleInternals._load;
  moduleInternals._load = function guardedLoad(this: unknown, request: string, ...rest: unknown[]) {
    if (isDenied(request)) throw denial(`the "${request}" module`);
    return originalLoad.call(this, request, ...rest);
  };
  const processWithBuiltins = process as unknown as { getBuiltinModule?: (id: string) => unknown };
  if (typeof processWithBuiltins.getBuiltinModule === 'function') {
    const original = processWithBuiltins.getBuiltinModule.bind(process);
    processWithBuiltins.getBuiltinModule = (id: string) => {
      if (isDenied(id)) throw denial(`the "${id}" module`);
      return original(id);
    };
  }
  const globals = globalThis as Record<string, unknown>;
  for (const name of ['fetch', 'WebSocket', 'EventSource', 'XMLHttpRequest', 'Request', 'Response', 'Headers', 'FormData']) {
    if (name in globals) {
      Object.defineProperty(globals, name, { get: () => { throw denial(name); }, configurable: false });
    }
  }
  for (const name of ['dlopen', 'binding', '_linkedBinding', 'kill', 'chdir', 'setuid', 'setgid', 'abort']) {
    const target = process as unknown as Record<string, unknown>;
    if (name in target) {
      Object.defineProperty(target, name, { value: () => { throw denial(`process.${name}`); }, configurable: false, writable: false });
    }
  }
}
