// The one-machine archive: adding sealed reports (verified first), finding them, exporting them as sealed, verifying and rebuilding the index.
import { existsSync, mkdirSync, statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { StudyFailure } from '../diagnostics/diagnostic.ts';
import { embeddedStudySource } from '../report/embed.ts';
import { verifySealedReport } from '../seal/check.ts';
import { verifyCheckRecord } from '../seal/checkRecord.ts';
import { sha256Hex } from '../seal/digest.ts';
import type { PublicIdentity } from '../seal/keys.ts';
import { serializeEnvelope } from '../seal/manifest.ts';
import { parseStudy } from '../study/parse.ts';
import type { ArchiveIndex, IndexedReport } from './archiveIndex.ts';
import { ENTRY_FORMAT, fileOf, parseEntry, serializeEntry, type ArchiveEntry, type ArchivedFile } from './entry.ts';
import { removeStrayTemporaries, type ObjectStore } from './store.ts';

export interface Archive {
  folder: string;
  store: ObjectStore;
  index: ArchiveIndex;
}

/** A sealed report as the edge read it, with the files found beside it (each by the name it was sealed under). */
export interface ReportInHand {
  /** Where it was read from, for messages. */
  path: string;
  html: string;
  htmlName: string;
  /** The printed report, when there is one; `html` is what it carries. */
  pdf?: { name: string; bytes: Uint8Array; html: string };
  siblings: { role: 'results' | 'seal' | 'check'; name: string; bytes: Uint8Array }[];
}

export interface AddOutcome {
  report: IndexedReport;
  /** False when the very same report was in the archive already. */
  added: boolean;
}

function refused(path: string, reasons: string[]): StudyFailure {
  return new StudyFailure([
    {
      code: 'archive-refused',
      message: `${path} was not archived: ${reasons.join('; ')}`,
      hint: 'only a sealed, unchanged report by a trusted signer is archived; `kvarbook check` shows every step',
    },
  ]);
}

function personText(person: { name: string; licence?: string; jurisdiction?: string } | undefined): string | null {
  return person ? `${person.name}${person.licence ? `, licence ${person.licence}` : ''}` : null;
}

/**
 * Verifies the report without running it (the checker's steps up to the re-run, with counter-signatures), then stores
 * every file, then the entry that lists them, and only then adds the index row: a killed add leaves objects no row names.
 */
export async function addReport(archive: Archive, inHand: ReportInHand, trusted: readonly PublicIdentity[], archivedAt: string): Promise<AddOutcome> {
  const source = embeddedStudySource(inHand.html);
  const findings = verifySealedReport(inHand.html, source, 'carried in the report', trusted);
  const reasons = findings.steps.filter((step) => !step.passed).map((step) => `${step.name}: ${step.detail}`);
  if (findings.counterSignatures && !findings.counterSignatures.passed) reasons.push(`counter-signatures: ${findings.counterSignatures.detail}`);
  const { manifest, envelope } = findings;
  if (!manifest || !envelope || source === undefined || reasons.length > 0) throw refused(inHand.path, reasons);
  if (inHand.pdf && inHand.pdf.html !== inHand.html) reasons.push(`${inHand.pdf.name} carries another report than ${inHand.htmlName}`);
  for (const sibling of inHand.siblings.filter((file) => file.role === 'seal')) {
    if (Buffer.from(sibling.bytes).toString('utf8').trimEnd() !== serializeEnvelope(envelope))
      reasons.push(`${sibling.name} is not the seal the report carries`);
  }
  for (const sibling of inHand.siblings.filter((file) => file.role === 'check')) {
    let verified = false;
    try {
      verified = verifyCheckRecord(JSON.parse(Buffer.from(sibling.bytes).toString('utf8')), envelope, trusted).ok;
    } catch {
      verified = false;
    }
    if (!verified) reasons.push(`${sibling.name} is not a valid check record of this seal by a trusted checker`);
  }
  if (reasons.length > 0) throw refused(inHand.path, reasons);

  const meta = parseStudy(manifest.studyFile, source).meta;
  const files: ArchivedFile[] = [];
  const keep = (role: ArchivedFile['role'], name: string, bytes: Uint8Array | string) => {
    const sha256 = archive.store.put(bytes);
    files.push({ role, name, sha256, bytes: typeof bytes === 'string' ? Buffer.byteLength(bytes) : bytes.byteLength });
  };
  keep('report', inHand.htmlName, inHand.html);
  if (inHand.pdf) keep('pdf', inHand.pdf.name, inHand.pdf.bytes);
  for (const sibling of inHand.siblings) keep(sibling.role, sibling.name, sibling.bytes);
  keep('source', manifest.studyFile, source);
  const entry: ArchiveEntry = {
    format: ENTRY_FORMAT,
    studyId: manifest.studyId,
    revision: meta.revision,
    title: manifest.title,
    project: meta.project,
    line: meta.line ?? null,
    engineer: personText(meta.engineer) ?? '',
    checker: personText(meta.checker),
    studyDate: manifest.studyDate,
    signerFingerprint: manifest.signer.fingerprint,
    envelopeSha256: sha256Hex(serializeEnvelope(envelope)),
    kvarbookVersion: manifest.kvarbookVersion,
    nodeVersion: manifest.nodeVersion,
    files: files.sort((a, b) => a.role.localeCompare(b.role) || a.name.localeCompare(b.name)),
  };
  const entrySha256 = archive.store.put(serializeEntry(entry));
  const added = await archive.index.add(entrySha256, entry, archivedAt);
  const report = await archive.index.get(entrySha256);
  if (!report) throw new Error(`the index has no row for ${entrySha256} right after adding it`);
  return { report, added };
}

export function readEntry(archive: Archive, entrySha256: string): ArchiveEntry | undefined {
  const bytes = archive.store.read(entrySha256);
  return bytes && sha256Hex(bytes) === entrySha256 ? parseEntry(bytes) : undefined;
}

export async function findReport(archive: Archive, studyId: string, revision?: number): Promise<{ report: IndexedReport; entry: ArchiveEntry }> {
  const report = await archive.index.latest(studyId, revision);
  const entry = report && readEntry(archive, report.entrySha256);
  if (!report || !entry) {
    throw new StudyFailure([
      {
        code: 'archive-not-found',
        message: report
          ? `the record of ${studyId} in the archive is missing or damaged (${report.entrySha256})`
          : `the archive holds no report of study ${studyId}${revision === undefined ? '' : ` at revision ${revision}`}`,
        hint: report ? 'run `kvarbook archive verify` to see what is damaged' : 'run `kvarbook archive list` to see what it holds',
      },
    ]);
  }
  return { report, entry };
}

/** Writes the files exactly as sealed into `folder`, each under its sealed name; refuses to overwrite anything. */
export function exportReport(archive: Archive, entry: ArchiveEntry, folder: string): string[] {
  const clashes = entry.files.filter((file) => existsSync(join(folder, file.name)));
  if (clashes.length > 0) {
    throw new StudyFailure([
      {
        code: 'archive-export-exists',
        message: `${folder} already holds ${clashes.map((file) => file.name).join(', ')}`,
        hint: 'export into an empty folder',
      },
    ]);
  }
  mkdirSync(folder, { recursive: true });
  const written: string[] = [];
  for (const file of entry.files) {
    const bytes = archive.store.read(file.sha256);
    if (!bytes || sha256Hex(bytes) !== file.sha256) throw new Error(`${file.name} is missing or changed in the archive; run kvarbook archive verify`);
    const path = join(folder, file.name);
    writeFileSync(path, bytes, { flag: 'wx' });
    written.push(path);
  }
  return written;
}

export interface VerifyProblem {
  studyId: string;
  revision: number;
  /** The file's sealed name, or the entry itself. */
  file: string;
  problem: string;
}

export interface VerifyOutcome {
  reports: number;
  files: number;
  problems: VerifyProblem[];
  /** Objects no indexed report names: left by an add that was killed, harmless. */
  orphans: number;
}

/** Every stored file against its hash and every signature (seal and counter-signatures), without re-running any study. */
export async function verifyArchive(archive: Archive, trusted: readonly PublicIdentity[]): Promise<VerifyOutcome> {
  const problems: VerifyProblem[] = [];
  const named = new Set<string>();
  let files = 0;
  const rows = await archive.index.all();
  for (const row of rows) {
    const where = { studyId: row.studyId, revision: row.revision };
    named.add(row.entrySha256);
    const entryBytes = archive.store.read(row.entrySha256);
    const entry = entryBytes && sha256Hex(entryBytes) === row.entrySha256 ? parseEntry(entryBytes) : undefined;
    if (!entry) {
      problems.push({
        ...where,
        file: `entry ${row.entrySha256}`,
        problem: entryBytes ? 'the archive record was changed' : 'the archive record is missing',
      });
      continue;
    }
    const contents = new Map<string, Buffer>();
    for (const file of entry.files) {
      files += 1;
      named.add(file.sha256);
      const bytes = archive.store.read(file.sha256);
      if (!bytes) problems.push({ ...where, file: file.name, problem: 'missing from the store' });
      else if (sha256Hex(bytes) !== file.sha256)
        problems.push({ ...where, file: file.name, problem: 'changed: its SHA-256 is no longer the one stored' });
      else contents.set(file.role === 'source' ? 'source' : file.name, bytes);
    }
    const report = fileOf(entry, 'report');
    const html = report && contents.get(report.name)?.toString('utf8');
    if (html === undefined || !report) continue;
    const source = contents.get('source')?.toString('utf8');
    const findings = verifySealedReport(html, source, 'kept in the archive', trusted);
    for (const step of [...findings.steps, ...(findings.counterSignatures ? [findings.counterSignatures] : [])]) {
      if (!step.passed) problems.push({ ...where, file: report.name, problem: `${step.name}: ${step.detail}` });
    }
  }
  const orphans = archive.store.list().filter((sha) => !named.has(sha)).length;
  return { reports: rows.length, files, problems, orphans };
}

/** The index rebuilt from the stored entries alone: every entry whose files are all in the store. */
export async function reindexArchive(archive: Archive): Promise<{ reports: number; skipped: string[]; temporariesRemoved: number }> {
  const temporariesRemoved = removeStrayTemporaries(archive.store);
  const rows: { entrySha256: string; entry: ArchiveEntry; archivedAt: string }[] = [];
  const skipped: string[] = [];
  for (const sha of archive.store.list()) {
    const entry = readEntry(archive, sha);
    if (!entry) continue;
    const missing = entry.files.filter((file) => !existsSync(archive.store.pathOf(file.sha256)));
    if (missing.length > 0) {
      skipped.push(`${entry.studyId} revision ${entry.revision}: ${missing.map((file) => file.name).join(', ')} missing`);
      continue;
    }
    // The entry's own file time is when the add stored it.
    rows.push({ entrySha256: sha, entry, archivedAt: statSync(archive.store.pathOf(sha)).mtime.toISOString() });
  }
  await archive.index.replaceReports(rows);
  return { reports: rows.length, skipped, temporariesRemoved };
}
