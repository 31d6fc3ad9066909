// Execute stage: runs a study's blocks and inline values in a sandboxed child process and maps everything to study lines.
import { fork, type ChildProcess } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import { type Diagnostic, type SourceLocation, StudyFailure } from '../diagnostics/diagnostic.ts';
import type { RunLimits, Study } from '../study/model.ts';
import { CEILING_OPTIONS, type GrantedLimits } from './limits.ts';
import type { EffectiveInput } from '../study/inputs.ts';
import type { ChildMessage, InputData, ParentMessage } from './protocol.ts';
import type { BlockErrorReport, BlockRecord } from './records.ts';
import { type TranspiledBlock, type TranspiledInline, studyPositionOf } from './transpile.ts';
import { childBundlePath } from './childBundle.ts';
import { type OutputBudget, sanitizeErrorReport, sanitizeRecords } from './sanitize.ts';
import { TEXT_PROBLEM_HINTS, outputTextProblem } from './outputText.ts';
import { DENIAL_MARK } from './child/lockDown.ts';
import { type DiagnosticCode, isDiagnosticCode } from '../diagnostics/codes.ts';

export type LocatedRecord = Exclude<BlockRecord, never> & { at?: SourceLocation };

export interface BlockOutcome {
  blockIndex: number;
  records: LocatedRecord[];
}

export interface ExecutionOutcome {
  blocks: BlockOutcome[];
  /** Formatted text of each `{{ }}` value, by inline id. */
  inlineTexts: Map<number, string>;
}

export interface ExecutionHooks {
  /** Told before each block runs, for a progress line. */
  onBlockStart?: (block: TranspiledBlock, position: number, count: number) => void;
  /** Told of each block's records as soon as they are checked, so later stages (the charts) can start while blocks still run. */
  onBlockDone?: (outcome: BlockOutcome) => void;
}

const HOST_FRAME_HINT = 'the error comes from the block at this line';
const DENIED_HINT = 'a study may only compute, with its inputs, the solver and the block API';

/** Node flags for the child: read only the study's folder and its own bundle; nothing else. */
export function childExecArguments(studyFolder: string, bundlePath: string, heapMb: number): string[] {
  return [
    '--experimental-permission',
    `--allow-fs-read=${bundlePath}`,
    `--allow-fs-read=${studyFolder}`,
    `--max-old-space-size=${heapMb}`,
    '--no-warnings',
    '--disable-proto=throw',
    // Every host function a block can touch has the host's Function constructor one step away; without
    // code generation from strings that constructor cannot compile anything, so it cannot reach `process`.
    '--disallow-code-generation-from-strings',
    // Host prototypes a block can reach (through API functions and solver results) cannot be changed,
    // so a block can neither plant getters that host code would call nor set Error.prepareStackTrace.
    '--frozen-intrinsics',
    // Deep enough to find a block's own frame under solver calls; set here because Error is frozen in the child.
    '--stack-trace-limit=64',
  ];
}

/** The child's environment: locale and time zone only, so no token or NODE_OPTIONS of the checker's reaches a study. */
export function childEnvironment(): NodeJS.ProcessEnv {
  const kept: NodeJS.ProcessEnv = {};
  for (const name of ['LANG', 'LC_ALL', 'TZ']) {
    if (process.env[name] !== undefined) kept[name] = process.env[name];
  }
  return kept;
}

export interface ExecutionOptions {
  hooks?: ExecutionHooks;
  /** The limits granted to the study; the study's own when absent. */
  granted?: GrantedLimits;
  /** Ends the run early (a newer save superseded it): the child is killed at once and the run fails. */
  signal?: AbortSignal;
  /**
   * Another build of the calculation child (a test's deliberately changed solver); set only by code that calls the
   * pipeline, never by the command line, the environment or a study.
   */
  childBundle?: string;
  /** A child started earlier with the same limits (`startCalculation`); one is started here when absent. */
  started?: CalculationProcess;
}

/** A calculation child forked ahead of its first block; closing it ends the child. */
export interface CalculationProcess {
  readonly conversation: Conversation;
  close(): void;
}

