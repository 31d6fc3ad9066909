// Problems as values, one shape for every stage: what (a catalogued code and a sentence), where, the value at fault, and a hint.
import type { DiagnosticCode } from './codes.ts';

export interface SourceLocation {
  file: string;
  /** 1-based line in the study file. */
  line: number;
  /** 1-based column; omitted when only the line is known. */
  column?: number;
  /** Where the problem ends (1-based, the column just past it), when the stage that found it knows. */
  endLine?: number;
  endColumn?: number;
}

/** A value at fault as a diagnostic shows it: plain data, so that it survives a process boundary and JSON. */
export type DiagnosticValue = number | string | boolean | null;

export interface Diagnostic {
  code: DiagnosticCode;
  message: string;
  at?: SourceLocation;
  hint?: string;
  /** The quantity, option or field at fault, e.g. `lengthKm` or `corridor.buses[2].reactors[0].qMvar`. */
  quantity?: string;
  /** What would have been accepted: a range such as `(0, 5000] km`, or the allowed values in words. */
  expected?: string;
  /** The value found (`null`: it is missing). */
  actual?: DiagnosticValue;
  /** A few lines of the study around the problem, already numbered. */
  excerpt?: string;
}

/**
 * The one way to throw problems: a list of diagnostics, carried to the edge, which renders them once. Library
 * modules whose callers must tell their problems apart throw a thin subclass of `Problem` instead.
 */
export class StudyFailure extends Error {
  readonly diagnostics: readonly Diagnostic[];
  constructor(diagnostics: readonly Diagnostic[], options?: { message?: string; cause?: unknown }) {
    super(options?.message ?? diagnostics.map((d) => d.message).join('; '), options?.cause === undefined ? undefined : { cause: options.cause });
    this.name = 'StudyFailure';
    this.diagnostics = diagnostics;
  }
}

/** One diagnostic thrown by a library module, its fields at hand (and own plain fields, so it crosses a worker as data). */
export class Problem extends StudyFailure {
  readonly code: DiagnosticCode;
  readonly hint?: string;
  readonly quantity?: string;
  readonly expected?: string;
  readonly actual?: DiagnosticValue;
  constructor(diagnostic: Diagnostic, options?: { message?: string; cause?: unknown }) {
    super([diagnostic], options);
    this.name = 'Problem';
    this.code = diagnostic.code;
    if (diagnostic.hint !== undefined) this.hint = diagnostic.hint;
    if (diagnostic.quantity !== undefined) this.quantity = diagnostic.quantity;
    if (diagnostic.expected !== undefined) this.expected = diagnostic.expected;
    if (diagnostic.actual !== undefined) this.actual = diagnostic.actual;
  }
}

export function fail(diagnostic: Diagnostic): never {
  throw new StudyFailure([diagnostic]);
}

export function formatLocation(at: SourceLocation | undefined): string {
  if (!at) return '';
  return at.column ? `${at.file}:${at.line}:${at.column}` : `${at.file}:${at.line}`;
}

/** Any value as a diagnostic can hold it: primitives as they are, anything else as short JSON text. */
export function plainValue(value: unknown): DiagnosticValue {
  if (value === null || typeof value === 'string' || typeof value === 'boolean') return value;
  if (typeof value === 'number') return Number.isFinite(value) ? value : String(value);
  let text: string;
  try {
    text = JSON.stringify(value) ?? String(value);
  } catch {
    text = String(value);
  }
  return text.length > 80 ? `${text.slice(0, 77)}...` : text;
}

/** Numbered lines of `source` around `line` (1-based), with a caret under `column` when known. */
export function excerptAround(source: string, line: number, column?: number, context = 2): string {
  const all = linesOf(source);
  const first = Math.max(1, line - context);
  const last = Math.min(all.length, line + context);
  const width = String(last).length;
  const out: string[] = [];
  for (let n = first; n <= last; n++) {
    const marker = n === line ? '>' : ' ';
    out.push(`  ${marker} ${String(n).padStart(width)} | ${all[n - 1] ?? ''}`);
    if (n === line && column && column > 0) {
      out.push(`    ${' '.repeat(width)} | ${' '.repeat(column - 1)}^`);
    }
  }
  return out.join('\n');
}

/** The lines of the last source excerpted: a study with many problems is split once, not once per problem. */
let split: { source: string; lines: string[] } | undefined;

function linesOf(source: string): string[] {
  if (split?.source !== source) split = { source, lines: source.split('\n') };
  return split.lines;
}
