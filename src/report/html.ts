// Render stage: a finished run to one self-contained HTML report (inline CSS and SVG, no scripts, no fetches).
import type { Token } from 'markdown-it';
import { createMarkdown, INLINE_VALUE_TOKEN } from '../study/markdown.ts';
import type { SourceLocation } from '../diagnostics/diagnostic.ts';
import type { LocatedRecord } from '../execute/session.ts';
import type { CriterionRecord, ResultRecord, TableRecord } from '../execute/records.ts';
import { columnFormat, displayUnit, formatLimits, formatQuantity, formatStated } from '../blocks/format.ts';
import { type StudyRun, calculationLogSteps, cautionsOf, recordsOf, solverCallOptions } from './studyRun.ts';
import { STUDY_SOURCE_SCRIPT, jsonScript } from './embed.ts';
import { escapeHtml, hashHtml } from './escape.ts';
import { describeLimits } from './provenance.ts';
import { flipsSummary, sensitivityAppendix } from './sensitivity.ts';

// The study body's markdown-it, with the report's rules (below) registered once.
const bodyMarkdown = createMarkdown();

/** A chart already rendered to SVG by the render stage, keyed by the record it came from. */
export type RenderedCharts = Map<LocatedRecord, string>;

export interface ReportParts {
  /** Everything before the seal slot. */
  head: string;
  /** Everything after the seal slot: the report body a seal's hash covers together with `head`. */
  body: string;
}

/**
 * Nothing is loaded when the report is opened: no script, frame, font, stylesheet or image from anywhere, only the
 * report's own inline style and data: images. Inline SVG is part of the document and needs no permission.
 */
export const CONTENT_SECURITY_POLICY =
  "default-src 'none'; img-src data:; style-src 'unsafe-inline'; font-src data:; base-uri 'none'; form-action 'none'";

export const SEAL_SLOT_START = '<!--kvarbook:seal-->';
export const SEAL_SLOT_END = '<!--/kvarbook:seal-->';

function where(at: SourceLocation | undefined): string {
  if (!at) return '';
  return `<span class="where">line ${at.line}</span>`;
}

/** Ids taken so far, and for each base the next number to try, so that a hundred equal headings cost a hundred steps. */
interface Slugs {
  taken: Set<string>;
  next: Map<string, number>;
}

function slug(text: string, slugs: Slugs): string {
  const base =
    text
      .toLowerCase()
      .replace(/[^a-z0-9]+/g, '-')
      .replace(/^-|-$/g, '') || 'section';
  let candidate = base;
  for (let n = slugs.next.get(base) ?? 2; slugs.taken.has(candidate); n++) {
    candidate = `${base}-${n}`;
    slugs.next.set(base, n + 1);
  }
  slugs.taken.add(candidate);
  return candidate;
}

/** One phrase for the title block and the command line: how the criteria came out. */
export function criteriaStatus(failed: number, total: number): string {
  if (total === 0) return 'no criteria stated';
  if (failed === 0) return total === 1 ? 'the one criterion is met' : `all ${total} criteria met`;
  return `${failed} of ${total} ${total === 1 ? 'criterion' : 'criteria'} not met`;
}

function verdict(passed: boolean): string {
  return passed ? '<span class="verdict pass">meets</span>' : '<span class="verdict fail">fails</span>';
}

function criteriaTable(criteria: (CriterionRecord & { at?: SourceLocation })[], withNotes: boolean): string {
  if (criteria.length === 0) return '<p class="quiet">This study states no design criteria.</p>';
  const rows = criteria
    .map(
      (record) =>
        `<tr class="${record.passed ? 'pass' : 'fail'}"><td>${escapeHtml(record.name)}</td><td class="num">${escapeHtml(formatQuantity(record.value, record.unit, record.digits))}</td><td>${escapeHtml(formatLimits(record))}</td><td>${verdict(record.passed)}</td>${
          withNotes ? `<td>${record.note ? escapeHtml(record.note) : ''} ${where(record.at)}</td>` : ''
        }</tr>`,
    )
    .join('\n');
  return `<table class="criteria"><thead><tr><th>Criterion</th><th>Value</th><th>Required</th><th>Outcome</th>${withNotes ? '<th>Note</th>' : ''}</tr></thead><tbody>\n${rows}\n</tbody></table>`;
}