/**
 * Forks the calculation child. Node's start and the child's loading of the block library take a few hundred
 * milliseconds, so the pipeline forks it as soon as the study's limits are known and transpiles and type-checks
 * meanwhile; the child runs nothing of the study until its blocks are sent.
 */
export function startCalculation(study: Study, limits: RunLimits, childBundle?: string): CalculationProcess {
  const bundlePath = childBundle ?? childBundlePath();
  const child = fork(bundlePath, [], {
    execArgv: childExecArguments(dirname(resolve(study.file)), bundlePath, limits.heapMb),
    env: childEnvironment(),
    stdio: ['ignore', 'ignore', 'pipe', 'ipc'],
    serialization: 'json',
  });
  const conversation = new Conversation(child, residentLimitBytes(limits.heapMb));
  return { conversation, close: () => conversation.close() };
}

export async function executeStudy(
  study: Study,
  inputs: readonly EffectiveInput[],
  blocks: readonly TranspiledBlock[],
  inlines: readonly TranspiledInline[],
  options: ExecutionOptions = {},
): Promise<ExecutionOutcome> {
  const hooks = options.hooks ?? {};
  const granted = options.granted ?? { limits: study.meta.limits, asked: {} };
  const limits = granted.limits;
  const calculation = options.started ?? startCalculation(study, limits, options.childBundle);
  const { conversation } = calculation;
  const studyDeadline = Date.now() + limits.studySeconds * 1000;
  const stop = () => conversation.close();
  options.signal?.addEventListener('abort', stop, { once: true });
  try {
    options.signal?.throwIfAborted();
    const notStarted = (): Diagnostic => ({
      code: 'child-start',
      message: 'the calculation process did not start',
      hint: 'run `npm ci` and try again',
    });
    try {
      await conversation.ask(
        { type: 'start', inputs: inputs.map(toInputData), blockMilliseconds: limits.blockSeconds * 1000 },
        limits.blockSeconds * 1000 + 10_000,
        notStarted,
      );
    } catch (error) {
      if (error instanceof ChildExit) throw new StudyFailure([notStarted()]);
      throw error;
    }
    const ask = async (message: ParentMessage, at: SourceLocation, what: string, steps = 1): Promise<ChildMessage> => {
      try {
        return await conversation.ask(message, budget(limits.blockSeconds * steps, studyDeadline), () => timeoutDiagnostic(at, what, granted));
      } catch (error) {
        if (error instanceof ChildExit) throw new StudyFailure([exitDiagnostic(at, what, error, granted)]);
        throw error;
      }
    };
    const outcome: ExecutionOutcome = { blocks: [], inlineTexts: new Map() };
    const written: OutputBudget = { characters: 0 };
    const inlinesAfter = new Map<number, TranspiledInline[]>();
    for (const inline of inlines) {
      const group = inlinesAfter.get(inline.inline.afterRunnableBlocks);
      if (group) group.push(inline);
      else inlinesAfter.set(inline.inline.afterRunnableBlocks, [inline]);
    }
    const evaluateInlinesAfter = async (runnableCount: number) => {
      const group = inlinesAfter.get(runnableCount);
      if (!group) return;
      const first = group[0]!.inline;
      const what =
        group.length === 1 ? `the inline value {{ ${first.expression} }}` : `the ${group.length} inline values from line ${first.at.line} on`;
      const reply = await ask(
        { type: 'evaluate-inlines', inlines: group.map(({ inlineId, script }) => ({ inlineId, script })) },
        first.at,
        what,
        group.length,
      );
      if (reply.type === 'inline-failed') {
        const failed = group.find((inline) => inline.inlineId === reply.inlineId);
        if (failed) throw new StudyFailure([inlineFailure(failed, sanitizeErrorReport(reply.error))]);
      }
      if (reply.type !== 'inlines-done' || !Array.isArray(reply.texts) || reply.texts.length !== group.length)
        throw new StudyFailure([outOfTurn(first.at)]);
      group.forEach((inline, index) => {
        const answer = reply.texts[index] as { inlineId?: unknown; text?: unknown } | undefined;
        if (answer?.inlineId !== inline.inlineId || typeof answer.text !== 'string') throw new StudyFailure([outOfTurn(inline.inline.at)]);
        const problem = outputTextProblem('text', answer.text);
        if (problem) {
          throw new StudyFailure([
            {
              code: `inline-${problem.code}`,
              message: `the inline value {{ ${inline.inline.expression} }}: its text ${problem.message}`,
              at: inline.inline.at,
              hint: TEXT_PROBLEM_HINTS[problem.code],
            },
          ]);
        }
        written.characters += answer.text.length;
        outcome.inlineTexts.set(inline.inlineId, answer.text);
      });
    };
    await evaluateInlinesAfter(0);
    for (const [position, block] of blocks.entries()) {
      hooks.onBlockStart?.(block, position, blocks.length);
      const at = { file: study.file, line: block.block.fenceLine };
      const reply = await ask(
        { type: 'run-block', blockIndex: block.blockIndex, script: block.script, declarations: block.declarations },
        at,
        `the block at line ${block.block.fenceLine}`,
      );
      if (reply.type === 'block-failed' && reply.blockIndex === block.blockIndex)
        throw new StudyFailure([blockFailure(study, block, sanitizeErrorReport(reply.error), granted)]);
      if (reply.type !== 'block-done' || reply.blockIndex !== block.blockIndex) throw new StudyFailure([outOfTurn(at)]);
      const done = { blockIndex: block.blockIndex, records: locate(study, block, sanitizeRecords(reply.records, study, at, written)) };
      outcome.blocks.push(done);
      hooks.onBlockDone?.(done);
      await evaluateInlinesAfter(position + 1);
    }
    return outcome;
  } finally {
    options.signal?.removeEventListener('abort', stop);
    calculation.close();
  }
}

