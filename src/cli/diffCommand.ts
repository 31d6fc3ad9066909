// `kvarbook diff`: reads two reports, prints what changed between them, and writes the diff page when asked.
import { randomUUID } from 'node:crypto';
import { closeSync, existsSync, fsyncSync, linkSync, openSync, readFileSync, renameSync, unlinkSync, writeSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { StudyFailure } from '../diagnostics/diagnostic.ts';
import { diffPage } from '../diff/page.ts';
import { reportPayload, type ReportContents, type ReportPayload } from '../diff/payload.ts';
import { revisionDiff, type RevisionDiff } from '../diff/revisionDiff.ts';
import { blockTitle, criterionText, inputText, resultChangeText, resultValueText, sideText } from '../diff/words.ts';
import { reportStylesheet } from './environment.ts';
import { readReport } from './readReport.ts';
import type { Terminal } from './terminal.ts';

export interface DiffOptions {
  json?: boolean;
  html?: string;
  /** Write the diff page over an existing file of that name. */
  replace?: boolean;
  tolerance: number;
}

/** The results document beside an HTML report, as `run` writes it: `<id>-r<rev>.html` and `<id>-r<rev>.results.json`. */
function resultsBeside(reportPath: string): ReportContents['results'] {
  const stem = basename(reportPath).replace(/(\.checked)?\.html?$/i, '');
  const path = join(dirname(reportPath), `${stem}.results.json`);
  return existsSync(path) ? { text: readFileSync(path, 'utf8'), from: path } : undefined;
}

async function readPayload(reportPath: string): Promise<ReportPayload> {
  const { html, pdf } = await readReport(reportPath);
  const attached = pdf?.read.attachments.find((attachment) => attachment.fileName.endsWith('.results.json'));
  const results = pdf
    ? attached && { text: new TextDecoder('utf-8').decode(attached.content), from: `${reportPath} (attachment ${attached.fileName})` }
    : resultsBeside(reportPath);
  return reportPayload({ path: reportPath, html, ...(results ? { results } : {}) });
}

function describe(diff: RevisionDiff, terminal: Terminal): void {
  terminal.say(`old: ${sideText(diff.old)}`);
  terminal.say(`new: ${sideText(diff.new)}`);
  const heading = (title: string, count: number) => {
    if (count > 0) terminal.say(`${title} (${count}):`);
    return count > 0;
  };
  if (heading('front matter', diff.frontMatter.length))
    for (const change of diff.frontMatter) terminal.say(`  ${change.field}: ${change.old ?? 'none'} → ${change.new ?? 'none'}`);
  if (heading('inputs', diff.inputs.length))
    for (const change of diff.inputs) terminal.say(`  ${change.name} ${change.change}: ${inputText(change.old)} → ${inputText(change.new)}`);
  if (heading('results that moved', diff.results.length))
    for (const change of diff.results)
      terminal.say(`  ${change.name}: ${resultValueText(change.old)} → ${resultValueText(change.new)}, ${resultChangeText(change)}`);
  if (heading('criteria whose outcome changed', diff.criteria.length))
    for (const change of diff.criteria)
      terminal.say(`  ${change.name} ${change.change}: ${criterionText(change.old)} → ${criterionText(change.new)}`);
  if (heading('cautions', diff.cautions.added.length + diff.cautions.removed.length)) {
    for (const text of diff.cautions.added) terminal.say(`  + ${text}`);
    for (const text of diff.cautions.removed) terminal.say(`  - ${text}`);
  }
  if (heading('calculation blocks', diff.blocks.length))
    for (const change of diff.blocks) {
      terminal.say(`  ${blockTitle(change)}`);
      for (const hunk of change.hunks) {
        terminal.say(`    @@ -${hunk.oldStart},${hunk.oldLines} +${hunk.newStart},${hunk.newLines} @@`);
        for (const line of hunk.lines) terminal.say(`    ${line}`);
      }
    }
  if (heading('what ran the calculation', diff.environment.length))
    for (const change of diff.environment) terminal.say(`  ${change.field}: ${change.old ?? 'none'} → ${change.new ?? 'none'}`);
  terminal.say(
    diff.differences === 0
      ? 'no changes: the two reports agree in every figure, input, criterion, caution and block'
      : `${diff.differences} ${diff.differences === 1 ? 'change' : 'changes'}`,
  );
}

/** Written in full and flushed beside its place, then linked in (which fails if the name is taken) or, when replacing, renamed. */
function writePage(path: string, content: string, replace: boolean): void {
  const temporary = join(dirname(path), `.${basename(path)}.${randomUUID()}.tmp`);
  const descriptor = openSync(temporary, 'wx', 0o644);
  try {
    writeSync(descriptor, content);
    fsyncSync(descriptor);
  } finally {
    closeSync(descriptor);
  }
  try {
    if (replace) renameSync(temporary, path);
    else linkSync(temporary, path);
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code !== 'EEXIST') throw error;
    throw new StudyFailure([
      {
        code: 'diff-page-exists',
        message: `${path} exists already; kvarbook diff does not write over it`,
        hint: 'name a new file, or pass --replace to write the page over it',
      },
    ]);
  } finally {
    if (existsSync(temporary)) unlinkSync(temporary);
  }
}

/** 0 whenever both reports were read, whatever changed; `differences` in the output says how much did. */
export async function diffCommand(oldPath: string, newPath: string, options: DiffOptions, terminal: Terminal): Promise<number> {
  const older = await readPayload(oldPath);
  const newer = await readPayload(newPath);
  const diff = revisionDiff(older, newer, { defaultRelativeTolerance: options.tolerance });
  if (options.html) writePage(options.html, diffPage(diff, reportStylesheet()), options.replace === true);
  if (options.json) process.stdout.write(`${JSON.stringify(diff, null, 2)}\n`);
  else {
    describe(diff, terminal);
    if (options.html) terminal.say(`diff page: ${options.html}`);
  }
  return 0;
}
