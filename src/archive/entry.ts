// The record of one archived report, stored as an object beside its files: what the index is rebuilt from.
import { z } from 'zod';
import { canonicalJson } from '../seal/canonical.ts';

export const ENTRY_FORMAT = 'kvarbook-archive-entry/1';

const fileSchema = z.strictObject({
  /** What the file is to the report; `check` files are counter-signatures, `pdf` the printed report. */
  role: z.enum(['report', 'pdf', 'results', 'seal', 'source', 'check']),
  /** The file's name as sealed (`<id>-r<rev>.html`), which `export` writes it under. */
  name: z.string().regex(/^[^/\\]+$/),
  sha256: z.string().regex(/^[0-9a-f]{64}$/),
  bytes: z.number().int().nonnegative(),
});

export const archiveEntrySchema = z.strictObject({
  format: z.literal(ENTRY_FORMAT),
  studyId: z.string(),
  revision: z.number().int().nonnegative(),
  title: z.string(),
  project: z.string(),
  /** The line the study is about, from the front matter's `line`; null when the study names none. */
  line: z.string().nullable(),
  engineer: z.string(),
  checker: z.string().nullable(),
  studyDate: z.string(),
  signerFingerprint: z.string(),
  envelopeSha256: z.string().regex(/^[0-9a-f]{64}$/),
  kvarbookVersion: z.string(),
  nodeVersion: z.string(),
  files: z.array(fileSchema).min(1),
});

export type ArchiveEntry = z.infer<typeof archiveEntrySchema>;
export type ArchivedFile = z.infer<typeof fileSchema>;

/** Canonical JSON, so that the same report always makes the same entry and adding it twice stores nothing new. */
export function serializeEntry(entry: ArchiveEntry): string {
  return canonicalJson(archiveEntrySchema.parse(entry));
}

/** An object of the store read as an entry; undefined for every other object (a report, a seal, a source). */
export function parseEntry(bytes: Buffer): ArchiveEntry | undefined {
  // Cheap tests first: most objects are reports of a few hundred kilobytes.
  if (bytes.length > 1_000_000 || bytes[0] !== 0x7b || !bytes.includes(`"format":"${ENTRY_FORMAT}"`)) return undefined;
  try {
    const parsed = archiveEntrySchema.safeParse(JSON.parse(bytes.toString('utf8')));
    return parsed.success ? parsed.data : undefined;
  } catch {
    return undefined;
  }
}

export function fileOf(entry: ArchiveEntry, role: ArchivedFile['role']): ArchivedFile | undefined {
  return entry.files.find((file) => file.role === role);
}
