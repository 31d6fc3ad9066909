import { createServer, type Server } from 'node:net';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { lineOf, studyText } from '../support/studies.ts';
import { kvarbook } from '../support/cli.ts';
import { CANARY_TEXT, attackStudy, checkerMachine, fence, firstProblem, runAttack } from './attackStudies.ts';

/** The attack line, a route to the host's `process` that every escape below starts from. */
const HOST_PROCESS_VIA_API = "const hostProcess = (result as any).constructor('return process')();";

describe("a study cannot reach the checker's files", () => {
  it('refuses the host Function constructor reached through a block-API function, at the attacking line', async () => {
    const machine = checkerMachine();
    const source = attackStudy(
      machine,
      `${HOST_PROCESS_VIA_API}\nresult('stolen', hostProcess.mainModule.require('fs').readFileSync(${JSON.stringify(machine.canaryPath)}, 'utf8'));`,
    );
    const before = machine.snapshot();
    const problem = await firstProblem(machine, source);
    expect(problem).toMatchObject({ code: 'block-denied', at: { file: machine.studyPath, line: lineOf(source, 'hostProcess =') } });
    expect(problem.message).toContain('compile code from text');
    expect(JSON.stringify(problem)).not.toContain('checker secret');
    expect(machine.snapshot()).toEqual(before);
  });

  it('refuses the Function constructor reached through a figure the block API returned', async () => {
    const machine = checkerMachine();
    const source = attackStudy(machine, "const shown = figure(1, 'km');\nconst stolen = (shown as any).constructor.constructor('return process')();");
    expect(await firstProblem(machine, source)).toMatchObject({ code: 'block-denied', at: { line: lineOf(source, 'const stolen') } });
  });

  it('refuses the Function constructor reached through a solver function', async () => {
    const machine = checkerMachine();
    const source = attackStudy(machine, "const stolen = (solver.lineModel as any).constructor('return process')();");
    expect(await firstProblem(machine, source)).toMatchObject({ code: 'block-denied', at: { line: lineOf(source, 'const stolen') } });
  });

  it('finds no constructor chain on the inputs object, which has no prototype', async () => {
    const machine = checkerMachine();
    const source = attackStudy(machine, "const stolen = (inputs as any).constructor.constructor('return process')();");
    const problem = await firstProblem(machine, source);
    expect(problem).toMatchObject({ code: 'block-threw', at: { line: lineOf(source, 'const stolen') } });
    expect(problem.message).toContain("reading 'constructor'");
  });

  it('refuses the async-function constructor of the sandbox itself', async () => {
    const machine = checkerMachine();
    const source = attackStudy(
      machine,
      "const AsyncFunction = Object.getPrototypeOf(async function () {}).constructor;\nconst stolen = await AsyncFunction('return process')();",
    );
    expect(await firstProblem(machine, source)).toMatchObject({ code: 'block-denied', at: { line: lineOf(source, 'const stolen') } });
  });

  it('refuses eval of text inside a block', async () => {
    const machine = checkerMachine();
    const source = attackStudy(machine, "const stolen = (0, eval)('globalThis');");
    expect(await firstProblem(machine, source)).toMatchObject({ code: 'block-denied', at: { line: lineOf(source, 'const stolen') } });
  });

  it('refuses a dynamic import() of a file module with a located denial', async () => {
    const machine = checkerMachine();
    const source = attackStudy(machine, "const files = await import('node:fs');\nresult('stolen', files.readFileSync('canary.txt', 'utf8'));");
    const problem = await firstProblem(machine, source);
    expect(problem).toMatchObject({ code: 'block-denied', at: { line: lineOf(source, "await import('node:fs')") } });
    expect(problem.message).toContain('import() is refused');
  });

  it('cannot set the host stack-trace hook through an error the block API threw', async () => {
    const machine = checkerMachine();
    const source = attackStudy(
      machine,
      [
        'let hostError: any;',
        "try { result('', 1); } catch (error: any) { hostError = Object.getPrototypeOf(error.constructor); }",
        'hostError.prepareStackTrace = (_error: unknown, frames: any[]) => frames.map((frame) => frame.getThis());',
      ].join('\n'),
    );
    const problem = await firstProblem(machine, source);
    expect(problem).toMatchObject({ code: 'block-threw', at: { line: lineOf(source, 'hostError.prepareStackTrace') } });
    expect(problem.message).toContain("read only property 'prepareStackTrace'");
  });

  it('cannot install its own stack-trace hook, which would be handed the host frames below the block', async () => {
    const machine = checkerMachine();
    // The sandbox's Error is frozen with the rest of its built-ins, so the hook never exists to run inside table().
    const source = attackStudy(
      machine,
      [
        '(Error as any).prepareStackTrace = (_error: unknown, frames: any[]) => frames.map((frame) => frame.getThis());',
        "table([{ get probe() { void new Error().stack; return 1; } }], { caption: 'probe' });",
      ].join('\n'),
    );
    const problem = await firstProblem(machine, source);
    expect(problem).toMatchObject({ code: 'block-threw', at: { line: lineOf(source, 'prepareStackTrace') } });
    expect(problem.message).toContain('not extensible');
  });

  it('cannot plant a getter on the host Object prototype for host code to call', async () => {
    const machine = checkerMachine();
    const source = attackStudy(
      machine,
      "const hostObjectPrototype = Object.getPrototypeOf(Object.getPrototypeOf(result));\nObject.defineProperty(hostObjectPrototype, 'noDeprecation', { get() { return this; } });",
    );
    const problem = await firstProblem(machine, source);
    expect(problem).toMatchObject({ code: 'block-threw', at: { line: lineOf(source, 'Object.defineProperty') } });
    expect(problem.message).toContain('not extensible');
  });
});

