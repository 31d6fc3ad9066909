// The one markdown-it configuration of kvarbook: CommonMark plus tables and the `{{ expression }}` inline value.
import MarkdownIt, { type MarkdownIt as MarkdownItInstance, type StateInline } from 'markdown-it';

export const INLINE_VALUE_TOKEN = 'kvarbook_inline_value';

/** The first `}}` found at or after `from` in `src`, per parse: a text of many `{{` is searched once, not once per `{{`. */
const closings = new WeakMap<object, { src: string; from: number; at: number }>();

function closingAfter(state: StateInline, from: number): number {
  const known = closings.get(state.env);
  // The first `}}` after an earlier position is also the first after this one, if it is not before it.
  if (known && known.src === state.src && known.from <= from && (known.at < 0 || known.at >= from)) return known.at;
  const at = state.src.indexOf('}}', from);
  closings.set(state.env, { src: state.src, from, at });
  return at;
}

/** Parse `{{ expression }}` as one token before emphasis or code can split it. */
function inlineValueRule(state: StateInline, silent: boolean): boolean {
  const start = state.pos;
  if (state.src.charCodeAt(start) !== 0x7b || state.src.charCodeAt(start + 1) !== 0x7b) return false;
  const end = closingAfter(state, start + 2);
  if (end < 0) return false;
  if (!silent) {
    const token = state.push(INLINE_VALUE_TOKEN, '', 0);
    token.content = state.src.slice(start + 2, end).trim();
    // Offset inside the paragraph text, so the parser can turn it into a study line.
    token.meta = { offset: start };
  }
  state.pos = end + 2;
  return true;
}

export function createMarkdown(): MarkdownItInstance {
  const md = new MarkdownIt('commonmark', { html: false });
  md.enable('table');
  md.inline.ruler.before('emphasis', 'kvarbook_inline_value', inlineValueRule);
  return md;
}
