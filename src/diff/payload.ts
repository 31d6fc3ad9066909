// What a report holds that a revision diff compares: its figures (from its seal, or its results document) and its study.
import { z } from 'zod';
import { StudyFailure } from '../diagnostics/diagnostic.ts';
import { embeddedStudySource } from '../report/embed.ts';
import type { ResultsDocument } from '../report/studyRun.ts';
import { sha256Hex } from '../seal/digest.ts';
import { buildManifest, verifyEnvelope, type UnsignedSealManifest } from '../seal/manifest.ts';
import { readSealedHtml, sealSubject } from '../seal/sealedReport.ts';
import { describeSigner } from '../seal/trust.ts';
import { parseStudy } from '../study/parse.ts';
import type { Study } from '../study/model.ts';

/** The figures of one report in the seal's own terms, whichever document they were read from. */
export type ReportFigures = Omit<UnsignedSealManifest, 'format' | 'reportBodySha256'>;

export interface ReportPayload {
  /** The report as the user named it, for messages and the diff's headings. */
  path: string;
  /** A sealed report's figures are its seal's (signed); an unsealed one's are its results document's. */
  figuresFrom: 'seal' | 'results';
  /** The engineer the seal names; null for an unsealed report. The seal is read, not verified: `check` verifies. */
  sealedBy: string | null;
  figures: ReportFigures;
  /** The study source the report carries, parsed: its front matter, input declarations and blocks. */
  study: Study;
}

export interface ReportContents {
  path: string;
  /** The HTML report: the file itself, or the one a PDF carries. */
  html: string;
  /** The results document the report comes with (a PDF's attachment, or the file beside an unsealed HTML report). */
  results?: { text: string; from: string };
}

// Only the members the figures are taken from; a results document may carry more.
const resultsDocumentSchema = z.object({
  format: z.literal('kvarbook-results/1'),
  study: z.object({ id: z.string(), revision: z.number(), title: z.string(), date: z.string() }),
  inputs: z.array(z.object({ name: z.string(), value: z.number(), unit: z.string(), source: z.enum(['given', 'overridden']) })),
  results: z.array(
    z.object({ name: z.string(), value: z.union([z.number(), z.string(), z.boolean()]), unit: z.string(), tolerance: z.number().optional() }),
  ),
  criteria: z.array(
    z.object({
      name: z.string(),
      value: z.number(),
      unit: z.string(),
      digits: z.number(),
      min: z.number().optional(),
      max: z.number().optional(),
      passed: z.boolean(),
    }),
  ),
  cautions: z.array(z.object({ text: z.string() })),
  provenance: z.object({
    kvarbookVersion: z.string(),
    nodeVersion: z.string(),
    lockfileSha256: z.string(),
    studyFile: z.string(),
    studySourceSha256: z.string(),
  }),
});

/** The body digest is no figure; the results document has none, and a placeholder lets the seal's own checks run. */
const NO_BODY_DIGEST = '0'.repeat(64);

function failure(
  code: 'diff-not-report' | 'diff-no-figures' | 'diff-figures-malformed' | 'diff-figures-mismatch',
  message: string,
  hint: string,
): StudyFailure {
  return new StudyFailure([{ code, message, hint }]);
}

export function reportPayload(contents: ReportContents): ReportPayload {
  const { path } = contents;
  const source = embeddedStudySource(contents.html);
  if (source === undefined) {
    throw failure(
      'diff-not-report',
      `${path} is not a kvarbook report: it carries no study source`,
      'name the .html or .pdf report kvarbook wrote for each revision',
    );
  }
  const sealed = readSealedHtml(contents.html);
  const read = sealed.ok ? figuresOfSeal(path, sealed.contents.envelope) : figuresOfResults(path, contents.results);
  if (read.figures.studySourceSha256 !== sha256Hex(source)) {
    throw failure(
      'diff-figures-mismatch',
      `${path}: the figures (${read.from}) were computed from another study source than the one the report carries`,
      'the report or the results beside it were changed or mixed up after the run; run the study again to get a consistent report',
    );
  }
  return {
    path,
    figuresFrom: sealed.ok ? 'seal' : 'results',
    sealedBy: read.sealedBy,
    figures: read.figures,
    study: parseStudy(read.figures.studyFile, source),
  };
}

interface ReadFigures {
  figures: ReportFigures;
  sealedBy: string | null;
  from: string;
}

function figuresOfSeal(path: string, envelope: unknown): ReadFigures {
  const { manifest, problems } = verifyEnvelope(envelope, []);
  if (manifest === null) {
    throw failure(
      'diff-figures-malformed',
      `${path}: the seal the report carries cannot be read: ${problems.join('; ')}`,
      'run kvarbook check on the report to see what is wrong with it',
    );
  }
  const { format: _format, reportBodySha256: _body, signer, ...figures } = manifest;
  return { figures, sealedBy: describeSigner(signer), from: 'its seal' };
}

function figuresOfResults(path: string, results: ReportContents['results']): ReadFigures {
  if (results === undefined) {
    throw failure(
      'diff-no-figures',
      `${path} is an unsealed HTML report, which carries no figures of its own, and no results document is beside it`,
      'keep the .results.json kvarbook wrote beside the .html, or name the report as PDF (which carries its results)',
    );
  }
  let parsed: unknown;
  try {
    parsed = JSON.parse(results.text);
  } catch (error) {
    throw failure(
      'diff-figures-malformed',
      `${results.from} is not readable JSON (${(error as Error).message})`,
      'keep the results document as kvarbook wrote it',
    );
  }
  const document = resultsDocumentSchema.safeParse(parsed);
  if (!document.success) {
    const issue = document.error.issues[0];
    throw failure(
      'diff-figures-malformed',
      `${results.from} is not a kvarbook results document: ${issue ? `${issue.path.join('.') || 'the document'} ${issue.message}` : 'wrong shape'}`,
      'keep the results document as kvarbook wrote it',
    );
  }
  try {
    const { format: _format, reportBodySha256: _body, ...figures } = buildManifest(sealSubject(document.data as ResultsDocument, NO_BODY_DIGEST));
    return { figures, sealedBy: null, from: results.from };
  } catch (error) {
    if (!(error instanceof StudyFailure)) throw error;
    throw failure(
      'diff-figures-malformed',
      `${results.from} holds figures no report can hold: ${error.diagnostics.map((diagnostic) => diagnostic.message).join('; ')}`,
      'keep the results document as kvarbook wrote it',
    );
  }
}
