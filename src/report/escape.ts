// The one HTML escaper of the report, its printed header and the seal: markdown-it's, which the study body goes through too.
import MarkdownIt from 'markdown-it';

/** Text for element content and double-quoted attributes: `&`, `<`, `>` and `"` become entities. */
export const escapeHtml: (text: string) => string = new MarkdownIt().utils.escapeHtml;
