// What the command line prints: results on stdout, diagnostics on stderr, a progress line only on a terminal; every text escaped.
import { type Diagnostic, formatLocation } from '../diagnostics/diagnostic.ts';
import { excerptAround } from './excerpt.ts';

export interface Terminal {
  say(line: string): void;
  /** Something the user must know though the command succeeded: one line on stderr. */
  warn(line: string): void;
  progress(line: string): void;
  progressDone(): void;
  /** Lends the terminal a study's text, so that every problem located in that study prints with its lines. */
  studyText(file: string, text: string): void;
  problems(diagnostics: readonly Diagnostic[]): void;
}

/**
 * The styles kvarbook paints with itself (node:util styleText: bold, red, green and their resets). They are the only
 * escape sequences a printed line may keep; a study's text could contain them too, but no other sequence (no
 * cursor movement, clearing, hiding, titles or links) and no line break.
 */
const OWN_STYLE = /^\u001b\[(?:1|22|31|32|39)m/;
/** C0 and C1 controls, DEL, line and paragraph separators, direction controls, and invisible format characters. */
const UNPRINTABLE = /[\u0000-\u001f\u007f-\u009f\u00ad\u061c\u180e\u200b-\u200f\u2028-\u202e\u2060-\u2069\ufeff\ufff9-\ufffb]|\p{Cs}/gu;

function escaped(character: string): string {
  const code = character.codePointAt(0)!;
  if (character === '\n') return '\\n';
  if (character === '\r') return '\\r';
  if (character === '\t') return '\\t';
  return code <= 0xff ? `\\x${code.toString(16).padStart(2, '0')}` : `\\u${code.toString(16).padStart(4, '0')}`;
}

/** `text` as one printable line: every control or invisible character written as an escape (\x1b, \u202e, \n). */
export function printable(text: string, keepOwnStyles = false): string {
  if (!keepOwnStyles) return text.replace(UNPRINTABLE, escaped);
  let out = '';
  let from = 0;
  for (const match of text.matchAll(UNPRINTABLE)) {
    const at = match.index;
    if (at < from) continue;
    out += text.slice(from, at);
    const style = match[0] === '\u001b' ? OWN_STYLE.exec(text.slice(at, at + 5)) : null;
    out += style ? style[0] : escaped(match[0]);
    from = at + (style ? style[0].length : match[0].length);
  }
  return out + text.slice(from);
}

/** A text that may run over several lines (a type error, a hint): each line printable, continuations indented. */
function printableLines(text: string, indent: string): string {
  return text
    .split('\n')
    .map((line, index) => (index === 0 ? printable(line) : `${indent}${printable(line)}`))
    .join('\n');
}

/**
 * path:line:col: error: message [code], then the study lines around the place (when `studyText` is the text of the
 * study it is in) and the hint, with nothing of the study printed raw.
 */
export function printableDiagnostic(diagnostic: Diagnostic, studyText?: string): string {
  const where = printable(formatLocation(diagnostic.at));
  const lines = [`${where ? `${where}: ` : ''}error: ${printableLines(diagnostic.message, '    ')} [${printable(diagnostic.code)}]`];
  if (diagnostic.at && studyText !== undefined)
    lines.push(
      excerptAround(studyText, diagnostic.at)
        .split('\n')
        .map((line) => printable(line))
        .join('\n'),
    );
  if (diagnostic.hint) lines.push(`  hint: ${printableLines(diagnostic.hint, '        ')}`);
  return lines.join('\n');
}

/** A failure that is not a study's problem, as the command line reports it: a defect of kvarbook's own. */
export function unexpectedProblem(error: unknown): Diagnostic {
  return {
    code: 'internal',
    message: `kvarbook failed unexpectedly: ${(error as Error).message}`,
    hint: 'please report this with the study that caused it',
  };
}

interface Streams {
  out: NodeJS.WritableStream;
  err: NodeJS.WritableStream & { isTTY?: boolean };
}

export function processTerminal(streams: Streams = { out: process.stdout, err: process.stderr }): Terminal {
  const interactive = Boolean(streams.err.isTTY);
  const studyTexts = new Map<string, string>();
  let showing = false;
  const clear = () => {
    if (showing) streams.err.write('\r\x1b[2K');
    showing = false;
  };
  return {
    say: (line) => {
      clear();
      streams.out.write(`${printable(line, true)}\n`);
    },
    warn: (line) => {
      clear();
      streams.err.write(`kvarbook: warning: ${printable(line)}\n`);
    },
    progress: (line) => {
      if (!interactive) return;
      clear();
      streams.err.write(`kvarbook: ${printable(line)}`);
      showing = true;
    },
    progressDone: clear,
    studyText: (file, text) => {
      studyTexts.set(file, text);
    },
    problems: (diagnostics) => {
      clear();
      for (const diagnostic of diagnostics)
        streams.err.write(`${printableDiagnostic(diagnostic, diagnostic.at && studyTexts.get(diagnostic.at.file))}\n`);
    },
  };
}