function outOfTurn(at: SourceLocation): Diagnostic {
  return { code: 'child-protocol', message: 'the calculation process answered out of turn', at, hint: 'a block must not call process.send' };
}

function budget(blockSeconds: number, studyDeadline: number): number {
  return Math.max(1, Math.min(blockSeconds * 1000 + 2000, studyDeadline - Date.now()));
}

function toInputData(input: EffectiveInput): InputData {
  return {
    name: input.name,
    value: input.value,
    unit: input.unit,
    si: input.si,
    ...(input.kind ? { kind: input.kind } : {}),
    ...(input.description ? { description: input.description } : {}),
  };
}

function locate(study: Study, block: TranspiledBlock, records: BlockRecord[]): LocatedRecord[] {
  return records.map((record) => {
    const { position, ...rest } = record;
    if (!position || position.blockIndex !== block.blockIndex)
      return { ...rest, at: { file: study.file, line: block.block.fenceLine } } as LocatedRecord;
    const mapped = studyPositionOf(block, position.line, position.column);
    return { ...rest, at: { file: study.file, line: mapped.line, column: mapped.column } } as LocatedRecord;
  });
}

/** How to get more of a limit: the front matter, or, where the run's ceiling capped what the study asked, that ceiling. */
function raiseHint(granted: GrantedLimits, keys: readonly (keyof RunLimits)[], unit: Record<keyof RunLimits, string>): string {
  const capped = keys.filter((key) => granted.asked[key] !== undefined);
  if (capped.length === 0) return `may raise limits.${keys.join(' or limits.')} in the front matter`;
  return capped
    .map(
      (key) =>
        `the study asks limits.${key}: ${granted.asked[key]}, but this run's ceiling is ${granted.limits[key]} ${unit[key]} (raise it with ${CEILING_OPTIONS[key]})`,
    )
    .join('; ');
}

const LIMIT_UNITS: Record<keyof RunLimits, string> = { blockSeconds: 's', studySeconds: 's', heapMb: 'MB' };

function timeoutDiagnostic(at: SourceLocation, what: string, granted: GrantedLimits): Diagnostic {
  const { limits } = granted;
  return {
    code: 'time-limit',
    message: `${what} ran longer than its time limit (${limits.blockSeconds} s per block, ${limits.studySeconds} s per study) and was stopped`,
    at,
    hint: `look for a loop that never ends; a long calculation ${raiseHint(granted, ['blockSeconds', 'studySeconds'], LIMIT_UNITS)}`,
  };
}

