// What a text a study writes must be to reach a report: bounded in length, free of control and invisible characters, never NaN.
import { OUTPUT_LIMITS } from './limits.ts';
import { formatCount } from '../blocks/format.ts';

/**
 * - `name`: result and criterion names, column labels, units. Two names must not look alike, so no invisible or
 *   direction-changing character, and spaces only as single spaces between words (HTML collapses the rest).
 * - `caption`: table and chart captions: the same characters as a name, the length of a text.
 * - `text`: notes, cautions, printed lines, text values, cells, inline values: line breaks and tabs allowed, and
 *   the joiners some scripts need, but no other control character and nothing that reverses the reading direction.
 */
export type TextRole = 'name' | 'caption' | 'text';

/** Characters that change the direction text is shown in: they can make a text read differently from its characters. */
const DIRECTION_CONTROLS = /[\u061c\u200e\u200f\u202a-\u202e\u2066-\u2069]/u;
/** Control characters and unpaired surrogates: never in a report (line feed and tab only in texts). */
const CONTROLS_IN_TEXT = /[\u0000-\u0008\u000b-\u001f\u007f-\u009f\u2028\u2029\ufeff\ufff9-\ufffb]|\p{Cs}/u;
/** In a name, every format (invisible) character, separator or control, and every space that is not one plain space. */
const INVISIBLE_IN_NAME = /[\p{Cc}\p{Cf}\p{Zl}\p{Zp}\p{Cs}\p{Co}\p{Cn}]|[^\S ]/u;
const NON_FINITE_WORD = /(?<![\p{L}\p{N}_])(NaN|Infinity)(?![\p{L}\p{N}_])/u;

/** "U+202E" for a character, so a message can name what it refuses without showing it. */
export function codePointName(character: string): string {
  return `U+${character.codePointAt(0)!.toString(16).toUpperCase().padStart(4, '0')}`;
}

export interface TextProblem {
  /** `output-limit` (too long), `text-characters` (invisible or control characters) or `non-finite` (NaN as text). */
  code: 'output-limit' | 'text-characters' | 'non-finite';
  /** Completes "<what> …". */
  message: string;
}

/** Why `text` cannot be written in `role`, or undefined when it can; the first problem only. */
export function outputTextProblem(role: TextRole, text: string): TextProblem | undefined {
  const limit = role === 'name' ? OUTPUT_LIMITS.nameCharacters : OUTPUT_LIMITS.textCharacters;
  if (text.length > limit)
    return {
      code: 'output-limit',
      message: `is ${formatCount(text.length)} characters long; a report holds at most ${formatCount(limit)} characters for it`,
    };
  const control = DIRECTION_CONTROLS.exec(text) ?? (role === 'text' ? CONTROLS_IN_TEXT : INVISIBLE_IN_NAME).exec(text);
  if (control) {
    return {
      code: 'text-characters',
      message: `contains the invisible or control character ${codePointName(control[0])}, which could make it look like another text`,
    };
  }
  if (role !== 'text' && /^ | $| {2}/.test(text))
    return { code: 'text-characters', message: 'has spaces at its ends or two spaces in a row, which a report would not show' };
  const nonFinite = NON_FINITE_WORD.exec(text);
  if (nonFinite) return { code: 'non-finite', message: `says "${nonFinite[1]}": a report never shows a non-finite number, not even as text` };
  return undefined;
}

export const TEXT_PROBLEM_HINTS: Record<TextProblem['code'], string> = {
  'output-limit': 'a report is read by people: shorten the text, or put data in a table or a chart',
  'text-characters': 'write names and texts in plain characters: no invisible, control or direction-changing characters',
  'non-finite': 'a NaN or Infinity usually means a division by zero or a missing input upstream; check the calculation that made the text',
};

/** The key under which two names count as the same: look-alike forms (full-width letters, ligatures) fold together. */
export function nameKey(name: string): string {
  return name.normalize('NFKC');
}

const INVISIBLE_OR_DIRECTION = new RegExp(`${INVISIBLE_IN_NAME.source}|${DIRECTION_CONTROLS.source}`, 'gu');

/** Every control and invisible character written out as ⟨U+XXXX⟩, for texts that are shown but not refused (the log). */
export function markInvisible(text: string): string {
  return text.replace(INVISIBLE_OR_DIRECTION, (character) => `⟨${codePointName(character)}⟩`);
}

/** Whether a text says NaN or Infinity as a word. */
export function saysNonFinite(text: string): boolean {
  return NON_FINITE_WORD.test(text);
}
