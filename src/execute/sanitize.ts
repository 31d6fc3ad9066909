// Records from the calculation child are untrusted data: keep only well-formed ones, and refuse non-finite numbers.
import { type Diagnostic, type DiagnosticValue, type SourceLocation, StudyFailure } from '../diagnostics/diagnostic.ts';
import type { Study } from '../study/model.ts';
import type { BlockErrorReport, BlockPosition, BlockRecord, ScalarValue, TableColumn } from './records.ts';
import { OUTPUT_LIMITS } from './limits.ts';
import { formatCount } from '../blocks/format.ts';
import { TEXT_PROBLEM_HINTS, type TextProblem, type TextRole, outputTextProblem } from './outputText.ts';

const isText = (value: unknown): value is string => typeof value === 'string';
const isFiniteNumber = (value: unknown): value is number => typeof value === 'number' && Number.isFinite(value);
const isScalar = (value: unknown): value is ScalarValue => isText(value) || isFiniteNumber(value) || typeof value === 'boolean';
const isDigits = (value: unknown): value is number => isFiniteNumber(value) && Number.isInteger(value) && value >= 1 && value <= 15;

const isWholeNumber = (value: unknown): value is number => Number.isSafeInteger(value);
const isCountingNumber = (value: unknown): value is number => isWholeNumber(value) && value >= 1;

/** Keys that would reach an object's prototype if host code ever merged the data into another object. */
const PROTOTYPE_KEYS = new Set(['__proto__', 'constructor', 'prototype']);
const MAX_PLAIN_DEPTH = 64;
const MAX_ERROR_TEXT = 4000;

function positionOf(value: unknown): BlockPosition | undefined {
  if (typeof value !== 'object' || value === null) return undefined;
  const { blockIndex, line, column } = value as Record<string, unknown>;
  return isWholeNumber(blockIndex) && isCountingNumber(line) && isCountingNumber(column) ? { blockIndex, line, column } : undefined;
}

/**
 * A copy of JSON-shaped data with every prototype-reaching key dropped, so that a chart specification or a
 * solver summary from the child can be handed to libraries that merge objects without polluting the host.
 */
export function plainData(value: unknown, depth = 0): unknown {
  if (value === null || typeof value === 'string' || typeof value === 'boolean') return value;
  if (typeof value === 'number') return Number.isFinite(value) ? value : null;
  if (typeof value !== 'object' || depth >= MAX_PLAIN_DEPTH) return null;
  if (Array.isArray(value)) return value.map((item) => plainData(item, depth + 1));
  const copy: Record<string, unknown> = {};
  for (const key of Object.keys(value)) {
    if (!PROTOTYPE_KEYS.has(key)) copy[key] = plainData((value as Record<string, unknown>)[key], depth + 1);
  }
  return copy;
}

function boundedText(value: unknown, fallback: string): string {
  const text = isText(value) ? value : fallback;
  return text.length > MAX_ERROR_TEXT ? `${text.slice(0, MAX_ERROR_TEXT)}…` : text;
}

/** An error report from the child, reduced to well-formed fields: text is text, positions are whole numbers. */
export function sanitizeErrorReport(raw: unknown): BlockErrorReport {
  const report = typeof raw === 'object' && raw !== null ? (raw as Record<string, unknown>) : {};
  const positions = Array.isArray(report.positions) ? report.positions.map(positionOf).filter((position) => position !== undefined) : [];
  return {
    name: boundedText(report.name, 'Error'),
    message: boundedText(report.message, 'the calculation process reported a failure without a message'),
    ...(isText(report.code) ? { code: boundedText(report.code, '') } : {}),
    ...(isText(report.hint) ? { hint: boundedText(report.hint, '') } : {}),
    ...(isText(report.quantity) ? { quantity: boundedText(report.quantity, '') } : {}),
    ...(isText(report.expected) ? { expected: boundedText(report.expected, '') } : {}),
    ...(isDiagnosticValue(report.actual) ? { actual: isText(report.actual) ? boundedText(report.actual, '') : report.actual } : {}),
    positions,
  };
}

