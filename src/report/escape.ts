// The one HTML escaper of the report, its printed header and the seal (markdown-it's, which the study body goes through too), and how a hash is written.
import MarkdownIt from 'markdown-it';

/** Text for element content and double-quoted attributes: `&`, `<`, `>` and `"` become entities. */
export const escapeHtml: (text: string) => string = new MarkdownIt().utils.escapeHtml;

/** Characters between the places a hash may break across lines: groups a reader can compare, the same on every line. */
const HASH_GROUP = 16;

/** A hash or fingerprint, escaped, with a break opportunity after every group of 16 characters and nowhere else. */
export function hashHtml(hash: string): string {
  return (hash.match(new RegExp(`.{1,${HASH_GROUP}}`, 'gu')) ?? []).map(escapeHtml).join('<wbr>');
}