/** Rows beyond which a table may break across pages rather than move whole to the next one. */
const LONG_TABLE_ROWS = 6;

/** A numbered table in one figure with its caption, so that a page never parts them; each column's numbers in one format. */
function tableHtml(record: TableRecord, number: number): string {
  const head = record.columns
    .map((column) => `<th>${escapeHtml(column.label)}${column.unit ? `<span class="unit">${escapeHtml(displayUnit(column.unit))}</span>` : ''}</th>`)
    .join('');
  const formats = record.columns.map((column, index) =>
    columnFormat(
      record.rows.map((row) => row[index]).filter((cell): cell is number => typeof cell === 'number'),
      column.digits,
    ),
  );
  const rows = record.rows
    .map(
      (row) =>
        `<tr>${row
          .map((cell, index) =>
            typeof cell === 'number' ? `<td class="num">${escapeHtml(formats[index]!(cell))}</td>` : `<td>${escapeHtml(formatQuantity(cell))}</td>`,
          )
          .join('')}</tr>`,
    )
    .join('\n');
  const caption = `<figcaption><span class="label">Table ${number}</span>${record.caption ? ` ${escapeHtml(record.caption)}` : ''}</figcaption>`;
  // A long table may run over a page break, its header repeated; its caption still stays with its first rows.
  return `<figure class="table${record.rows.length > LONG_TABLE_ROWS ? ' long' : ''}">${caption}<table class="data"><thead><tr>${head}</tr></thead><tbody>\n${rows}\n</tbody></table></figure>`;
}

interface Counters {
  table: number;
  figure: number;
}

/** A block's outputs in the order it produced them; consecutive results read as one list, consecutive criteria as one table. */
function outputsHtml(records: LocatedRecord[], charts: RenderedCharts, counters: Counters): string {
  const parts: string[] = [];
  let pendingResults: ResultRecord[] = [];
  let pendingCriteria: (CriterionRecord & { at?: SourceLocation })[] = [];
  const flush = () => {
    if (pendingResults.length > 0) {
      parts.push(
        `<dl class="results">${pendingResults
          .map(
            (record) =>
              `<div><dt>${escapeHtml(record.name)}</dt><dd>${escapeHtml(formatQuantity(record.value, record.unit, record.digits))}</dd>${record.note ? `<p class="note">${escapeHtml(record.note)}</p>` : ''}</div>`,
          )
          .join('')}</dl>`,
      );
    }
    if (pendingCriteria.length > 0) parts.push(criteriaTable(pendingCriteria, false));
    pendingResults = [];
    pendingCriteria = [];
  };
  for (const record of records) {
    if (record.kind === 'result' && pendingCriteria.length === 0) {
      pendingResults.push(record);
      continue;
    }
    if (record.kind === 'criterion' && pendingResults.length === 0) {
      pendingCriteria.push(record);
      continue;
    }
    flush();
    if (record.kind === 'result') pendingResults.push(record);
    if (record.kind === 'criterion') pendingCriteria.push(record);
    switch (record.kind) {
      case 'table':
        counters.table += 1;
        parts.push(tableHtml(record, counters.table));
        break;
      case 'chart': {
        counters.figure += 1;
        const svg = charts.get(record) ?? '';
        parts.push(
          `<figure class="chart">${svg}<figcaption><span class="label">Figure ${counters.figure}</span> ${escapeHtml(record.caption)}</figcaption></figure>`,
        );
        break;
      }
      case 'text':
        parts.push(`<pre class="printed">${escapeHtml(record.text)}</pre>`);
        break;
      case 'caution':
        parts.push(`<p class="caution-inline"><span class="label">Caution</span> ${escapeHtml(record.text)}</p>`);
        break;
      default:
        break;
    }
  }
  flush();
  return parts.length ? `<div class="outputs">${parts.join('\n')}</div>` : '';
}

/** A calculation block's code as the code appendix lists it. */
interface Listing {
  /** "A3": the appendix letter and the block's number among the blocks that run. */
  number: string;
  fenceLine: number;
  /** The heading the block sits under, so that a reader of the appendix finds its place in the body. */
  heading: string | undefined;
  code: string;
  hidden: boolean;
}

/** A listing's id keeps its capital letter, which no heading's slug has, so that a heading "Calculation A1" cannot take it. */
function listingId(number: string): string {
  return `calculation-${number}`;
}

