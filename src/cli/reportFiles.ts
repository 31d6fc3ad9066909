// The files of one report on disk, and the rule that nothing sealed is ever overwritten or lost.
import { existsSync, mkdirSync, readFileSync, renameSync } from 'node:fs';
import { createHash } from 'node:crypto';
import { basename, join } from 'node:path';
import { StudyFailure } from '../diagnostics/diagnostic.ts';
import type { RunProduct } from '../pipeline.ts';
import { readSealedHtml } from '../seal/sealedReport.ts';

export interface ReportPaths {
  base: string;
  html: string;
  results: string;
  seal: string;
  pdf: string;
  check: string;
  checkedHtml: string;
}

/**
 * The canonical text of results.json: two-space indented, keys in the order the document builds them.
 * Locations name the study by its file name, as the report does, so that the file does not depend on
 * the folder the study was run from: a checker's re-run, from wherever, writes the same bytes.
 */
export function resultsJsonText(product: Pick<RunProduct, 'results'>): string {
  const byFileName = (key: string, value: unknown) =>
    key === 'at' && typeof value === 'object' && value !== null && typeof (value as { file?: unknown }).file === 'string'
      ? { ...value, file: basename((value as { file: string }).file) }
      : value;
  return `${JSON.stringify(product.results, byFileName, 2)}\n`;
}

export function reportPaths(outFolder: string, studyId: string, revision: number): ReportPaths {
  const base = join(outFolder, `${studyId}-r${revision}`);
  return {
    base,
    html: `${base}.html`,
    results: `${base}.results.json`,
    seal: `${base}.seal.json`,
    pdf: `${base}.pdf`,
    check: `${base}.check.json`,
    checkedHtml: `${base}.checked.html`,
  };
}

function isSealed(paths: ReportPaths): boolean {
  if (existsSync(paths.seal)) return true;
  if (!existsSync(paths.html)) return false;
  return readSealedHtml(readFileSync(paths.html, 'utf8')).ok;
}

/**
 * Before writing a report over an existing one: refuse if the existing one is sealed, unless the user
 * asked to replace it; then move the whole sealed set aside rather than delete it.
 */
export function protectSealedReport(paths: ReportPaths, replaceSealed: boolean): string | undefined {
  if (!isSealed(paths)) return undefined;
  if (!replaceSealed) {
    throw new StudyFailure([{
      code: 'sealed-report-exists',
      message: `${paths.html} is a sealed report of this study id and revision; kvarbook will not overwrite it`,
      hint: 'raise "revision" in the front matter for a new issue of the study, or pass --replace-sealed to move the sealed set to superseded/ and write a new one',
    }]);
  }
  const sealBytes = existsSync(paths.seal) ? readFileSync(paths.seal) : readFileSync(paths.html);
  const tag = createHash('sha256').update(sealBytes).digest('hex').slice(0, 12);
  const folder = join(paths.base.slice(0, paths.base.length - basename(paths.base).length), 'superseded', `${basename(paths.base)}-${tag}`);
  mkdirSync(folder, { recursive: true });
  for (const path of [paths.html, paths.results, paths.seal, paths.pdf, paths.check, paths.checkedHtml]) {
    if (existsSync(path)) renameSync(path, join(folder, basename(path)));
  }
  return folder;
}
