// Reading a study file at the edge: size limit, UTF-8 only, each refusal a located diagnostic.
import { readFileSync, statSync } from 'node:fs';
import { StudyFailure } from '../diagnostics/diagnostic.ts';

/** A study is prose and code; anything this large is a mistake (a data dump pasted in, or the wrong file). */
export const MAX_STUDY_BYTES = 8 * 1024 * 1024;

export function readStudyFile(path: string): string {
  let size: number;
  try {
    const stat = statSync(path);
    if (!stat.isFile())
      throw new StudyFailure([
        { code: 'study-not-file', message: `${path} is not a file`, at: { file: path, line: 1 }, hint: 'name a .study.md file' },
      ]);
    size = stat.size;
  } catch (error) {
    if (error instanceof StudyFailure) throw error;
    const code = (error as NodeJS.ErrnoException).code;
    throw new StudyFailure([
      {
        code: 'study-unreadable',
        message: code === 'ENOENT' ? `${path} does not exist` : `${path} cannot be read (${code ?? (error as Error).message})`,
        hint: code === 'ENOENT' ? 'check the path; `kvarbook new blank <file>` starts a new study' : 'check the file permissions',
      },
    ]);
  }
  if (size > MAX_STUDY_BYTES) {
    throw new StudyFailure([
      {
        code: 'study-too-large',
        message: `${path} is ${(size / 1024 / 1024).toFixed(1)} MB; a study may be at most ${MAX_STUDY_BYTES / 1024 / 1024} MB`,
        at: { file: path, line: 1 },
        hint: 'keep bulky data out of the study; a study holds inputs, prose and calculations',
      },
    ]);
  }
  const bytes = readFileSync(path);
  let text: string;
  try {
    text = new TextDecoder('utf-8', { fatal: true }).decode(bytes);
  } catch {
    const offset = firstInvalidUtf8Offset(bytes);
    const line = bytes.subarray(0, offset).toString('latin1').split('\n').length;
    throw new StudyFailure([
      {
        code: 'study-not-utf8',
        message: `${path} is not UTF-8 text (invalid byte at offset ${offset})`,
        at: { file: path, line },
        hint: 'save the study as UTF-8',
      },
    ]);
  }
  if (text.includes('\u0000')) {
    throw new StudyFailure([
      {
        code: 'study-binary',
        message: `${path} contains NUL characters; it is not a text study`,
        at: { file: path, line: 1 },
        hint: 'name a .study.md file',
      },
    ]);
  }
  // Windows line endings would shift every column by one; a BOM would hide the front matter.
  return text.replace(/^\uFEFF/, '').replace(/\r\n?/g, '\n');
}

function firstInvalidUtf8Offset(bytes: Uint8Array): number {
  let low = 0;
  let high = bytes.length;
  while (low < high) {
    const middle = (low + high) >> 1;
    try {
      // stream: true lets a prefix end inside a multi-byte character without counting as invalid.
      new TextDecoder('utf-8', { fatal: true }).decode(bytes.subarray(0, middle + 1), { stream: true });
      low = middle + 1;
    } catch {
      high = middle;
    }
  }
  return low;
}