/** The code appendix comes first of the appendices when the code is placed there. */
const CODE_APPENDIX = { id: 'calculations', letter: 'A', title: 'Calculations' } as const;

/** What one render of the study body needs: markdown-it hands it to every rule as `env`. */
type BodyEnv = {
  run: StudyRun;
  /** Each block that runs, with its calculation number (1, 2, …) by block index. */
  calculationNumbers: Map<number, number>;
  /** Filled in by the render when the code goes to the appendix. */
  listings: Listing[];
  charts: RenderedCharts;
  counters: Counters;
  headings: { level: number; id: string; text: string }[];
  slugs: Slugs;
  blocksByFence: Map<number, StudyRun['study']['blocks'][number]>;
  outcomes: Map<number, StudyRun['outcome']['blocks'][number]>;
};

type BodyRule = (tokens: Token[], index: number, options: unknown, env: BodyEnv) => string;

/** The report's rules for the study body, registered once; each render passes its run in `env`. */
const bodyRules: Record<string, BodyRule> = {
  [INLINE_VALUE_TOKEN]: (tokens, index, _options, env) => {
    const id = (tokens[index]!.meta as { id?: number } | null)?.id;
    const text = id === undefined ? undefined : env.run.outcome.inlineTexts.get(id);
    return `<span class="value">${escapeHtml(text ?? '')}</span>`;
  },
  heading_open: (tokens, index, _options, env) => {
    const token = tokens[index]!;
    const text = tokens[index + 1]?.children?.map((child) => (child.type === INLINE_VALUE_TOKEN ? '' : child.content)).join('') ?? '';
    const id = slug(text, env.slugs);
    const level = Number(token.tag.slice(1));
    // The report's own h1 is the title; body headings move one level down.
    const shifted = Math.min(6, level + 1);
    env.headings.push({ level, id, text });
    return `<h${shifted} id="${id}">`;
  },
  heading_close: (tokens, index) => `</h${Math.min(6, Number(tokens[index]!.tag.slice(1)) + 1)}>\n`,
  fence: (tokens, index, _options, env) => {
    const token = tokens[index]!;
    const fenceLine = (token.map?.[0] ?? 0) + env.run.study.bodyFirstLine;
    const block = env.blocksByFence.get(fenceLine);
    const language = token.info.trim().split(/\s+/)[0] ?? '';
    if (!block) return `<pre class="listing"><code>${escapeHtml(token.content)}</code></pre>\n`;
    const outcome = env.outcomes.get(block.index);
    const calculation = env.calculationNumbers.get(block.index);
    let code = block.options.hideCode ? '' : `<pre class="calc"><code>${escapeHtml(token.content)}</code></pre>`;
    let badge = block.options.noRun
      ? '<span class="badge">shown, not run</span>'
      : `<span class="badge">calculation, line ${block.fenceLine}${block.options.hideCode ? ' (code in the study source)' : ''}</span>`;
    // A block shown but not run is an illustration: it stays where the author put it.
    if (env.run.study.meta.report.code === 'appendix' && calculation !== undefined) {
      const number = `${CODE_APPENDIX.letter}${calculation}`;
      const heading = env.headings[env.headings.length - 1]?.text;
      env.listings.push({ number, fenceLine: block.fenceLine, heading, code: token.content, hidden: block.options.hideCode });
      code = '';
      badge = `<a class="badge code-ref" href="#${listingId(number)}">Calculation ${number}, study line ${block.fenceLine}: code ${
        block.options.hideCode ? 'in the study source' : `in Appendix ${CODE_APPENDIX.letter}`
      }</a>`;
    }
    const outputs = outcome ? outputsHtml(outcome.records, env.charts, env.counters) : '';
    return `<section class="block${block.options.hideCode ? ' code-hidden' : ''}" data-language="${escapeHtml(language)}">${badge}${code}${outputs}</section>\n`;
  },
};
Object.assign(bodyMarkdown.renderer.rules, bodyRules);

