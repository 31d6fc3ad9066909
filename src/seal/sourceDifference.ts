// Which lines of a study source differ from the sealed one: the changed runs of a line diff, numbered in both.
import { structuredPatch } from 'diff';

/** One run of changed lines: where it starts in each text, the lines the sealed source had, and those it has now. */
export interface SourceChange {
  sealedLine: number;
  sourceLine: number;
  removed: string[];
  added: string[];
}

/** The changed runs of lines from `sealed` to `source`, without context; empty when the texts are equal. */
export function sourceDifference(sealed: string, source: string): SourceChange[] {
  const patch = structuredPatch('sealed', 'source', sealed, source, '', '', { context: 0 });
  return patch.hunks.map((hunk) => ({
    // A run that only adds lines starts after line oldStart of the sealed text (the diff's own convention): name the line it follows.
    sealedLine: hunk.oldLines === 0 ? hunk.oldStart + 1 : hunk.oldStart,
    sourceLine: hunk.newLines === 0 ? hunk.newStart + 1 : hunk.newStart,
    removed: hunk.lines.filter((line) => line.startsWith('-')).map((line) => line.slice(1)),
    added: hunk.lines.filter((line) => line.startsWith('+')).map((line) => line.slice(1)),
  }));
}
