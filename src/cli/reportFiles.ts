// The files of one report on disk, and the rule that nothing sealed is ever overwritten or lost.
import { readFileSync } from 'node:fs';
import { basename, join } from 'node:path';
import { StudyFailure } from '../diagnostics/diagnostic.ts';
import type { RunProduct } from '../pipeline.ts';
import { readSealedHtml } from '../seal/sealedReport.ts';
import { SUPERSEDED, type ReportFolder, type ReportSet } from '../output/reportSet.ts';
import { sha256Hex } from '../seal/digest.ts';
import type { InputOverride } from '../study/inputs.ts';

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

/** A variant's own word in its file names: letters, digits, "_" and "-"; never a dot, which separates the parts of a name. */
const VARIANT_NAME = /^[A-Za-z0-9][A-Za-z0-9_-]{0,63}$/;
const MAX_VARIANT_LENGTH = 64;
/** The word of a draft written beside a sealed report of the same id and revision. */
export const DRAFT_VARIANT = 'draft';

/**
 * The word that sets a variant's files apart from the base case's: `--variant` as given, else the overrides written
 * out (`lineLength=280 km` -> `lineLength-280km`, sorted by input, "." as "p"), so that the same overrides write the same
 * files. A list too long for a file name keeps its start and a hash of the whole. Undefined for the base case.
 */
export function variantName(overrides: readonly InputOverride[], variant: string | undefined): string | undefined {
  if (variant !== undefined) {
    if (!VARIANT_NAME.test(variant)) {
      throw new StudyFailure([
        {
          code: 'variant-name',
          message: `--variant "${variant}" cannot name report files`,
          hint: 'use letters, digits, "_" and "-" only (at most 64, starting with a letter or digit), e.g. --variant light-load',
          quantity: '--variant',
          expected: 'letters, digits, "_" and "-", at most 64',
          actual: variant,
        },
      ]);
    }
    return variant;
  }
  if (overrides.length === 0) return undefined;
  const word = (text: string) =>
    text
      .replace(/\s+/g, '')
      .replaceAll('.', 'p')
      .replace(/[^A-Za-z0-9-]+/g, '_');
  const written = [...overrides]
    .sort((a, b) => (a.name < b.name ? -1 : a.name > b.name ? 1 : 0))
    .map((override) => `${word(override.name)}-${word(override.text)}`)
    .join('_');
  if (written.length <= MAX_VARIANT_LENGTH) return written;
  const hash = sha256Hex(written).slice(0, 12);
  return `${written.slice(0, MAX_VARIANT_LENGTH - hash.length - 1)}-${hash}`;
}

/** The files of a report of one study id and revision, or of one of its variants (a word between the revision and the kind). */
export function reportPaths(outFolder: string, studyId: string, revision: number, variant?: string): ReportPaths {
  const base = join(outFolder, `${studyId}-r${revision}${variant === undefined ? '' : `.${variant}`}`);
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

/** The output folder as a set of report files of one study id and revision. */
export function reportFolder(outFolder: string, studyId: string, revision: number, variant?: string): ReportFolder {
  const paths = reportPaths(outFolder, studyId, revision, variant);
  return {
    out: outFolder,
    base: basename(paths.base),
    names: [paths.html, paths.results, paths.seal, paths.pdf, paths.check, paths.checkedHtml].map((path) => basename(path)),
  };
}

/**
 * A set is sealed when it has a seal file, a sealed HTML, or a PDF that carries a seal: deleting the
 * first two never exposes a sealed PDF to being replaced. A PDF that cannot be read counts as sealed.
 */
export async function isSealedSet(set: ReportSet): Promise<boolean> {
  const named = (suffix: string) => [...set.files.entries()].find(([name]) => name.endsWith(suffix))?.[1];
  if (named('.seal.json') !== undefined) return true;
  const html = named('.html');
  if (html !== undefined && readSealedHtml(readFileSync(html, 'utf8')).ok) return true;
  const pdf = named('.pdf');
  if (pdf === undefined) return false;
  const { readPdfAttachments } = await import('../report/pdf/index.ts');
  try {
    return (await readPdfAttachments(readFileSync(pdf))).some((attachment) => attachment.fileName.endsWith('.seal.json'));
  } catch {
    return true;
  }
}

export function sealedReportExists(paths: ReportPaths): StudyFailure {
  return new StudyFailure([
    {
      code: 'sealed-report-exists',
      message: `${paths.html} is a sealed report of this study id and revision; kvarbook will not seal over it`,
      hint: `raise "revision" in the front matter for a new issue of the study, or pass --replace-sealed to move the sealed set to ${SUPERSEDED}/ and write a new one (a run without --seal writes a draft beside it)`,
    },
  ]);
}