function bodyHtml(
  run: StudyRun,
  charts: RenderedCharts,
  counters: Counters,
  headings: { level: number; id: string; text: string }[],
  listings: Listing[],
): string {
  const running = run.study.blocks.filter((block) => !block.options.noRun);
  const env: BodyEnv = {
    run,
    calculationNumbers: new Map(running.map((block, index) => [block.index, index + 1])),
    listings,
    charts,
    counters,
    headings,
    slugs: {
      taken: new Set(['criteria', 'cautions', CODE_APPENDIX.id, 'inputs', 'calculation-log', 'sensitivity', 'provenance', 'contents', 'summary']),
      next: new Map(),
    },
    blocksByFence: new Map(run.study.blocks.map((block) => [block.fenceLine, block])),
    outcomes: new Map(run.outcome.blocks.map((outcome) => [outcome.blockIndex, outcome])),
  };
  return bodyMarkdown.renderer.render(run.study.bodyTokens, bodyMarkdown.options, env);
}

function inputsTable(run: StudyRun): string {
  if (run.inputs.length === 0) return '<p class="quiet">This study declares no inputs.</p>';
  const rows = run.inputs
    .map((input) => {
      const range =
        input.min || input.max
          ? `${input.min ? formatQuantity(formatStated(input.min.value, 15), input.min.unit) : '−∞'} to ${input.max ? formatQuantity(formatStated(input.max.value, 15), input.max.unit) : '+∞'}`
          : '';
      const source =
        input.source === 'overridden' ? `<span class="overridden">overridden (study gives ${escapeHtml(input.givenText)})</span>` : 'as given';
      return `<tr><td><code>${escapeHtml(input.name)}</code></td><td class="num">${escapeHtml(formatQuantity(formatStated(input.value, 15), input.unit))}</td><td>${escapeHtml(range)}</td><td>${source}</td><td>${escapeHtml(input.description ?? '')}</td></tr>`;
    })
    .join('\n');
  return `<table class="data inputs"><thead><tr><th>Input</th><th>Value</th><th>Allowed range</th><th>Source</th><th>Description</th></tr></thead><tbody>\n${rows}\n</tbody></table>`;
}

/** Items of an array the log line shows; a longer array is shown by its size and where results.json holds it. */
const LOG_INLINE_ITEMS = 7;
/** Levels of nesting the log line writes out; deeper values are pointed to in results.json. */
const LOG_INLINE_DEPTH = 3;

/** Where results.json holds a value the log line points to: the solver call's step and the value's path in it. */
interface LogPlace {
  step: number;
  path: string;
}

function pathTo(place: LogPlace, key: string | number): LogPlace {
  const part = typeof key === 'number' ? `[${key}]` : /^[A-Za-z_$][\w$]*$/.test(key) ? `.${key}` : `[${JSON.stringify(key)}]`;
  return { step: place.step, path: `${place.path}${part}` };
}

function pointer(what: string, place: LogPlace): string {
  return `(${what}, in full in results.json: solverCallLog step ${place.step}, ${place.path})`;
}

/**
 * A solver argument or result as the log line writes it: every text whole and every number to 15 significant figures
 * (as the inputs table gives them); a two-port an argument names by its label (the call that made it is logged in full);
 * an array longer than a line can hold, or a value nested deeper, by what it is and where results.json holds it whole.
 */
function logText(value: unknown, place: LogPlace, asArgument: boolean, depth = 0): string {
  if (value === null || value === undefined) return '—';
  if (typeof value === 'number') return formatStated(value, 15);
  if (typeof value === 'boolean') return value ? 'yes' : 'no';
  if (typeof value === 'string') return value;
  if (typeof value !== 'object') return String(value);
  if (Array.isArray(value)) {
    // Items that would each be pointed to are pointed to as one array.
    const nestedItems = depth + 1 >= LOG_INLINE_DEPTH && value.some((item) => typeof item === 'object' && item !== null);
    if (value.length > LOG_INLINE_ITEMS || nestedItems) return pointer(`${value.length} items`, place);
    return `[${value.map((item, index) => logText(item, pathTo(place, index), asArgument, depth + 1)).join(', ')}]`;
  }
  const record = value as Record<string, unknown>;
  if (asArgument && typeof record.kind === 'string' && 'A' in record && 'B' in record)
    return `${record.kind}${typeof record.label === 'string' ? ` “${record.label}”` : ''}`;
  if (typeof record.re === 'number' && typeof record.im === 'number' && Object.keys(record).length === 2) {
    return `${formatStated(record.re, 15)} ${record.im < 0 ? '−' : '+'} j${formatStated(Math.abs(record.im), 15)}`;
  }
  if (depth >= LOG_INLINE_DEPTH) return pointer('an object', place);
  const fields = Object.entries(record).map(([key, item]) => `${key} ${logText(item, pathTo(place, key), asArgument, depth + 1)}`);
  return depth === 0 ? fields.join('; ') : `{${fields.join(', ')}}`;
}

