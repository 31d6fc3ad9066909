// The study lines around a problem, numbered, with a caret under its place: drawn once, at the edge, for every located problem.
import type { SourceLocation } from '../diagnostics/diagnostic.ts';

/**
 * Numbered lines of `source` around `at.line`, with carets under the problem: from its column to its end when it
 * ends on the same line, else one caret under its column, and none when only the line is known.
 */
export function excerptAround(source: string, at: Omit<SourceLocation, 'file'>, context = 2): string {
  const all = linesOf(source);
  const first = Math.max(1, at.line - context);
  const last = Math.min(all.length, at.line + context);
  const width = String(last).length;
  const out: string[] = [];
  for (let n = first; n <= last; n++) {
    const text = all[n - 1] ?? '';
    out.push(`  ${n === at.line ? '>' : ' '} ${String(n).padStart(width)} | ${text}`);
    if (n === at.line && at.column && at.column > 0) {
      const sameLine = at.endLine === undefined || at.endLine === at.line;
      const end = sameLine && at.endColumn !== undefined ? Math.min(at.endColumn, text.length + 1) : at.column + 1;
      out.push(`    ${' '.repeat(width)} | ${' '.repeat(at.column - 1)}${'^'.repeat(Math.max(1, end - at.column))}`);
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
