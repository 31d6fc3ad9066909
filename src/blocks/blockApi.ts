// The block API: the globals a calculation block calls (inputs, result, table, caseTable, criterion, caution, chart, figure, solver).
import type { InputData } from '../execute/protocol.ts';
import { type CaseTableLayout, caseTableContent, unsolvedNotes } from './caseTable.ts';
import type { CorridorCaseTable } from '../solver/cases.ts';
import type { BlockPosition, BlockRecord, ScalarValue, TableColumn } from '../execute/records.ts';
import { DEFAULT_DIGITS, formatCount, formatQuantity, formatStated } from './format.ts';
import { type UnitProblem, convertQuantity, unitProblem } from '../study/units.ts';
import type { CodesStartingWith } from '../diagnostics/codes.ts';
import { Problem } from '../diagnostics/diagnostic.ts';
import { UnloggableValue, recordedValue } from './summarise.ts';
import { freezeDeep } from '../execute/child/harden.ts';
import { OUTPUT_LIMITS } from '../execute/limits.ts';
import { TEXT_PROBLEM_HINTS, type TextRole, nameKey, outputTextProblem } from '../execute/outputText.ts';

/** A thrown block-API misuse: the message names what and the hint says how to fix it. */
export class BlockApiError extends Problem {
  override readonly name = 'BlockApiError';
  declare readonly code: CodesStartingWith<'block-' | 'inline-'>;
  declare readonly hint: string;
  constructor(code: CodesStartingWith<'block-' | 'inline-'>, message: string, hint: string) {
    super({ code, message, hint });
  }
}

/** A figure a reader sees: a value with its unit and significant figures; `{{ }}` shows it formatted. */
export class Figure {
  readonly value: ScalarValue;
  readonly unit: string;
  readonly digits: number;
  constructor(value: ScalarValue, unit: string, digits: number) {
    this.value = value;
    this.unit = unit;
    this.digits = digits;
    Object.freeze(this);
  }
  valueOf(): ScalarValue {
    return this.value;
  }
  toString(): string {
    return formatQuantity(this.value, this.unit, this.digits);
  }
}

/** A study input inside a block: read it in the unit you need with `.in('kV')`, or `.si` for SI. */
export class InputValue {
  readonly name: string;
  /** The number as given, in `unit`. */
  readonly value: number;
  readonly unit: string;
  readonly si: number;
  readonly description: string;
  constructor(data: InputData) {
    this.name = data.name;
    this.value = data.value;
    this.unit = data.unit;
    this.si = data.si;
    this.description = data.description ?? '';
    Object.freeze(this);
  }
  in(unit: string): number {
    try {
      return convertQuantity(this.value, this.unit, unit);
    } catch (error) {
      const problem = error as UnitProblem;
      throw new BlockApiError(
        'block-input-conversion',
        `inputs.${this.name} (${this.toString()}): ${problem.message}`,
        problem.hint ?? 'ask for a unit of the same kind',
      );
    }
  }
  toString(): string {
    // An input is a stated number: shown as given, without padding zeros.
    return formatQuantity(formatStated(this.value, 15), this.unit);
  }
}

export interface ResultOptions {
  unit?: string;
  digits?: number;
  note?: string;
  tolerance?: number;
}

export interface CriterionLimits {
  min?: number;
  max?: number;
  unit?: string;
  digits?: number;
  note?: string;
  /** What the criterion measures, e.g. "the lowest voltage at any bus and along the line in every normal case". */
  measures?: string;
  /** Where its limit comes from, e.g. "the utility's planning standard, clause 4.2". */
  basis?: string;
}

export interface TableColumnOption {
  key: string;
  label?: string;
  unit?: string;
  digits?: number;
}

export interface TableOptions {
  caption?: string;
  columns?: TableColumnOption[];
}

export interface ChartOptions {
  caption: string;
}

export interface CaseTableOptions {
  caption?: string;
  /** Cases as rows (the default: bus voltages, highest along the lines, angle, SVC outputs, segment currents) or buses as rows. */
  layout?: CaseTableLayout;
}