function calculationLog(run: StudyRun): string {
  const rows: string[] = [];
  for (const { step, record } of calculationLogSteps(run)) {
    let what: string;
    let detail: string;
    if (record.kind === 'result') {
      what = `result <strong>${escapeHtml(record.name)}</strong>`;
      detail = escapeHtml(formatQuantity(record.value, record.unit, record.digits));
    } else if (record.kind === 'criterion') {
      what = `criterion <strong>${escapeHtml(record.name)}</strong>`;
      detail = `${escapeHtml(formatQuantity(record.value, record.unit, record.digits))}; required ${escapeHtml(formatLimits(record))}; ${record.passed ? 'meets' : 'fails'}`;
    } else {
      what = `solver <code>${escapeHtml(record.functionName)}</code>`;
      const given = logText(solverCallOptions(record), { step, path: 'arguments' }, true);
      const returned = logText(record.returnedSummary, { step, path: 'returned' }, false);
      detail = `<div class="io"><span class="label">in</span> ${escapeHtml(given)}</div><div class="io"><span class="label">out</span> ${escapeHtml(returned)}</div>`;
    }
    rows.push(`<tr><td class="num">${step}</td><td>${record.at ? record.at.line : ''}</td><td>${what}</td><td>${detail}</td></tr>`);
  }
  if (rows.length === 0) return '<p class="quiet">No results, criteria or solver calls were recorded.</p>';
  return `<table class="log"><thead><tr><th>#</th><th>Line</th><th>Entry</th><th>Values</th></tr></thead><tbody>\n${rows.join('\n')}\n</tbody></table>`;
}

function provenanceList(run: StudyRun): string {
  const p = run.provenance;
  const item = (label: string, value: string) => `<div><dt>${escapeHtml(label)}</dt><dd>${value}</dd></div>`;
  return `<dl class="provenance">${[
    item('kvarbook', escapeHtml(p.kvarbookVersion)),
    item('Node.js', escapeHtml(p.nodeVersion)),
    item('Study file', `<code>${escapeHtml(p.studyFile)}</code>`),
    item('SHA-256 of the study source', `<code class="hash">${hashHtml(p.studySourceSha256)}</code>`),
    item('SHA-256 of package-lock.json', `<code class="hash">${hashHtml(p.lockfileSha256)}</code>`),
    item('Type check of the blocks', p.typeChecked ? 'done' : 'skipped at the author’s request'),
    item('Isolation of the blocks', escapeHtml(p.isolation)),
    item('Limits', escapeHtml(describeLimits(p))),
  ].join('')}</dl>`;
}

/** "12", "12 and 40", "12, 40 and 77". */
function listed(items: readonly (string | number)[]): string {
  return items.length <= 1 ? items.join('') : `${items.slice(0, -1).join(', ')} and ${items[items.length - 1]}`;
}

/** Where the code of hide-code blocks is, so that a reader knows there is code the report does not show. */
function hiddenCodeText(run: StudyRun): string {
  const lines = run.study.blocks.filter((block) => block.options.hideCode).map((block) => block.fenceLine);
  if (lines.length === 0) return 'none: every calculation block shows its code';
  const count = lines.length === 1 ? '1 calculation block hides its code' : `${lines.length} calculation blocks hide their code`;
  return `${count} (study ${lines.length === 1 ? 'line' : 'lines'} ${listed(lines)}); ${lines.length === 1 ? 'its' : 'their'} code is in the study source carried in this report`;
}

/** Each calculation block's code under its number and study line, in the order of the study. */
function codeAppendix(listings: readonly Listing[]): string {
  return `<p class="quiet">The code of every calculation block, numbered in the order the study runs them; the body shows each block's outputs where the block stands.</p>
${listings
  .map((listing) => {
    const place = `study line ${listing.fenceLine}${listing.heading ? `, under “${escapeHtml(listing.heading)}”` : ''}`;
    const code = listing.hidden
      ? '<p class="quiet">The author left this code out of the report; it is in the study source the report carries.</p>'
      : `<pre class="calc"><code>${escapeHtml(listing.code)}</code></pre>`;
    return `<div class="listing" id="${listingId(listing.number)}"><p class="listing-head"><span class="label">Calculation ${listing.number}</span> ${place}</p>${code}</div>`;
  })
  .join('\n')}`;
}

