// Design criteria over a solved case table: each criterion judged in every case, and the worst case of each with its margin.
import { readVoltageBand, type CorridorCaseTable, type SolvedCorridorCase } from './cases.ts';
import { SolverDomainError, assertFiniteResult, requireArray, requireChoice, requireNumber, requireObject } from './errors.ts';

export type CaseCriterionKind = 'operating-point' | 'voltage-band' | 'corridor-angle' | 'series-bank-current' | 'svc-range';

export interface CaseCriterionRow {
  case: string;
  criterion: CaseCriterionKind;
  passed: boolean;
  /** Where the value was found: a bus, a section, a segment or an SVC (empty for the case as a whole). */
  where: string;
  value: number | null;
  limit: number | null;
  unit: string;
  /** How far the value is inside its limit, in the criterion's unit; negative when it fails, null for an unsolved case. */
  margin: number | null;
  note: string;
}

export interface CaseCriterionSummary {
  criterion: CaseCriterionKind;
  /** Cases judged on this criterion. */
  caseCount: number;
  failedCount: number;
  /** The row with the least margin (the first failed row of an unsolved case, when there is one). */
  worst: CaseCriterionRow;
}

export interface CaseCriteria {
  rows: CaseCriterionRow[];
  summary: CaseCriterionSummary[];
  allPassed: boolean;
}

export interface CaseCriterionSettings {
  /** Which bank rating a case is held to: the continuous one (normal cases) or the emergency one (contingencies). */
  bankRating?: 'continuous' | 'emergency';
  /** The voltage band for this case when it differs from the study's. */
  bandPu?: { min: number; max: number };
  /** The angle limit for this case when it differs from the study's (a post-contingency limit, for instance). */
  maxAngleDeg?: number;
}

const HINT =
  "Pass { table (from solveCorridorCases), bandPu: { min, max }, maxAngleDeg?, cases?: { <case label>: { bankRating?: 'continuous' | 'emergency', bandPu?, maxAngleDeg? } } }.";

/**
 * Judges every case of a solved table on the usual design criteria: a solution exists; every bus and every point along every section
 * lies within the voltage band; the angle between the corridor's end buses stays within maxAngleDeg (when given, and both ends are
 * connected); each inserted series segment carries no more than its continuous (or, for a case held to it, its emergency) rating; each
 * SVC sits on its slope rather than at a limit. The summary gives, for each criterion, the case with the least margin.
 */
export function corridorCaseCriteria(options: {
  table: CorridorCaseTable;
  bandPu: { min: number; max: number };
  maxAngleDeg?: number;
  cases?: Record<string, CaseCriterionSettings>;
}): CaseCriteria {
  const record = requireObject('options', options, HINT);
  const table = requireObject('table', record.table, HINT) as unknown as CorridorCaseTable;
  const solutions = requireArray('table.cases', table.cases, 1, HINT) as CorridorCaseTable['cases'];
  const bandPu = readVoltageBand('bandPu', record.bandPu);
  const maxAngleDeg = record.maxAngleDeg === undefined ? null : readAngle('maxAngleDeg', record.maxAngleDeg);
  const labels = new Set(solutions.map((solution) => solution.label));
  const settings = new Map<string, { bankRating: 'continuous' | 'emergency'; bandPu: { min: number; max: number }; maxAngleDeg: number | null }>();
  if (record.cases !== undefined) {
    for (const [label, value] of Object.entries(requireObject('cases', record.cases, HINT))) {
      if (!labels.has(label)) {
        throw new SolverDomainError({
          code: 'out-of-range',
          quantity: `cases.${label}`,
          value: label,
          allowedRange: `one of ${[...labels].map((known) => `'${known}'`).join(', ')}`,
          hint: 'Settings are given per case label of the table.',
        });
      }
      const entry = requireObject(`cases.${label}`, value, HINT);
      settings.set(label, {
        bankRating:
          entry.bankRating === undefined
            ? 'continuous'
            : requireChoice(`cases.${label}.bankRating`, entry.bankRating, ['continuous', 'emergency'] as const, HINT),
        bandPu: entry.bandPu === undefined ? bandPu : readVoltageBand(`cases.${label}.bandPu`, entry.bandPu),
        maxAngleDeg: entry.maxAngleDeg === undefined ? maxAngleDeg : readAngle(`cases.${label}.maxAngleDeg`, entry.maxAngleDeg),
      });
    }
  }
  const rows = solutions.flatMap((solution): CaseCriterionRow[] => {
    if (!solution.solved) {
      return [
        {
          case: solution.label,
          criterion: 'operating-point',
          passed: false,
          where: '',
          value: null,
          limit: null,
          unit: '',
          margin: null,
          note: solution.reason,
        },
      ];
    }
    const caseSettings = settings.get(solution.label) ?? { bankRating: 'continuous' as const, bandPu, maxAngleDeg };
    return [
      {
        case: solution.label,
        criterion: 'operating-point',
        passed: true,
        where: '',
        value: null,
        limit: null,
        unit: '',
        margin: null,
        note: 'solved',
      },
      ...bandRows(solution, caseSettings.bandPu),
      ...angleRows(solution, caseSettings.maxAngleDeg),
      ...bankRows(solution, caseSettings.bankRating),
      ...svcRows(solution),
    ];
  });
  const kinds: CaseCriterionKind[] = ['operating-point', 'voltage-band', 'corridor-angle', 'series-bank-current', 'svc-range'];
  const summary = kinds.flatMap((criterion): CaseCriterionSummary[] => {
    const judged = rows.filter((row) => row.criterion === criterion);
    if (judged.length === 0) return [];
    const worst = judged.reduce((least, row) => (tighter(row, least) ? row : least));
    return [{ criterion, caseCount: new Set(judged.map((row) => row.case)).size, failedCount: judged.filter((row) => !row.passed).length, worst }];
  });
  return assertFiniteResult('corridorCaseCriteria', { rows, summary, allPassed: rows.every((row) => row.passed) });
}