export interface Recorder {
  record(record: BlockRecord): void;
  /** Where in the calling block the API was called from. */
  callerPosition(): BlockPosition | undefined;
}

function requireName(kind: 'result' | 'criterion', name: unknown): string {
  if (typeof name !== 'string' || name.trim() === '') {
    throw new BlockApiError(
      `block-${kind}-name`,
      `${kind}() needs a name as its first argument, got ${describe(name)}`,
      `write e.g. ${kind}('receivingEndVoltage', ...)`,
    );
  }
  return checkedText(kind, 'the name', name, 'name');
}

/** A text a report shows, refused when it is too long, hides characters or says NaN. */
export function checkedText(kind: string, what: string, text: string, role: TextRole): string {
  const problem = outputTextProblem(role, text);
  if (problem) throw new BlockApiError(`block-${problem.code}`, `${kind}: ${what} ${problem.message}`, TEXT_PROBLEM_HINTS[problem.code]);
  return text;
}

function requireUnit(kind: string, name: string, unit: unknown): string {
  if (unit === undefined) return '';
  if (typeof unit !== 'string')
    throw new BlockApiError('block-unit', `${kind} "${name}": unit must be text, got ${describe(unit)}`, 'write e.g. { unit: "Mvar" }');
  checkedText(kind, 'the unit', unit, 'name');
  const problem = unitProblem(unit);
  if (problem)
    throw new BlockApiError(
      'block-unit',
      `${kind} "${name}": unknown unit "${unit}" (${problem})`,
      'use a unit such as kV, MW, Mvar, km, ohm, uS, Hz, deg, pu or %; a voltage or a current may say "rms" or "peak" after its unit ("kV peak")',
    );
  return unit;
}

function requireDigits(kind: string, name: string, digits: unknown): number {
  if (digits === undefined) return DEFAULT_DIGITS;
  if (typeof digits !== 'number' || !Number.isInteger(digits) || digits < 1 || digits > 15) {
    throw new BlockApiError(
      'block-digits',
      `${kind} "${name}": digits = ${describe(digits)} is outside the allowed range 1 to 15`,
      'digits is the number of significant figures shown',
    );
  }
  return digits;
}

function requireFinite(kind: string, name: string, what: string, value: unknown): number {
  const number = value instanceof Figure ? value.value : value;
  if (typeof number !== 'number' || !Number.isFinite(number)) {
    throw new BlockApiError(
      'block-non-finite',
      `${kind} "${name}": ${what} is ${describe(number)}, not a finite number`,
      'a NaN or Infinity usually means a division by zero or a missing input upstream; a report never shows one',
    );
  }
  return number;
}

function describe(value: unknown): string {
  if (typeof value === 'number') return String(value);
  if (typeof value === 'string') return JSON.stringify(value);
  if (value === null || value === undefined) return String(value);
  return typeof value;
}

function scalarOf(kind: string, where: string, value: unknown): ScalarValue {
  const plain = value instanceof Figure || value instanceof InputValue ? value.value : value;
  if (typeof plain === 'string') return checkedText(kind, `${where}: the text`, plain, 'text');
  if (typeof plain === 'boolean') return plain;
  return requireFinite(kind, where, 'the value', plain);
}