function isDiagnosticValue(value: unknown): value is DiagnosticValue {
  return value === null || typeof value === 'boolean' || (typeof value === 'number' && Number.isFinite(value)) || isText(value);
}

function optionalText(value: unknown): string | undefined {
  return isText(value) ? value : undefined;
}

function one(raw: unknown): BlockRecord | undefined {
  if (typeof raw !== 'object' || raw === null) return undefined;
  const record = raw as Record<string, unknown>;
  const position = positionOf(record.position);
  const withPosition = (value: BlockRecord): BlockRecord => (position ? { ...value, position } : value);
  switch (record.kind) {
    case 'result':
      if (!isText(record.name) || !isScalar(record.value) || !isText(record.unit) || !isDigits(record.digits)) return undefined;
      return withPosition({
        kind: 'result',
        name: record.name,
        value: record.value,
        unit: record.unit,
        digits: record.digits,
        ...(optionalText(record.note) ? { note: record.note as string } : {}),
        ...(isFiniteNumber(record.tolerance) ? { tolerance: record.tolerance } : {}),
      });
    case 'criterion':
      if (
        !isText(record.name) ||
        !isFiniteNumber(record.value) ||
        !isText(record.unit) ||
        !isDigits(record.digits) ||
        typeof record.passed !== 'boolean'
      )
        return undefined;
      if ((record.min !== undefined && !isFiniteNumber(record.min)) || (record.max !== undefined && !isFiniteNumber(record.max))) return undefined;
      return withPosition({
        kind: 'criterion',
        name: record.name,
        value: record.value,
        unit: record.unit,
        digits: record.digits,
        ...(record.min !== undefined ? { min: record.min as number } : {}),
        ...(record.max !== undefined ? { max: record.max as number } : {}),
        passed: record.passed,
        ...(optionalText(record.note) ? { note: record.note as string } : {}),
        ...(optionalText(record.measures) ? { measures: record.measures as string } : {}),
        ...(optionalText(record.basis) ? { basis: record.basis as string } : {}),
      });
    case 'caution':
      return isText(record.text) ? withPosition({ kind: 'caution', text: record.text }) : undefined;
    case 'text':
      return isText(record.text) ? withPosition({ kind: 'text', text: record.text }) : undefined;
    case 'table': {
      if (!Array.isArray(record.columns) || !Array.isArray(record.rows)) return undefined;
      const columns: TableColumn[] = [];
      for (const column of record.columns as unknown[]) {
        const c = column as Record<string, unknown>;
        if (!c || !isText(c.key) || !isText(c.label) || !isText(c.unit) || !isDigits(c.digits)) return undefined;
        columns.push({ key: c.key, label: c.label, unit: c.unit, digits: c.digits });
      }
      const rows: ScalarValue[][] = [];
      for (const row of record.rows as unknown[]) {
        if (!Array.isArray(row) || row.length !== columns.length || !row.every(isScalar)) return undefined;
        rows.push(row as ScalarValue[]);
      }
      return withPosition({ kind: 'table', ...(optionalText(record.caption) ? { caption: record.caption as string } : {}), columns, rows });
    }
    case 'chart':
      return isText(record.caption) && typeof record.spec === 'object' && record.spec !== null
        ? withPosition({ kind: 'chart', caption: record.caption, spec: plainData(record.spec) })
        : undefined;
    case 'solver-call':
      return isText(record.functionName)
        ? withPosition({
            kind: 'solver-call',
            functionName: record.functionName,
            argumentsSummary: plainData(record.argumentsSummary),
            returnedSummary: plainData(record.returnedSummary),
          })
        : undefined;
    default:
      return undefined;
  }
}