function exitDiagnostic(at: SourceLocation, what: string, exit: ChildExit, granted: GrantedLimits): Diagnostic {
  if (exit.outOfMemory) {
    const { heapMb } = granted.limits;
    return {
      code: 'memory-limit',
      message: `${what} used more memory than its limits allow (${heapMb} MB heap, ${residentLimitBytes(heapMb) / 1024 / 1024} MB in all) and was stopped`,
      at,
      hint: `look for an array or string that grows without bound; a large study ${raiseHint(granted, ['heapMb'], LIMIT_UNITS)}`,
    };
  }
  return {
    code: 'child-exit',
    message: `${what} stopped the calculation process (exit code ${exit.exitCode ?? 'none'}${exit.signal ? `, signal ${exit.signal}` : ''})`,
    at,
    hint: 'a block must not end the process it runs in',
  };
}

function blockFailure(study: Study, block: TranspiledBlock, error: BlockErrorReport, granted: GrantedLimits): Diagnostic {
  const own = error.positions.find((position) => position.blockIndex === block.blockIndex);
  const mapped = own ? studyPositionOf(block, own.line, own.column) : { line: block.block.fenceLine, column: 1 };
  const at = { file: study.file, line: mapped.line, column: mapped.column };
  if (/Script execution timed out/.test(error.message)) return timeoutDiagnostic(at, `the block at line ${block.block.fenceLine}`, granted);
  const refused = refusedCapability(error);
  if (refused) {
    return {
      code: 'block-denied',
      message: `a calculation block may not ${refused}`,
      at,
      hint: DENIED_HINT,
    };
  }
  const code: DiagnosticCode = error.code === DENIAL_MARK ? 'block-denied' : error.code && isDiagnosticCode(error.code) ? error.code : 'block-threw';
  // A code of the block's own (or of Node's) is not in the catalogue; the message keeps it.
  const ownCode = code === 'block-threw' && error.code ? ` (code ${error.code})` : '';
  return {
    code,
    message: `${error.name && error.name !== 'Error' ? `${error.name}: ` : ''}${error.message}${ownCode}`,
    at,
    hint: error.hint ?? (error.code === DENIAL_MARK ? DENIED_HINT : HOST_FRAME_HINT),
    ...valueFields(error),
  };
}

function valueFields(error: BlockErrorReport): Pick<Diagnostic, 'quantity' | 'expected' | 'actual'> {
  return {
    ...(error.quantity !== undefined ? { quantity: error.quantity } : {}),
    ...(error.expected !== undefined ? { expected: error.expected } : {}),
    ...(error.actual !== undefined ? { actual: error.actual } : {}),
  };
}

/** An inline value's problem: the block API's text problems under their inline names, kvarbook's own codes as they are. */
function inlineCode(error: BlockErrorReport): DiagnosticCode {
  if (!error.code) return 'inline-failed';
  const asInline = error.code.replace(/^block-/, 'inline-');
  if (isDiagnosticCode(asInline) && asInline.startsWith('inline-')) return asInline;
  return isDiagnosticCode(error.code) ? error.code : 'inline-failed';
}

/** What the child's own guards (no code from strings, no module loader in the sandbox) refused, in the reader's words. */
function refusedCapability(error: BlockErrorReport): string | undefined {
  if (error.name === 'EvalError' && /code generation from strings/i.test(error.message)) {
    return 'compile code from text (eval, Function, or a constructor reached through an object)';
  }
  if (error.code === 'ERR_VM_DYNAMIC_IMPORT_CALLBACK_MISSING') return 'import modules: import() is refused';
  return undefined;
}

function inlineFailure(inline: TranspiledInline, error: BlockErrorReport): Diagnostic {
  const notDefined = /(\w+) is not defined/.exec(error.message);
  return {
    code: notDefined ? 'inline-undefined' : inlineCode(error),
    message: notDefined
      ? `the inline value {{ ${inline.inline.expression} }} refers to "${notDefined[1]}", which no block above it defines`
      : `the inline value {{ ${inline.inline.expression} }} failed: ${error.message}`,
    at: inline.inline.at,
    hint: error.hint ?? 'an inline value sees the names declared in the blocks above it, and the inputs as inputs.<name>',
    ...valueFields(error),
  };
}