/** Build the globals one study run shares across its blocks. */
export function createBlockApi(
  inputData: readonly InputData[],
  recorder: Recorder,
  solverModule: Record<string, unknown>,
  chartModule: Record<string, unknown>,
) {
  // Keyed by look-alike form: "Vr" and a full-width "Ｖr" are one name to a reader.
  const resultNames = new Map<string, string>();
  const criterionNames = new Map<string, string>();
  let writtenCharacters = 0;
  const emit = (record: BlockRecord) => {
    // Everything a study writes counts against one allowance, so that no loop can make the report grow without end.
    writtenCharacters += JSON.stringify(record).length;
    if (writtenCharacters > OUTPUT_LIMITS.studyOutputBytes) {
      throw new BlockApiError(
        'block-output-limit',
        `the study has written more than ${OUTPUT_LIMITS.studyOutputBytes / 1024 / 1024} MB of output in all (results, tables, charts, printed text, and every solver call, which the calculation log records in full), which is all a report holds`,
        'print less (console.log inside a loop adds up), summarise long series in a table or a chart, or call the solver fewer times (each call inside a long loop is logged whole)',
      );
    }
    const position = recorder.callerPosition();
    recorder.record(position ? { ...record, position } : record);
  };

  const inputs: Record<string, InputValue> = Object.create(null);
  for (const data of inputData) inputs[data.name] = new InputValue(data);
  Object.freeze(inputs);

  function result(name: string, value: ScalarValue | Figure, options: ResultOptions = {}): Figure {
    requireName('result', name);
    const earlier = resultNames.get(nameKey(name));
    if (earlier !== undefined) {
      throw new BlockApiError(
        'block-result-duplicate',
        earlier === name ? `result "${name}" is recorded twice` : `result "${name}" looks like the result "${earlier}" recorded before`,
        'every named result is a figure a checker verifies: give each its own name',
      );
    }
    const scalar = scalarOf('result', name, value);
    const unit = requireUnit('result', name, options.unit ?? (value instanceof Figure ? value.unit : undefined));
    const digits = requireDigits('result', name, options.digits ?? (value instanceof Figure ? value.digits : undefined));
    if (options.tolerance !== undefined && !(typeof options.tolerance === 'number' && options.tolerance > 0 && options.tolerance < 1)) {
      throw new BlockApiError(
        'block-tolerance',
        `result "${name}": tolerance = ${describe(options.tolerance)} is outside the allowed range (0, 1)`,
        'tolerance is the relative difference a checker accepts, e.g. 1e-6',
      );
    }
    resultNames.set(nameKey(name), name);
    emit({
      kind: 'result',
      name,
      value: scalar,
      unit,
      digits,
      ...(options.note ? { note: checkedText('result', `"${name}": the note`, String(options.note), 'text') } : {}),
      ...(options.tolerance !== undefined ? { tolerance: options.tolerance } : {}),
    });
    return new Figure(scalar, unit, digits);
  }

  function criterion(name: string, value: number | Figure, limits: CriterionLimits): boolean {
    requireName('criterion', name);
    const earlier = criterionNames.get(nameKey(name));
    if (earlier !== undefined) {
      throw new BlockApiError(
        'block-criterion-duplicate',
        earlier === name ? `criterion "${name}" is checked twice` : `criterion "${name}" looks like the criterion "${earlier}" checked before`,
        'give each criterion its own name',
      );
    }
    const number = requireFinite('criterion', name, 'the value', value);
    if (!limits || (limits.min === undefined && limits.max === undefined)) {
      throw new BlockApiError(
        'block-criterion-limits',
        `criterion "${name}" has neither min nor max`,
        'write e.g. criterion("Receiving-end voltage", v, { min: 0.95, max: 1.05, unit: "pu" })',
      );
    }
    const min = limits.min === undefined ? undefined : requireFinite('criterion', name, 'min', limits.min);
    const max = limits.max === undefined ? undefined : requireFinite('criterion', name, 'max', limits.max);
    if (min !== undefined && max !== undefined && min > max)
      throw new BlockApiError('block-criterion-limits', `criterion "${name}": min ${min} is above max ${max}`, 'swap min and max');
    const unit = requireUnit('criterion', name, limits.unit ?? (value instanceof Figure ? value.unit : undefined));
    const digits = requireDigits('criterion', name, limits.digits ?? (value instanceof Figure ? value.digits : undefined));
    const passed = (min === undefined || number >= min) && (max === undefined || number <= max);
    criterionNames.set(nameKey(name), name);
    emit({
      kind: 'criterion',
      name,
      value: number,
      unit,
      digits,
      ...(min !== undefined ? { min } : {}),
      ...(max !== undefined ? { max } : {}),
      passed,
      ...(limits.note ? { note: checkedText('criterion', `"${name}": the note`, String(limits.note), 'text') } : {}),
      ...(limits.measures ? { measures: checkedText('criterion', `"${name}": what it measures`, String(limits.measures), 'text') } : {}),
      ...(limits.basis ? { basis: checkedText('criterion', `"${name}": its basis`, String(limits.basis), 'text') } : {}),
    });
    return passed;
  }

  function caution(text: string): void {
    if (typeof text !== 'string' || text.trim() === '')
      throw new BlockApiError(
        'block-caution-text',
        'caution() needs the text of the caution',
        'write e.g. caution("Energise the reactor before the line ...")',
      );
    emit({ kind: 'caution', text: checkedText('caution', 'the text', text.trim(), 'text') });
  }

  function table(rows: readonly (Record<string, unknown> | readonly unknown[])[], options: TableOptions = {}): void {
    if (!Array.isArray(rows))
      throw new BlockApiError('block-table-rows', 'table() needs an array of rows', 'pass e.g. [{ caseName: "light load", vrPu: 1.02 }]');
    const columnOptions: TableColumnOption[] =
      options.columns ?? (rows.length > 0 && !Array.isArray(rows[0]) ? Object.keys(rows[0] as object).map((key) => ({ key })) : []);
    const caption = options.caption === undefined ? undefined : checkedText('table', 'the caption', String(options.caption), 'caption');
    if (rows.length * columnOptions.length > OUTPUT_LIMITS.tableCells) {
      throw new BlockApiError(
        'block-output-limit',
        `table${caption ? ` "${caption.slice(0, 80)}"` : ''}: ${formatCount(rows.length)} rows of ${columnOptions.length} columns are ${formatCount(rows.length * columnOptions.length)} cells; a report table holds at most ${formatCount(OUTPUT_LIMITS.tableCells)}`,
        'show fewer rows (every tenth point, or the ends and extremes), or draw the series as a chart',
      );
    }
    const columns: TableColumn[] = columnOptions.map((column, index) => {
      const label = checkedText('table column', 'the label', String(column.label ?? column.key ?? `column ${index + 1}`), 'name');
      return {
        key: String(column.key ?? index),
        label,
        unit: requireUnit('table column', label, column.unit),
        digits: requireDigits('table column', label, column.digits),
      };
    });
    const body: ScalarValue[][] = rows.map((row, rowIndex) =>
      columns.map((column, columnIndex) => {
        const cell = Array.isArray(row) ? row[columnIndex] : (row as Record<string, unknown>)[column.key];
        return scalarOf('table', `${caption ?? 'table'}, row ${rowIndex + 1}, column "${column.label}"`, cell);
      }),
    );
    emit({ kind: 'table', ...(caption ? { caption } : {}), columns, rows: body });
  }

  /** The cases of solveCorridorCases as one numbered table; a case without a solution keeps its row, and its reason is printed beneath. */
  function caseTable(cases: CorridorCaseTable, options: CaseTableOptions = {}): void {
    if (!cases || typeof cases !== 'object' || !Array.isArray((cases as { cases?: unknown }).cases)) {
      throw new BlockApiError(
        'block-case-table',
        'caseTable() needs the result of solver.solveCorridorCases',
        'pass e.g. caseTable(solver.solveCorridorCases({ corridor, cases }))',
      );
    }
    const layout = options.layout ?? 'cases-as-rows';
    if (layout !== 'cases-as-rows' && layout !== 'buses-as-rows') {
      throw new BlockApiError(
        'block-case-table',
        `caseTable() layout "${String(layout)}" is not one of "cases-as-rows", "buses-as-rows"`,
        'leave it out for cases as rows',
      );
    }
    const content = caseTableContent(cases, layout);
    table(content.rows, { ...(options.caption === undefined ? {} : { caption: options.caption }), columns: content.columns });
    for (const note of [...unsolvedNotes(cases), ...content.notes]) emit({ kind: 'text', text: note });
  }

  function chart(spec: object, options: ChartOptions): void {
    if (!options || typeof options.caption !== 'string' || options.caption.trim() === '') {
      throw new BlockApiError(
        'block-chart-caption',
        'chart() needs { caption: "..." }: every figure in a report has a caption',
        'write e.g. chart(spec, { caption: "Receiving-end voltage along the line" })',
      );
    }
    const caption = checkedText('chart', 'the caption', options.caption.trim(), 'caption');
    let plain: unknown;
    try {
      const json = JSON.stringify(spec);
      if (json.length > OUTPUT_LIMITS.chartSpecCharacters) {
        throw new BlockApiError(
          'block-output-limit',
          `chart "${caption.slice(0, 80)}": the specification is ${formatCount(json.length)} characters of JSON; a chart may have at most ${formatCount(OUTPUT_LIMITS.chartSpecCharacters)}`,
          'draw fewer points: a line of a few hundred points looks the same on paper',
        );
      }
      plain = JSON.parse(json);
    } catch (error) {
      if (error instanceof BlockApiError) throw error;
      throw new BlockApiError(
        'block-chart-spec',
        `chart "${caption}": the specification is not plain data (${(error as Error).message})`,
        'a Vega-Lite specification is JSON: numbers, text, arrays and objects',
      );
    }
    if (typeof plain !== 'object' || plain === null)
      throw new BlockApiError('block-chart-spec', `chart "${caption}": the specification must be an object`, 'pass a Vega-Lite specification object');
    emit({ kind: 'chart', caption, spec: plain });
  }

  function figure(value: ScalarValue, unit = '', digits?: number): Figure {
    const scalar = scalarOf('figure', String(unit), value);
    return new Figure(scalar, requireUnit('figure', String(value), unit), requireDigits('figure', String(value), digits));
  }

  const logged = (functionName: string, what: string, value: unknown) => {
    try {
      return recordedValue(value);
    } catch (error) {
      if (!(error instanceof UnloggableValue)) throw error;
      throw new BlockApiError(
        'block-output-limit',
        `solver.${functionName}: the calculation log records every value in full, and ${what} cannot be recorded: ${error.message}`,
        'pass the solver plain data: numbers, texts, arrays and objects that do not refer to themselves',
      );
    }
  };
  const solver = wrapSolver(solverModule, (functionName, args, returned) =>
    emit({
      kind: 'solver-call',
      functionName,
      argumentsSummary: logged(functionName, 'its arguments', args),
      returnedSummary: logged(functionName, 'its result', returned),
    }),
  );

  const console = {
    log: (...parts: unknown[]) => emit({ kind: 'text', text: checkedText('console.log', 'the printed line', parts.map(String).join(' '), 'text') }),
  };

  // The classes of what the API returns and throws: their prototypes are reachable from every instance.
  freezeDeep([Figure, InputValue, BlockApiError]);
  // Deeply: the functions with their own properties, the namespaces, the inputs.
  return freezeDeep({ inputs, result, criterion, caution, table, caseTable, chart, figure, solver, charts: { ...chartModule }, console });
}

/** Every exported solver function, recorded in the calculation log when a block calls it. */
function wrapSolver(
  solverModule: Record<string, unknown>,
  log: (functionName: string, args: unknown[], returned: unknown) => void,
): Readonly<Record<string, unknown>> {
  const wrapped: Record<string, unknown> = {};
  for (const [name, exported] of Object.entries(solverModule)) {
    if (typeof exported !== 'function' || /^[A-Z]/.test(name)) {
      wrapped[name] = exported;
      continue;
    }
    const fn = exported as (...args: unknown[]) => unknown;
    wrapped[name] = (...args: unknown[]) => {
      const returned = fn(...args);
      log(name, args, returned);
      // A result one block keeps is read by later ones: no block may change it for them.
      return freezeDeep(returned);
    };
  }
  return Object.freeze(wrapped);
}

export type BlockApi = ReturnType<typeof createBlockApi>;
