// The study's metadata from front matter: title, id, revision, date, engineer, checker, limits, report options.
import type { Document, YAMLMap } from 'yaml';
import type { Diagnostic } from '../diagnostics/diagnostic.ts';
import { CODE_PLACEMENTS, type CodePlacement, DEFAULT_LIMITS, type Person, type StudyMeta } from './model.ts';
import { type FieldReader, type YamlPlace, readMap, readNumber, readString, rejectUnknownKeys, nodeOf } from './yamlFields.ts';

const META_KEYS = ['title', 'project', 'line', 'id', 'revision', 'date', 'engineer', 'checker', 'limits', 'report', 'inputs', 'sensitivity'] as const;
const PERSON_KEYS = ['name', 'licence', 'jurisdiction'] as const;
const LIMIT_KEYS = ['blockSeconds', 'studySeconds', 'heapMb'] as const;
const REPORT_KEYS = ['pdf', 'paper', 'code'] as const;
const STUDY_ID = /^[A-Za-z0-9][A-Za-z0-9._-]{0,63}$/;
const ISO_DATE = /^(\d{4})-(\d{2})-(\d{2})$/;

export function readMeta(document: Document.Parsed, place: YamlPlace, diagnostics: Diagnostic[]): StudyMeta | undefined {
  const reader: FieldReader = { place, diagnostics };
  const root = document.contents as YAMLMap;
  const before = diagnostics.length;
  rejectUnknownKeys(reader, root, META_KEYS, 'the front matter');

  const title = readString(reader, root, 'title', 'the front matter', true);
  const project = readString(reader, root, 'project', 'the front matter', true);
  const line = readString(reader, root, 'line', 'the front matter', false);
  const id = readString(reader, root, 'id', 'the front matter', true);
  if (id !== undefined && !STUDY_ID.test(id)) {
    diagnostics.push({
      code: 'front-matter-id',
      message: `the study id "${id}" may hold only letters, digits, ".", "_" and "-" (at most 64)`,
      at: place.at(nodeOf(root, 'id')),
      hint: 'the id names the report files, e.g. "NCB-RC-014"',
    });
  }
  const revision = readNumber(reader, root, 'revision', 'the front matter', { min: 0, max: 9999, integer: true });
  if (nodeOf(root, 'revision') === undefined) {
    diagnostics.push({
      code: 'front-matter-missing-key',
      message: 'the front matter has no "revision"',
      at: place.at(root),
      hint: 'add "revision: 0" for a first issue',
    });
  }
  const date = readString(reader, root, 'date', 'the front matter', true);
  if (date !== undefined && !isIsoDate(date)) {
    diagnostics.push({
      code: 'front-matter-date',
      message: `the study date "${date}" is not a calendar date written YYYY-MM-DD`,
      at: place.at(nodeOf(root, 'date')),
      hint: 'write e.g. "date: 2026-11-20"; the report shows this date, never the day it was run',
      quantity: 'date',
      expected: 'a calendar date, YYYY-MM-DD',
      actual: date,
    });
  }
  const engineer = readPerson(reader, root, 'engineer', true);
  const checker = readPerson(reader, root, 'checker', false);

  const limitsMap = readMap(reader, root, 'limits', 'the front matter', false);
  const limits = { ...DEFAULT_LIMITS };
  if (limitsMap) {
    rejectUnknownKeys(reader, limitsMap, LIMIT_KEYS, '"limits"');
    limits.blockSeconds = readNumber(reader, limitsMap, 'blockSeconds', '"limits"', { min: 0.1, max: 3600 }) ?? limits.blockSeconds;
    limits.studySeconds = readNumber(reader, limitsMap, 'studySeconds', '"limits"', { min: 1, max: 36000 }) ?? limits.studySeconds;
    limits.heapMb = readNumber(reader, limitsMap, 'heapMb', '"limits"', { min: 32, max: 16384, integer: true }) ?? limits.heapMb;
  }

  const reportMap = readMap(reader, root, 'report', 'the front matter', false);
  // The code goes to an appendix by default, drafts included: a draft shows the report its seal will cover.
  const report: StudyMeta['report'] = { pdf: false, paper: 'A4', code: 'appendix' };
  if (reportMap) {
    rejectUnknownKeys(reader, reportMap, REPORT_KEYS, '"report"');
    const pdf = reportMap.get('pdf');
    if (pdf !== undefined) {
      if (typeof pdf !== 'boolean') {
        diagnostics.push({
          code: 'front-matter-type',
          message: '"pdf" in "report" must be true or false',
          at: place.at(nodeOf(reportMap, 'pdf')),
          hint: 'write "pdf: true"',
        });
      } else report.pdf = pdf;
    }
    const paper = readString(reader, reportMap, 'paper', '"report"', false);
    if (paper !== undefined) {
      if (paper !== 'A4' && paper !== 'Letter') {
        diagnostics.push({
          code: 'front-matter-range',
          message: `paper "${paper}" is not supported`,
          at: place.at(nodeOf(reportMap, 'paper')),
          hint: 'use A4 or Letter',
        });
      } else report.paper = paper;
    }
    const code = readString(reader, reportMap, 'code', '"report"', false);
    if (code !== undefined) {
      if (!CODE_PLACEMENTS.includes(code as CodePlacement)) {
        diagnostics.push({
          code: 'front-matter-range',
          message: `"code" in "report" is "${code}", not one of ${CODE_PLACEMENTS.map((placement) => `"${placement}"`).join(', ')}`,
          at: place.at(nodeOf(reportMap, 'code')),
          hint: 'write "code: appendix" for the calculation code in an appendix (the default), or "code: inline" to show it beside its outputs',
          quantity: 'report.code',
          expected: CODE_PLACEMENTS.join(' or '),
          actual: code,
        });
      } else report.code = code as CodePlacement;
    }
  }

  if (diagnostics.length > before || !title || !project || !id || revision === undefined || !date || !engineer) return undefined;
  return { title, project, ...(line !== undefined ? { line } : {}), id, revision, date, engineer, ...(checker ? { checker } : {}), limits, report };
}

function readPerson(reader: FieldReader, root: YAMLMap, key: 'engineer' | 'checker', required: boolean): Person | undefined {
  const map = readMap(reader, root, key, 'the front matter', required);
  if (!map) return undefined;
  const where = `"${key}"`;
  rejectUnknownKeys(reader, map, PERSON_KEYS, where);
  const name = readString(reader, map, 'name', where, true);
  // The engineer who seals needs a licence and jurisdiction; a checker may be named before being known in full.
  const licence = readString(reader, map, 'licence', where, key === 'engineer');
  const jurisdiction = readString(reader, map, 'jurisdiction', where, key === 'engineer');
  if (!name) return undefined;
  return { name, ...(licence ? { licence } : {}), ...(jurisdiction ? { jurisdiction } : {}) };
}

function isIsoDate(text: string): boolean {
  const match = ISO_DATE.exec(text);
  if (!match) return false;
  const [year, month, day] = [Number(match[1]), Number(match[2]), Number(match[3])];
  const date = new Date(Date.UTC(year, month - 1, day));
  return date.getUTCFullYear() === year && date.getUTCMonth() === month - 1 && date.getUTCDate() === day;
}
