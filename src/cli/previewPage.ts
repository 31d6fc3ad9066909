// The live preview's page: the last good report under a panel of the last run's problems, and the script that swaps both in place.
import type { Diagnostic } from '../diagnostics/diagnostic.ts';
import { escapeHtml } from '../report/escape.ts';
import { CONTENT_SECURITY_POLICY, type ReportParts, reportBodyContent } from '../report/html.ts';
import { printableDiagnostic } from './terminal.ts';

/** The one path besides the page: the Server-Sent Events the page listens to. */
export const UPDATES_PATH = '/updates';

/** What the page shows; each new state gets a higher version, so that a page never goes back to an older one. */
export interface PreviewState {
  version: number;
  title: string;
  /** The content of the last good report's <body>; absent until a run succeeds. */
  report?: string;
  /** The last run's problems as the terminal words them (with the study lines around each); empty when it succeeded. */
  problems: readonly string[];
}

/** The report's own policy, with the one script of the page (by its nonce) and its update channel added: nothing else loads. */
export function previewPolicy(nonce: string): string {
  return `${CONTENT_SECURITY_POLICY}; script-src 'nonce-${nonce}'; connect-src 'self'`;
}

const PREVIEW_NOTICE =
  '<section class="seal unsealed"><p><strong>Live preview.</strong> A draft that follows the study file each time it is saved; it is not sealed, and <code>kvarbook run</code> writes the report files.</p></section>';

/** The report's body as the preview shows it, in place of the seal: with the preview's notice. */
export function previewReport(parts: ReportParts): string {
  return reportBodyContent(parts, PREVIEW_NOTICE);
}

/** Each problem in the terminal's words, with the study lines around it when `studyTexts` holds the file it is in. */
export function problemTexts(diagnostics: readonly Diagnostic[], studyTexts: ReadonlyMap<string, string>): string[] {
  return diagnostics.map((diagnostic) => printableDiagnostic(diagnostic, diagnostic.at && studyTexts.get(diagnostic.at.file)));
}

const PREVIEW_STYLE = `
.preview-problems { position: sticky; top: 0; z-index: 10; max-height: 45vh; overflow: auto; margin: 0 0 1rem; padding: 0.5rem 1rem;
  background: #fff3f0; border-bottom: 3px solid #a8321f; }
.preview-problems h2 { margin: 0.25rem 0; font-size: 1rem; }
.preview-problems pre { margin: 0.5rem 0; white-space: pre-wrap; font-size: 0.85rem; }
.preview-waiting { padding: 1rem; }
`;

function problemsPanel(state: PreviewState): string {
  if (state.problems.length === 0) return '';
  const heading = state.report
    ? 'The study as last saved did not run. The report below is from the last run that did.'
    : 'The study as saved does not run yet.';
  return `<section class="preview-problems" role="alert"><h2>${escapeHtml(heading)}</h2>${state.problems
    .map((text) => `<pre>${escapeHtml(text)}</pre>`)
    .join('')}</section>`;
}

/** What the page's <body> holds for a state: the same for the first load and for every swap after it. */
export function previewBody(state: PreviewState): string {
  const report = state.report ?? (state.problems.length === 0 ? '<p class="preview-waiting">Running the study…</p>' : '');
  return `${problemsPanel(state)}\n${report}`;
}

/** The message the update channel sends for a state: one line of JSON. */
export function previewUpdate(state: PreviewState): string {
  return JSON.stringify({ version: state.version, title: state.title, body: previewBody(state) });
}

/**
 * The page listens to the update channel and replaces its body with each newer state, in place: the page is not
 * loaded again, and the swap is one synchronous step, so the reader stays where they had scrolled to (the error
 * panel is sticky: it shows at the top of the window wherever the reader is, the report going on below it). This is the
 * page's only script; the body it receives holds none, and none would run if it did.
 */
function clientScript(version: number): string {
  return `(() => {
  let shown = ${version};
  const updates = new EventSource(${JSON.stringify(UPDATES_PATH)});
  updates.addEventListener('state', (event) => {
    const state = JSON.parse(event.data);
    if (state.version <= shown) return;
    shown = state.version;
    document.title = state.title;
    document.body.innerHTML = state.body;
  });
})();`;
}

/** The whole page for a state; `nonce` is fresh for each response and must match the policy it is served with. */
export function previewPage(state: PreviewState, stylesheet: string, nonce: string): string {
  return `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta http-equiv="Content-Security-Policy" content="${escapeHtml(previewPolicy(nonce))}">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>${escapeHtml(state.title)}</title>
<style>
${stylesheet}${PREVIEW_STYLE}</style>
<script nonce="${escapeHtml(nonce)}">
${clientScript(state.version)}
</script>
</head>
<body>
${previewBody(state)}
</body>
</html>
`;
}