/** What each criterion measures, what it requires and where the requirement comes from. */
function criteriaDefinitions(criteria: readonly CriterionRecord[]): string {
  if (criteria.length === 0) return '';
  const rows = criteria
    .map(
      (record) =>
        `<tr><td>${escapeHtml(record.name)}</td><td>${record.measures ? escapeHtml(record.measures) : '<span class="quiet">not stated</span>'}</td><td>${escapeHtml(formatLimits(record))}</td><td>${
          record.basis ? escapeHtml(record.basis) : '<span class="quiet">not stated</span>'
        }</td></tr>`,
    )
    .join('\n');
  return `<figure class="table definitions${criteria.length > LONG_TABLE_ROWS ? ' long' : ''}"><figcaption>What each criterion measures, what it requires and where the requirement comes from</figcaption><table class="data"><thead><tr><th>Criterion</th><th>Measures</th><th>Required</th><th>Basis</th></tr></thead><tbody>\n${rows}\n</tbody></table></figure>`;
}

function titleBlock(run: StudyRun, failed: number, total: number): string {
  const { meta } = run.study;
  const person = (p: { name: string; licence?: string; jurisdiction?: string } | undefined) =>
    p
      ? `${escapeHtml(p.name)}${p.licence ? `, licence ${escapeHtml(p.licence)}` : ''}${p.jurisdiction ? ` (${escapeHtml(p.jurisdiction)})` : ''}`
      : 'not yet named';
  const overridden = run.inputs.filter((input) => input.source === 'overridden');
  const status = criteriaStatus(failed, total);
  return `<header class="title-block">
<p class="kicker">${escapeHtml(meta.project)}</p>
<h1>${escapeHtml(meta.title)}</h1>
<dl class="meta">
<div><dt>Study</dt><dd>${escapeHtml(meta.id)}, revision ${meta.revision}</dd></div>
<div><dt>Date</dt><dd>${escapeHtml(meta.date)}</dd></div>
<div><dt>Engineer</dt><dd>${person(meta.engineer)}</dd></div>
<div><dt>Checker</dt><dd>${person(meta.checker)}</dd></div>
<div><dt>Status</dt><dd class="${failed > 0 ? 'fail' : 'pass'}">${escapeHtml(status)}</dd></div>
<div><dt>Hidden code</dt><dd>${escapeHtml(hiddenCodeText(run))}</dd></div>
${overridden.length ? `<div><dt>Variant</dt><dd class="overridden">inputs overridden: ${overridden.map((input) => `${escapeHtml(input.name)} = ${escapeHtml(formatQuantity(formatStated(input.value, 15), input.unit))}`).join(', ')}</dd></div>` : ''}
</dl>
</header>`;
}

