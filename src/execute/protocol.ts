// The messages between the parent (which owns files and the clock) and the calculation child (which runs blocks).
import type { BlockErrorReport, BlockRecord } from './records.ts';
import type { QuantityKind } from '../study/units.ts';

/** An input as sent to the child: only plain data. */
export interface InputData {
  name: string;
  value: number;
  unit: string;
  si: number;
  kind?: QuantityKind;
  description?: string;
}

export type DeclarationKind = 'const' | 'let' | 'var' | 'function' | 'class';

export interface Declaration {
  name: string;
  kind: DeclarationKind;
}

export type ParentMessage =
  | { type: 'start'; inputs: InputData[]; blockMilliseconds: number }
  | { type: 'run-block'; blockIndex: number; script: string; declarations: Declaration[] }
  /** Every inline value that follows one block, in one message: a round trip per value would cost more than the values. */
  | { type: 'evaluate-inlines'; inlines: { inlineId: number; script: string }[] };

export type ChildMessage =
  | { type: 'ready' }
  | { type: 'block-done'; blockIndex: number; records: BlockRecord[] }
  | { type: 'block-failed'; blockIndex: number; records: BlockRecord[]; error: BlockErrorReport }
  | { type: 'inlines-done'; texts: { inlineId: number; text: string }[] }
  | { type: 'inline-failed'; inlineId: number; error: BlockErrorReport };

/** The file name a block's script carries inside the child, so stack frames can be traced back to it. */
export function blockScriptName(blockIndex: number): string {
  return `kvarbook-block-${blockIndex}.js`;
}

export function inlineScriptName(inlineId: number): string {
  return `kvarbook-inline-${inlineId}.js`;
}

export const SCRIPT_NAME_PATTERN = /kvarbook-(block|inline)-(\d+)\.js:(\d+):(\d+)/g;