/** One question at a time to the child, each with a deadline; the child is killed on a timeout or a crash. */
class Conversation {
  private readonly child: ChildProcess;
  private stderr = '';
  private waiting: { resolve: (message: ChildMessage) => void; reject: (error: unknown) => void } | undefined;
  private exited: { code: number | null; signal: NodeJS.Signals | null } | undefined;
  private overMemory = false;
  private readonly memoryWatch: NodeJS.Timeout;

  constructor(child: ChildProcess, residentLimit: number) {
    this.child = child;
    this.memoryWatch = setInterval(() => {
      const resident = child.pid === undefined ? undefined : residentBytes(child.pid);
      if (resident !== undefined && resident > residentLimit) {
        this.overMemory = true;
        child.kill('SIGKILL');
      }
    }, MEMORY_POLL_MS);
    this.memoryWatch.unref();
    child.stderr?.setEncoding('utf8');
    child.stderr?.on('data', (chunk: string) => {
      if (this.stderr.length < 64_000) this.stderr += chunk;
    });
    child.on('message', (message: unknown) => {
      const waiting = this.waiting;
      if (!waiting || !isChildMessage(message)) return;
      if (
        message.type === 'ready' ||
        message.type === 'block-done' ||
        message.type === 'block-failed' ||
        message.type === 'inlines-done' ||
        message.type === 'inline-failed'
      ) {
        this.waiting = undefined;
        waiting.resolve(message);
      }
    });
    child.on('exit', (code, signal) => {
      clearInterval(this.memoryWatch);
      this.exited = { code, signal };
      const waiting = this.waiting;
      this.waiting = undefined;
      waiting?.reject(new ChildExit(code, signal, this.stderr, this.overMemory));
    });
    child.on('error', () => undefined);
  }

  ask(message: ParentMessage, timeoutMs: number, onTimeout: () => Diagnostic): Promise<ChildMessage> {
    if (this.exited) return Promise.reject(new ChildExit(this.exited.code, this.exited.signal, this.stderr, this.overMemory));
    return new Promise<ChildMessage>((resolvePromise, rejectPromise) => {
      const timer = setTimeout(() => {
        this.waiting = undefined;
        this.child.kill('SIGKILL');
        rejectPromise(new StudyFailure([onTimeout()]));
      }, timeoutMs);
      this.waiting = {
        resolve: (reply) => {
          clearTimeout(timer);
          resolvePromise(reply);
        },
        reject: (error) => {
          clearTimeout(timer);
          rejectPromise(error);
        },
      };
      this.child.send(message);
    });
  }

  close(): void {
    clearInterval(this.memoryWatch);
    if (!this.exited) this.child.kill('SIGKILL');
  }
}

function isChildMessage(message: unknown): message is ChildMessage {
  return typeof message === 'object' && message !== null && typeof (message as { type?: unknown }).type === 'string';
}

/** The child ended by itself: out of memory, or killed from inside. */
export class ChildExit extends Error {
  readonly exitCode: number | null;
  readonly signal: NodeJS.Signals | null;
  readonly outOfMemory: boolean;
  constructor(exitCode: number | null, signal: NodeJS.Signals | null, stderr: string, overResidentLimit: boolean) {
    super(`the calculation process ended unexpectedly (exit code ${exitCode}, signal ${signal})`);
    this.exitCode = exitCode;
    this.signal = signal;
    this.outOfMemory = overResidentLimit || /heap out of memory|Allocation failed/i.test(stderr);
  }
}

/**
 * Typed-array buffers live outside the V8 heap that --max-old-space-size caps, so the child's resident
 * memory is watched as well: the heap limit twice over (young generation, code, buffers) plus a margin.
 */
function residentLimitBytes(heapMb: number): number {
  return (2 * heapMb + RESIDENT_MARGIN_MB) * 1024 * 1024;
}

const RESIDENT_MARGIN_MB = 256;
const MEMORY_POLL_MS = 100;

/** Resident memory of a process from /proc (Linux); undefined where there is no /proc or the process is gone. */
function residentBytes(pid: number): number | undefined {
  try {
    const match = /^VmRSS:\s+(\d+) kB/m.exec(readFileSync(`/proc/${pid}/status`, 'utf8'));
    return match ? Number(match[1]) * 1024 : undefined;
  } catch {
    return undefined;
  }
}