/** The report in two parts around the seal slot; `assembleReport` joins them with or without a seal. `stylesheet` is the report's look, read at the edge. */
export function renderReportParts(run: StudyRun, charts: RenderedCharts, stylesheet: string): ReportParts {
  const criteria = recordsOf(run, 'criterion');
  const failed = criteria.filter((criterion) => !criterion.passed).length;
  const counters: Counters = { table: 0, figure: 0 };
  const headings: { level: number; id: string; text: string }[] = [];
  const listings: Listing[] = [];
  const body = bodyHtml(run, charts, counters, headings, listings);
  const appendices = [
    ...(listings.length > 0 ? [{ id: CODE_APPENDIX.id, title: CODE_APPENDIX.title, content: codeAppendix(listings) }] : []),
    { id: 'inputs', title: 'Inputs', content: inputsTable(run) },
    {
      id: 'calculation-log',
      title: 'Calculation log',
      content: `<p class="quiet">Every named result, criterion and solver call, in the order the study made them, with the study line it came from. Every value is given in full; a long array, or a value nested deeper than a line can show, is named with its place in the attached results.json (its solverCallLog holds every solver call whole, by step).</p>
${calculationLog(run)}`,
    },
    ...(run.sensitivity
      ? [
          {
            id: 'sensitivity',
            title: 'Sensitivity',
            content: sensitivityAppendix(
              run.sensitivity,
              run.sensitivity.charts.map((chart) => charts.get(chart) ?? ''),
              counters,
            ),
          },
        ]
      : []),
    { id: 'provenance', title: 'Provenance', content: provenanceList(run) },
  ].map((appendix, index) => ({ ...appendix, heading: `Appendix ${String.fromCharCode(65 + index)}. ${appendix.title}` }));
  const sensitivityHeading = appendices.find((appendix) => appendix.id === 'sensitivity')?.heading;
  const contents = [
    ...headings
      .filter((heading) => heading.level <= 2)
      .map((heading) => `<li class="level-${heading.level}"><a href="#${heading.id}">${escapeHtml(heading.text)}</a></li>`),
    '<li class="level-1"><a href="#criteria">Design criteria</a></li>',
    '<li class="level-1"><a href="#cautions">Cautions</a></li>',
    ...appendices.map((appendix) => `<li class="level-1"><a href="#${appendix.id}">${appendix.heading}</a></li>`),
  ].join('\n');
  const cautions = cautionsOf(run)
    .map(
      (caution) =>
        `<li class="${caution.standing ? 'standing' : 'study'}">${escapeHtml(caution.text)}${caution.at ? ` ${where(caution.at)}` : ''}</li>`,
    )
    .join('\n');
  const { meta } = run.study;
  const head = `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta http-equiv="Content-Security-Policy" content="${CONTENT_SECURITY_POLICY}">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta name="generator" content="kvarbook ${escapeHtml(run.provenance.kvarbookVersion)}">
<meta name="kvarbook-study" content="${escapeHtml(meta.id)}">
<meta name="kvarbook-revision" content="${meta.revision}">
<title>${escapeHtml(meta.title)} (${escapeHtml(meta.id)} rev ${meta.revision})</title>
<style>
${stylesheet}</style>
</head>
<body>
${titleBlock(run, failed, criteria.length)}
`;
  // The contents come before the criteria summary: a short list that fits under the title block, where a long
  // summary table may run on to the next page and the contents with it.
  const rest = `
<nav class="contents" id="contents">
<h2>Contents</h2>
<ol>
${contents}
</ol>
</nav>
<section class="summary" id="summary">
<h2>Criteria at a glance</h2>
${criteriaTable(criteria, false)}${sensitivityHeading && run.sensitivity ? `\n${flipsSummary(run.sensitivity, sensitivityHeading)}` : ''}
</section>
<main class="study">
${body}
</main>
<section class="criteria-full" id="criteria">
<h2>Design criteria</h2>
${criteriaTable(criteria, true)}
${criteriaDefinitions(criteria)}
</section>
<section class="cautions" id="cautions">
<h2>Cautions</h2>
<ul>
${cautions}
</ul>
</section>
${appendices.map((appendix) => `<section class="appendix" id="${appendix.id}">\n<h2>${appendix.heading}</h2>\n${appendix.content}\n</section>\n`).join('')}${jsonScript(STUDY_SOURCE_SCRIPT, JSON.stringify(run.study.source))}
<footer class="colophon">Produced by kvarbook from ${escapeHtml(run.provenance.studyFile)}. Every figure above was computed by the study's own calculation blocks.</footer>
</body>
</html>
`;
  return { head, body: rest };
}

/** Join the parts with the seal section (empty for an unsealed report). */
export function assembleReport(parts: ReportParts, sealSection: string): string {
  return `${parts.head}${SEAL_SLOT_START}${sealSection}${SEAL_SLOT_END}${parts.body}`;
}

const BODY_OPEN = '<body>\n';
const BODY_CLOSE = '</body>\n</html>\n';

/** What the report's <body> holds, joined with `sealSection`: the part the live preview swaps in place as the study changes. */
export function reportBodyContent(parts: ReportParts, sealSection: string): string {
  const html = assembleReport(parts, sealSection);
  // Every study text in the head is escaped, so the first <body> is the report's own.
  const start = html.indexOf(BODY_OPEN);
  if (start < 0 || !html.endsWith(BODY_CLOSE)) throw new Error('the report has no body to show');
  return html.slice(start + BODY_OPEN.length, html.length - BODY_CLOSE.length);
}

export const UNSEALED_NOTICE =
  '<section class="seal unsealed"><p><strong>Not sealed.</strong> This report has not been sealed by a licensed engineer; it is a working draft.</p></section>';