describe('a study cannot write files or start processes', () => {
  it('leaves the canary unchanged and adds no file when a block tries to write through the host', async () => {
    const machine = checkerMachine();
    const source = attackStudy(
      machine,
      `${HOST_PROCESS_VIA_API}\nhostProcess.mainModule.require('fs').writeFileSync(${JSON.stringify(machine.canaryPath)}, 'overwritten');`,
    );
    const before = machine.snapshot();
    expect((await firstProblem(machine, source)).code).toBe('block-denied');
    expect(machine.snapshot()).toEqual(before);
  });

  it('finds no require, process or Buffer among the globals a block sees', async () => {
    const machine = checkerMachine();
    const source = attackStudy(
      machine,
      "result('reachable', ['require', 'process', 'Buffer', 'module', 'fetch', 'setTimeout'].filter((name) => name in globalThis).join(',') || 'none');",
    );
    expect((await runAttack(machine, source)).results.results[0]?.value).toBe('none');
  });

  it('refuses to spawn a process, at the attacking line', async () => {
    const machine = checkerMachine();
    const source = attackStudy(machine, `${HOST_PROCESS_VIA_API}\nhostProcess.mainModule.require('child_process').execSync('touch spawned');`);
    expect(await firstProblem(machine, source)).toMatchObject({ code: 'block-denied', at: { line: lineOf(source, 'hostProcess =') } });
  });
});

describe('a study cannot open a network connection', () => {
  let server: Server;
  let port = 0;
  let connections = 0;
  beforeAll(async () => {
    server = createServer((socket) => {
      connections += 1;
      socket.destroy();
    });
    await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
    port = (server.address() as { port: number }).port;
  });
  afterAll(() => new Promise<void>((resolve) => server.close(() => resolve())));

  it('has no fetch in a block', async () => {
    const machine = checkerMachine();
    const source = attackStudy(machine, `await fetch('http://127.0.0.1:${port}/');`);
    const problem = await firstProblem(machine, source);
    expect(problem.message).toContain('fetch is not defined');
    expect(connections).toBe(0);
  });

  for (const moduleName of ['net', 'http', 'dgram', 'tls', '_http_client']) {
    it(`refuses the ${moduleName} module through the host`, async () => {
      const machine = checkerMachine();
      const source = attackStudy(
        machine,
        `${HOST_PROCESS_VIA_API}\nconst opened = hostProcess.getBuiltinModule('${moduleName}');\nopened.connect?.(${port}, '127.0.0.1');`,
      );
      expect((await firstProblem(machine, source)).code).toBe('block-denied');
      expect(connections).toBe(0);
    });
  }
});

