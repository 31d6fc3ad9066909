// The calculation child: receives transpiled blocks over IPC and runs them in one shared scope, reporting records.
import vm from 'node:vm';
import type { ChildMessage, Declaration, InputData, ParentMessage } from '../protocol.ts';
import { SCRIPT_NAME_PATTERN, blockScriptName, inlineScriptName } from '../protocol.ts';
import type { BlockErrorReport, BlockPosition, BlockRecord } from '../records.ts';
import { DEFAULT_DIGITS, formatQuantity } from '../../blocks/format.ts';
import * as solverModule from '../../solver/index.ts';
import * as chartModule from '../../blocks/charts.ts';
import { BlockApiError, Figure, InputValue, checkedText, createBlockApi } from '../../blocks/blockApi.ts';
import { lockDown } from './lockDown.ts';
import { Problem } from '../../diagnostics/diagnostic.ts';
import { freezeDeep, hardenContext } from './harden.ts';
import { ChartInputError } from '../../blocks/chartInputError.ts';
import { UnitProblem } from '../../study/units.ts';

let context: vm.Context | undefined;
let blockMilliseconds = 10_000;
let pending: BlockRecord[] = [];
const declaredBy = new Map<string, { blockIndex: number; locked: boolean }>();

function send(message: ChildMessage): void {
  process.send?.(message);
}

function positionsIn(stack: string | undefined): BlockPosition[] {
  if (!stack) return [];
  const positions: BlockPosition[] = [];
  for (const match of stack.matchAll(SCRIPT_NAME_PATTERN)) {
    positions.push({ blockIndex: match[1] === 'block' ? Number(match[2]) : -1 - Number(match[2]), line: Number(match[3]), column: Number(match[4]) });
  }
  return positions;
}

function report(error: unknown): BlockErrorReport {
  if (error !== null && typeof error === 'object') {
    const shaped = error as { name?: unknown; message?: unknown; stack?: unknown; code?: unknown; hint?: unknown };
    return {
      name: typeof shaped.name === 'string' ? shaped.name : 'Error',
      message: typeof shaped.message === 'string' ? shaped.message : String(error),
      ...(typeof shaped.code === 'string' ? { code: shaped.code } : {}),
      ...(typeof shaped.hint === 'string' ? { hint: shaped.hint } : {}),
      ...(error instanceof Problem ? valueFields(error) : {}),
      positions: positionsIn(typeof shaped.stack === 'string' ? shaped.stack : undefined),
    };
  }
  return { name: 'Thrown value', message: `the block threw ${String(error)} (not an Error)`, positions: [] };
}

/** The value at fault of one of kvarbook's own problems (solver, chart builders, block API), for the diagnostic. */
function valueFields(problem: Problem): Pick<BlockErrorReport, 'quantity' | 'expected' | 'actual'> {
  return {
    ...(problem.quantity !== undefined ? { quantity: problem.quantity } : {}),
    ...(problem.expected !== undefined ? { expected: problem.expected } : {}),
    ...(problem.actual !== undefined ? { actual: problem.actual } : {}),
  };
}

function createContext(inputs: InputData[]): vm.Context {
  const api = createBlockApi(
    inputs,
    {
      record: (record) => pending.push(record),
      callerPosition: () => positionsIn(new Error().stack)[0],
    },
    solverModule as Record<string, unknown>,
    chartModule as Record<string, unknown>,
  );
  const sandbox: Record<string, unknown> = {};
  for (const [name, value] of Object.entries(api)) {
    Object.defineProperty(sandbox, name, { value, writable: false, configurable: false, enumerable: true });
  }
  // Errors the builders and unit conversions throw reach blocks too, and with them their classes.
  freezeDeep([ChartInputError, UnitProblem]);
  // Blocks and inline values need no code generation from strings; refusing it closes one more door.
  const created = vm.createContext(sandbox, { codeGeneration: { strings: false, wasm: false } });
  hardenContext(created);
  return created;
}

/** Names a block declares become accessors on the shared scope: visible to later blocks, constant ones locked after. */
function declare(target: vm.Context, blockIndex: number, declarations: Declaration[]): void {
  for (const { name } of declarations) {
    if (declaredBy.has(name)) continue;
    let stored: unknown;
    const entry = { blockIndex, locked: false };
    declaredBy.set(name, entry);
    Object.defineProperty(target, name, {
      get: () => stored,
      set: (value: unknown) => {
        if (entry.locked) {
          throw new BlockApiError(
            'block-constant-reassigned',
            `"${name}" is a constant declared in an earlier block and cannot be reassigned`,
            'declare a new name, or use let in the block that declares it',
          );
        }
        stored = value;
      },
      enumerable: true,
      configurable: false,
    });
  }
}

function lockConstants(blockIndex: number, declarations: Declaration[]): void {
  for (const { name, kind } of declarations) {
    const entry = declaredBy.get(name);
    if (entry && entry.blockIndex === blockIndex && kind !== 'let' && kind !== 'var') entry.locked = true;
  }
}

async function runBlock(blockIndex: number, code: string, declarations: Declaration[]): Promise<void> {
  if (!context) throw new Error('the child was not started');
  pending = [];
  try {
    declare(context, blockIndex, declarations);
    const script = new vm.Script(code, { filename: blockScriptName(blockIndex) });
    await script.runInContext(context, { timeout: blockMilliseconds, breakOnSigint: false });
    lockConstants(blockIndex, declarations);
    send({ type: 'block-done', blockIndex, records: pending });
  } catch (error) {
    send({ type: 'block-failed', blockIndex, records: pending, error: report(error) });
  }
}

function inlineText(value: unknown): string {
  if (value instanceof Figure || value instanceof InputValue) return value.toString();
  if (typeof value === 'number') {
    if (!Number.isFinite(value))
      throw new BlockApiError(
        'block-non-finite',
        `the inline value is ${value}, not a finite number`,
        'a report never shows NaN or Infinity: check the calculation above it',
      );
    return formatQuantity(value, '', DEFAULT_DIGITS);
  }
  if (typeof value === 'string') return value;
  if (typeof value === 'boolean') return value ? 'yes' : 'no';
  throw new BlockApiError(
    'inline-type',
    `the inline value is ${value === null ? 'null' : typeof value}, which has no written form`,
    'show a number, text, a result, or figure(value, unit)',
  );
}

/** Evaluates the values in order and answers once: all their texts, or the first that failed. */
async function evaluateInlines(inlines: { inlineId: number; script: string }[]): Promise<void> {
  if (!context) throw new Error('the child was not started');
  const texts: { inlineId: number; text: string }[] = [];
  for (const { inlineId, script: code } of inlines) {
    try {
      const script = new vm.Script(code, { filename: inlineScriptName(inlineId) });
      const value = await script.runInContext(context, { timeout: blockMilliseconds });
      texts.push({ inlineId, text: checkedText('the inline value', 'its text', inlineText(value), 'text') });
    } catch (error) {
      send({ type: 'inline-failed', inlineId, error: report(error) });
      return;
    }
  }
  send({ type: 'inlines-done', texts });
}

let queue: Promise<void> = Promise.resolve();
process.on('message', (message: ParentMessage) => {
  queue = queue.then(async () => {
    switch (message.type) {
      case 'start':
        blockMilliseconds = message.blockMilliseconds;
        context = createContext(message.inputs);
        send({ type: 'ready' });
        break;
      case 'run-block':
        await runBlock(message.blockIndex, message.script, message.declarations);
        break;
      case 'evaluate-inlines':
        await evaluateInlines(message.inlines);
        break;
    }
  });
});
process.on('disconnect', () => process.exit(0));
lockDown();