/** The texts of a record with the role each plays in a report. */
function textsOf(record: BlockRecord): [string, string, TextRole][] {
  switch (record.kind) {
    case 'result':
      return [
        ['the name', record.name, 'name'],
        ['the unit', record.unit, 'name'],
        ...(typeof record.value === 'string' ? [['the value', record.value, 'text'] as [string, string, TextRole]] : []),
        ...(record.note !== undefined ? [['the note', record.note, 'text'] as [string, string, TextRole]] : []),
      ];
    case 'criterion':
      return [
        ['the name', record.name, 'name'],
        ['the unit', record.unit, 'name'],
        ...(record.note !== undefined ? [['the note', record.note, 'text'] as [string, string, TextRole]] : []),
        ...(record.measures !== undefined ? [['what it measures', record.measures, 'text'] as [string, string, TextRole]] : []),
        ...(record.basis !== undefined ? [['its basis', record.basis, 'text'] as [string, string, TextRole]] : []),
      ];
    case 'caution':
    case 'text':
      return [['the text', record.text, 'text']];
    case 'table':
      return [
        ...(record.caption !== undefined ? [['the caption', record.caption, 'caption'] as [string, string, TextRole]] : []),
        ...record.columns.flatMap((column): [string, string, TextRole][] => [
          ['a column label', column.label, 'name'],
          ['a column unit', column.unit, 'name'],
        ]),
        ...record.rows.flatMap((row) =>
          row.flatMap((cell): [string, string, TextRole][] => (typeof cell === 'string' ? [['a cell', cell, 'text']] : [])),
        ),
      ];
    case 'chart':
      return [['the caption', record.caption, 'caption']];
    case 'solver-call':
      return [['the solver function', record.functionName, 'name']];
  }
}

/** What makes a well-formed record too large or unfit to show, or undefined when it may reach the report. */
function outputProblem(record: BlockRecord): { what: string; problem: TextProblem } | undefined {
  if (record.kind === 'table' && record.rows.length * record.columns.length > OUTPUT_LIMITS.tableCells) {
    return {
      what: 'a table',
      problem: {
        code: 'output-limit',
        message: `has ${formatCount(record.rows.length * record.columns.length)} cells; a report table holds at most ${formatCount(OUTPUT_LIMITS.tableCells)}`,
      },
    };
  }
  if (record.kind === 'chart') {
    const characters = JSON.stringify(record.spec).length;
    if (characters > OUTPUT_LIMITS.chartSpecCharacters) {
      return {
        what: `chart "${record.caption.slice(0, 80)}"`,
        problem: {
          code: 'output-limit',
          message: `has a specification of ${formatCount(characters)} characters; a chart may have at most ${formatCount(OUTPUT_LIMITS.chartSpecCharacters)}`,
        },
      };
    }
  }
  for (const [what, text, role] of textsOf(record)) {
    const problem = outputTextProblem(role, text);
    if (problem) return { what: `${record.kind}: ${what}`, problem };
  }
  return undefined;
}

/** What the whole study has written so far, across its blocks. */
export interface OutputBudget {
  characters: number;
}

export function sanitizeRecords(raw: unknown, study: Study, at: SourceLocation, budget: OutputBudget = { characters: 0 }): BlockRecord[] {
  if (!Array.isArray(raw)) return [];
  const out: BlockRecord[] = [];
  const problems: Diagnostic[] = [];
  for (const item of raw) {
    const record = one(item);
    if (!record) {
      problems.push({
        code: 'record-malformed',
        message: 'the calculation process sent a malformed record (a result, table or criterion with a missing or non-finite value)',
        at,
        hint: `this should not happen through the block API; check the block at line ${at.line} of ${study.file}`,
      });
      continue;
    }
    // The calculation process checks all of this at the call; a process that did not is stopped here.
    budget.characters += JSON.stringify(item).length;
    const found =
      budget.characters > OUTPUT_LIMITS.studyOutputBytes
        ? {
            what: 'the study',
            problem: {
              code: 'output-limit',
              message: `has written more than ${OUTPUT_LIMITS.studyOutputBytes / 1024 / 1024} MB of output in all`,
            } satisfies TextProblem,
          }
        : outputProblem(record);
    if (found)
      problems.push({
        code: `block-${found.problem.code}`,
        message: `${found.what} ${found.problem.message}`,
        at,
        hint: TEXT_PROBLEM_HINTS[found.problem.code],
      });
    else out.push(record);
  }
  if (problems.length > 0) throw new StudyFailure(problems.slice(0, 1));
  return out;
}