describe("a study cannot exhaust the checker's machine", () => {
  it('stops a block whose arrays grow without bound with a memory-limit diagnostic naming the block', async () => {
    const machine = checkerMachine();
    const source = attackStudy(
      machine,
      'const hoard: number[][] = [];\nwhile (true) hoard.push(new Array(100_000).fill(1.5));',
      'limits: { blockSeconds: 20, heapMb: 64 }',
    );
    const problem = await firstProblem(machine, source);
    expect(problem.code).toBe('memory-limit');
    expect(problem.message).toContain(`the block at line ${lineOf(source, '```ts')}`);
    expect(problem.at?.line).toBe(lineOf(source, '```ts'));
  });

  it('stops a block that hoards typed-array memory outside the JavaScript heap', async () => {
    const machine = checkerMachine();
    const source = attackStudy(
      machine,
      'const hoard: Float64Array[] = [];\nwhile (true) hoard.push(new Float64Array(10_000_000).fill(1.5));',
      'limits: { blockSeconds: 20, heapMb: 64 }',
    );
    expect((await firstProblem(machine, source)).code).toBe('memory-limit');
  });

  it('stops an endless synchronous loop with a time-limit diagnostic at the block', async () => {
    const machine = checkerMachine();
    const source = attackStudy(machine, 'for (;;) {}', 'limits: { blockSeconds: 0.5 }');
    expect(await firstProblem(machine, source)).toMatchObject({ code: 'time-limit', at: { line: lineOf(source, '```ts') } });
  });

  it('stops a loop that starts after an await', async () => {
    const machine = checkerMachine();
    const source = attackStudy(machine, 'await Promise.resolve();\nwhile (true) {}', 'limits: { blockSeconds: 0.5 }');
    expect((await firstProblem(machine, source)).code).toBe('time-limit');
  });

  it('stops a block that waits forever on a shared-memory lock', async () => {
    const machine = checkerMachine();
    const source = attackStudy(machine, 'Atomics.wait(new Int32Array(new SharedArrayBuffer(4)), 0, 0);', 'limits: { blockSeconds: 0.5 }');
    expect((await firstProblem(machine, source)).code).toBe('time-limit');
  });

  it('stops a study whose blocks each stay under the block limit but together pass the study limit', async () => {
    const machine = checkerMachine();
    const busyWait = (name: string) => `const ${name} = Date.now() + 800;\nwhile (Date.now() < ${name}) {}`;
    const source = studyText({
      frontMatter: 'limits: { blockSeconds: 1, studySeconds: 1 }',
      body: [fence(busyWait('firstUntil')), fence(busyWait('secondUntil'))].join('\n\n'),
    });
    expect((await firstProblem(machine, source)).code).toBe('time-limit');
  });
});

describe('values a study returns cannot pollute the host', () => {
  const prototypeNames = () =>
    [Object.prototype, Array.prototype, Function.prototype].map((prototype) => Object.getOwnPropertyNames(prototype).sort().join(','));

  it('keeps Object.prototype clean after a chart specification carrying __proto__ and constructor keys', async () => {
    const machine = checkerMachine();
    const before = prototypeNames();
    const poison = JSON.stringify({ polluted: 'yes' });
    const specText = JSON.stringify({
      mark: 'point',
      data: { values: [{ x: 1 }] },
      encoding: { x: { field: 'x', type: 'quantitative' } },
      config: { constructor: { prototype: { polluted: 'yes' } } },
    }).replace('"config":{', `"__proto__":${poison},"config":{"__proto__":${poison},`);
    const source = attackStudy(machine, `chart(JSON.parse(${JSON.stringify(specText)}), { caption: 'Poisoned' });`);
    const product = await runAttack(machine, source);
    expect(product.report.body).toContain('Poisoned');
    expect(({} as Record<string, unknown>).polluted).toBeUndefined();
    expect(prototypeNames()).toEqual(before);
  });

  it('refuses solver arguments carrying a __proto__ key at the calling line, with the host clean', async () => {
    const machine = checkerMachine();
    const before = prototypeNames();
    const source = attackStudy(
      machine,
      `solver.polarForm({ value: JSON.parse(${JSON.stringify('{"re": 1, "im": 0, "__proto__": {"polluted": "yes"}}')}) });`,
    );
    const problem = await firstProblem(machine, source);
    expect(problem.at?.line).toBe(lineOf(source, 'solver.polarForm'));
    expect(problem.message).toContain('__proto__');
    expect(({} as Record<string, unknown>).polluted).toBeUndefined();
    expect(prototypeNames()).toEqual(before);
  });

  it('keeps the host clean when results and criteria are named __proto__ and constructor', async () => {
    const machine = checkerMachine();
    const before = prototypeNames();
    const source = attackStudy(
      machine,
      "result('__proto__', 1);\nresult('constructor', 2);\ncriterion('__proto__', 1, { max: 2 });\ntable([{ __proto__: 1, constructor: 2 }], { caption: 'keys' });",
    );
    await runAttack(machine, source).catch(() => undefined);
    expect(({} as Record<string, unknown>).polluted).toBeUndefined();
    expect(prototypeNames()).toEqual(before);
  });
});

describe('a study cannot end or impersonate its calculation process', () => {
  it('finds no process object to exit with, at the calling line', async () => {
    const machine = checkerMachine();
    const source = attackStudy(machine, "result('before', 1);\nprocess.exit(0);");
    expect(await firstProblem(machine, source)).toMatchObject({
      code: 'block-threw',
      message: 'ReferenceError: process is not defined',
      at: { line: lineOf(source, 'process.exit') },
    });
  });

  it('cannot forge a reply through the host process either', async () => {
    const machine = checkerMachine();
    const source = attackStudy(
      machine,
      `${HOST_PROCESS_VIA_API}\nhostProcess.send({ type: 'block-done', blockIndex: 0, records: [{ kind: 'result', name: 'forged', value: 1, unit: '', digits: 4 }] });`,
    );
    expect((await firstProblem(machine, source)).code).toBe('block-denied');
  });
});

describe('the host never evaluates study text', () => {
  it('evaluates inline values in the calculation process, where there is no process object', async () => {
    const machine = checkerMachine();
    const source = studyText({
      body: `${fence('const shown = 1;')}\n\nThe host would say object: {{ typeof (globalThis as any).process }}; the marker {{ ((globalThis as any).hostMarker = 'set') }}.`,
    });
    const product = await runAttack(machine, source);
    expect([...product.run.outcome.inlineTexts.values()]).toEqual(['undefined', 'set']);
    expect((globalThis as Record<string, unknown>).hostMarker).toBeUndefined();
  });
});

describe('an attack through the command line', () => {
  it("exits 1 with a located message and no stack trace, leaving the checker's files as they were", () => {
    const machine = checkerMachine();
    const source = attackStudy(
      machine,
      `${HOST_PROCESS_VIA_API}\nhostProcess.mainModule.require('fs').writeFileSync('../canary.txt', 'overwritten');`,
    );
    const before = machine.snapshot();
    const { status, stderr } = kvarbook(['run', 'attack.study.md', '--no-typecheck'], machine.studyFolder);
    expect(status).toBe(1);
    expect(stderr).toContain(`attack.study.md:${lineOf(source, 'hostProcess =')}:`);
    expect(stderr).toContain('[block-denied]');
    expect(stderr).not.toMatch(/\n\s+at /);
    expect(machine.snapshot()).toEqual(before);
    expect(machine.snapshot().get('canary.txt')).toBe(CANARY_TEXT);
  });
});