/** A failed row before a passed one; among equals, the smaller margin (a missing margin counts as the least). */
function tighter(row: CaseCriterionRow, than: CaseCriterionRow): boolean {
  if (row.passed !== than.passed) return !row.passed;
  if (row.margin === null) return than.margin !== null;
  if (than.margin === null) return false;
  return row.margin < than.margin;
}

function readAngle(path: string, value: unknown): number {
  return requireNumber(
    path,
    value,
    { min: 0, max: 90, minInclusive: false, unit: 'deg' },
    'The largest angle allowed across the corridor; about 30 to 35 degrees is common practice for steady-state margin.',
  );
}

function bandRows(solution: SolvedCorridorCase, band: { min: number; max: number }): CaseCriterionRow[] {
  const points = [
    ...solution.buses.map((bus) => ({ where: bus.name, pu: bus.voltagePu })),
    ...solution.sections.flatMap((section) => [
      { where: `${section.name} at ${section.maximum.corridorKm.toFixed(0)} km`, pu: section.maximum.voltagePu },
      { where: `${section.name} at ${section.minimum.corridorKm.toFixed(0)} km`, pu: section.minimum.voltagePu },
    ]),
  ];
  const highest = points.reduce((best, point) => (point.pu > best.pu ? point : best));
  const lowest = points.reduce((best, point) => (point.pu < best.pu ? point : best));
  const row = (point: { where: string; pu: number }, side: 'highest' | 'lowest'): CaseCriterionRow => {
    const limit = side === 'highest' ? band.max : band.min;
    const margin = side === 'highest' ? band.max - point.pu : point.pu - band.min;
    return {
      case: solution.label,
      criterion: 'voltage-band',
      passed: margin >= 0,
      where: point.where,
      value: point.pu,
      limit,
      unit: 'pu',
      margin,
      note: `${side} voltage, band ${band.min} to ${band.max} pu`,
    };
  };
  return [row(highest, 'highest'), row(lowest, 'lowest')];
}

function angleRows(solution: SolvedCorridorCase, maxAngleDeg: number | null): CaseCriterionRow[] {
  if (maxAngleDeg === null || !solution.systems.sending.connected || !solution.systems.receiving.connected) return [];
  const first = solution.buses[0]!;
  const last = solution.buses[solution.buses.length - 1]!;
  const angleDeg = Math.abs(first.angleDeg - last.angleDeg);
  return [
    {
      case: solution.label,
      criterion: 'corridor-angle',
      passed: angleDeg <= maxAngleDeg,
      where: `${first.name} to ${last.name}`,
      value: angleDeg,
      limit: maxAngleDeg,
      unit: 'deg',
      margin: maxAngleDeg - angleDeg,
      note: 'angle between the end buses',
    },
  ];
}

function bankRows(solution: SolvedCorridorCase, rating: 'continuous' | 'emergency'): CaseCriterionRow[] {
  return solution.sections.flatMap((section) =>
    section.seriesCapacitors
      .filter((segment) => !segment.bypassed)
      .map((segment): CaseCriterionRow => {
        const limitA = rating === 'emergency' && segment.emergencyCurrentA !== null ? segment.emergencyCurrentA : segment.ratedCurrentA;
        return {
          case: solution.label,
          criterion: 'series-bank-current',
          passed: segment.currentA <= limitA,
          where: segment.name,
          value: segment.currentA,
          limit: limitA,
          unit: 'A',
          margin: limitA - segment.currentA,
          note:
            rating === 'emergency' && segment.emergencyCurrentA === null
              ? 'held to the continuous rating: the segment has no emergency rating'
              : `${rating} rating, rms per circuit`,
        };
      }),
  );
}

function svcRows(solution: SolvedCorridorCase): CaseCriterionRow[] {
  return solution.svcs
    .filter((svc) => svc.inService)
    .map((svc) => ({
      case: solution.label,
      criterion: 'svc-range' as const,
      passed: svc.atLimit === null,
      where: svc.name,
      value: svc.outputMvar,
      limit: null,
      unit: 'Mvar',
      margin: null,
      note: svc.atLimit === null ? 'on its slope' : `at its ${svc.atLimit} limit: no range left for this case`,
    }));
}
