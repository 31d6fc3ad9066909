// The diff page: a revision diff as one self-contained HTML file a reviewer can file with the revision.
import { CONTENT_SECURITY_POLICY } from '../report/html.ts';
import { escapeHtml } from '../report/escape.ts';
import type { RevisionDiff } from './revisionDiff.ts';
import { blockTitle, criterionText, inputText, resultChangeText, resultValueText, sideText } from './words.ts';

/** What the report stylesheet has no rule for: the lines of a code diff. */
const DIFF_STYLE = `
pre.listing.code-diff { white-space: pre; }
.code-diff .plus { color: var(--pass); background: #e9f3ec; }
.code-diff .minus { color: var(--fail); background: #fbecea; }
.code-diff .hunk { color: var(--ink-soft); }
`;

const cell = (text: string, numeric = false) => `<td${numeric ? ' class="num"' : ''}>${escapeHtml(text)}</td>`;

function table(heads: string[], rows: string[][], numericFrom = Number.POSITIVE_INFINITY): string {
  const head = heads.map((text) => `<th>${escapeHtml(text)}</th>`).join('');
  const body = rows.map((row) => `<tr>${row.map((text, index) => cell(text, index >= numericFrom)).join('')}</tr>`).join('\n');
  return `<table class="data"><thead><tr>${head}</tr></thead><tbody>\n${body}\n</tbody></table>`;
}

function section(id: string, title: string, entries: number, content: () => string): string {
  return `<section id="${id}">\n<h2>${escapeHtml(title)}</h2>\n${entries === 0 ? '<p class="quiet">No change.</p>' : content()}\n</section>`;
}

function codeDiff(lines: string[]): string {
  const classOf = (line: string) => (line.startsWith('+') ? 'plus' : line.startsWith('-') ? 'minus' : 'same');
  return lines.map((line) => `<span class="${classOf(line)}">${escapeHtml(line)}</span>`).join('\n');
}

/** `stylesheet` is the report's own look, so that the page reads like the reports it compares. */
export function diffPage(diff: RevisionDiff, stylesheet: string): string {
  const { old: was, new: is } = diff;
  const title = `Changes from ${was.studyId} revision ${was.revision} to ${is.studyId} revision ${is.revision}`;
  const blocks = diff.blocks
    .map((change) => {
      const hunks = change.hunks
        .map(
          (hunk) =>
            `<span class="hunk">lines ${hunk.oldStart}–${hunk.oldStart + Math.max(hunk.oldLines - 1, 0)} → ${hunk.newStart}–${hunk.newStart + Math.max(hunk.newLines - 1, 0)}</span>\n${codeDiff(hunk.lines)}`,
        )
        .join('\n');
      return `<h3>${escapeHtml(blockTitle(change))}</h3>\n<pre class="listing code-diff">${hunks}</pre>`;
    })
    .join('\n');
  return `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta http-equiv="Content-Security-Policy" content="${CONTENT_SECURITY_POLICY}">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta name="generator" content="kvarbook ${escapeHtml(is.kvarbookVersion)}">
<title>${escapeHtml(title)}</title>
<style>
${stylesheet}${DIFF_STYLE}</style>
</head>
<body>
<header class="title-block">
<p class="kicker">Revision diff</p>
<h1>${escapeHtml(title)}</h1>
<dl class="meta">
<div><dt>Old</dt><dd>${escapeHtml(sideText(was))}</dd></div>
<div><dt>New</dt><dd>${escapeHtml(sideText(is))}</dd></div>
<div><dt>Changes</dt><dd>${diff.differences === 0 ? 'none: the two reports agree in every figure, input, criterion, caution and block' : String(diff.differences)}</dd></div>
</dl>
</header>
<p class="quiet">Read from the reports' own data (seal, or results document, and the study source each carries); the seals are not verified here: run kvarbook check on each report for that.</p>
${section('front-matter', 'Front matter', diff.frontMatter.length, () =>
  table(
    ['Field', 'Old', 'New'],
    diff.frontMatter.map((change) => [change.field, change.old ?? 'none', change.new ?? 'none']),
  ),
)}
${section('inputs', 'Inputs', diff.inputs.length, () =>
  table(
    ['Input', 'Change', 'Old', 'New'],
    diff.inputs.map((change) => [change.name, change.change, inputText(change.old), inputText(change.new)]),
  ),
)}
${section('results', 'Results that moved', diff.results.length, () =>
  table(
    ['Result', 'Old', 'New', 'Change'],
    diff.results.map((change) => [change.name, resultValueText(change.old), resultValueText(change.new), resultChangeText(change)]),
    1,
  ),
)}
${section('criteria', 'Criteria whose outcome changed', diff.criteria.length, () =>
  table(
    ['Criterion', 'Change', 'Old', 'New'],
    diff.criteria.map((change) => [change.name, change.change, criterionText(change.old), criterionText(change.new)]),
  ),
)}
${section('cautions', 'Cautions', diff.cautions.added.length + diff.cautions.removed.length, () =>
  table(['Change', 'Caution'], [...diff.cautions.added.map((text) => ['added', text]), ...diff.cautions.removed.map((text) => ['removed', text])]),
)}
${section('blocks', 'Calculation blocks', diff.blocks.length, () => blocks)}
${section('environment', 'What ran the calculation', diff.environment.length, () =>
  table(
    ['Field', 'Old', 'New'],
    diff.environment.map((change) => [change.field, change.old ?? 'none', change.new ?? 'none']),
  ),
)}
<footer class="colophon">Produced by kvarbook diff from ${escapeHtml(was.report)} and ${escapeHtml(is.report)}.</footer>
</body>
</html>
`;
}
