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
