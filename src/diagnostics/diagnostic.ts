// Problems found in a study, as values: where (file:line:column), what, and a hint for the author.

export interface SourceLocation {
  file: string;
  /** 1-based line in the study file. */
  line: number;
  /** 1-based column; omitted when only the line is known. */
  column?: number;
}

export interface Diagnostic {
  /** Stable identifier of the kind of problem, e.g. `input-unit-mismatch`. */
  code: string;
  message: string;
  at?: SourceLocation;
  hint?: string;
  /** A few lines of the study around the problem, already numbered. */
  excerpt?: string;
}

/** Thrown only at stage boundaries to carry diagnostics to the edge, which renders them once. */
export class StudyFailure extends Error {
  readonly diagnostics: Diagnostic[];
  constructor(diagnostics: Diagnostic[]) {
    super(diagnostics.map((d) => d.message).join('; '));
    this.name = 'StudyFailure';
    this.diagnostics = diagnostics;
  }
}

export function fail(diagnostic: Diagnostic): never {
  throw new StudyFailure([diagnostic]);
}

export function formatLocation(at: SourceLocation | undefined): string {
  if (!at) return '';
  return at.column ? `${at.file}:${at.line}:${at.column}` : `${at.file}:${at.line}`;
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
