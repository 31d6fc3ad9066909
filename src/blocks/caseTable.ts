// The case table a study shows: every operating case of a corridor as a numbered table, cases as rows or buses as rows.
import { type CorridorCaseTable, caseVoltageExtremes } from '../solver/cases.ts';

export type CaseTableLayout = 'cases-as-rows' | 'buses-as-rows';

export interface CaseTableColumn {
  key: string;
  label: string;
  unit?: string;
  digits?: number;
}

export interface CaseTableContent {
  columns: CaseTableColumn[];
  rows: Record<string, string | number>[];
  /** What a reader needs beneath the table to lose nothing: the columns left out because no case has a value for them. */
  notes: string[];
}

type Solutions = Pick<CorridorCaseTable, 'cases'> & { busNames?: readonly string[]; sectionNames?: readonly string[] };

const DIGITS_PU = 4;

/**
 * Cases as rows: the case number and label, each bus voltage (pu), the highest voltage along the lines (pu), the angle across the
 * corridor, the output of each SVC in service and the current of each series segment (or "bypassed"), and why a case has no
 * solution; a column with no value in any case is left out, and a note says so. Buses as rows: each bus's voltage in each case, a column per case.
 */
export function caseTableContent(table: Solutions, layout: CaseTableLayout = 'cases-as-rows'): CaseTableContent {
  const solved = table.cases.filter((solution) => solution.solved);
  const busNames = table.busNames ?? solved[0]?.buses.map((bus) => bus.name) ?? [];
  if (layout === 'buses-as-rows') {
    return {
      columns: [
        { key: 'bus', label: 'Bus' },
        ...table.cases.map((solution, index) => ({
          key: `case${index + 1}`,
          label: `${index + 1}. ${solution.label}`,
          unit: 'pu',
          digits: DIGITS_PU,
        })),
      ],
      rows: busNames.map((busName) => ({
        bus: busName,
        ...Object.fromEntries(
          table.cases.map((solution, index) => {
            const bus = solution.solved ? solution.buses.find((candidate) => candidate.name === busName) : undefined;
            return [`case${index + 1}`, bus ? bus.voltagePu : 'no solution'];
          }),
        ),
      })),
      notes: [],
    };
  }
  const segmentNames = [
    ...new Set(solved.flatMap((solution) => solution.sections.flatMap((section) => section.seriesCapacitors.map((segment) => segment.name)))),
  ];
  const svcNames = [...new Set(solved.flatMap((solution) => solution.svcs.map((svc) => svc.name)))];
  const lineCount = table.sectionNames?.length ?? solved[0]?.sections.length ?? 0;
  const columns: CaseTableColumn[] = [
    { key: 'number', label: 'No.' },
    { key: 'case', label: 'Case' },
    ...busNames.map((name, index) => ({ key: `bus${index}`, label: name, unit: 'pu', digits: DIGITS_PU })),
    { key: 'highest', label: lineCount === 1 ? 'Highest along the line' : 'Highest along the lines', unit: 'pu', digits: DIGITS_PU },
    { key: 'angle', label: 'Angle across', unit: 'deg', digits: 3 },
    ...svcNames.map((name, index) => ({ key: `svc${index}`, label: name, unit: 'Mvar', digits: 3 })),
    ...segmentNames.map((name, index) => ({ key: `segment${index}`, label: name, unit: 'A', digits: 4 })),
  ];
  const rows = table.cases.map((solution, index) => {
    const row: Record<string, string | number> = { number: String(index + 1), case: solution.label };
    if (!solution.solved) {
      for (const column of columns.slice(2)) row[column.key] = '-';
      row[columns[2]?.key ?? 'case'] = 'no solution';
      return row;
    }
    busNames.forEach((name, busIndex) => {
      const bus = solution.buses.find((candidate) => candidate.name === name);
      row[`bus${busIndex}`] = bus ? bus.voltagePu : '-';
    });
    row.highest = caseVoltageExtremes(solution).highestPu;
    const first = solution.buses[0]!;
    const last = solution.buses[solution.buses.length - 1]!;
    row.angle = solution.systems.sending.connected && solution.systems.receiving.connected ? Math.abs(first.angleDeg - last.angleDeg) : '-';
    svcNames.forEach((name, svcIndex) => {
      const svc = solution.svcs.find((candidate) => candidate.name === name);
      row[`svc${svcIndex}`] = svc?.inService ? svc.outputMvar : 'out';
    });
    segmentNames.forEach((name, segmentIndex) => {
      const segment = solution.sections.flatMap((section) => section.seriesCapacitors).find((candidate) => candidate.name === name);
      row[`segment${segmentIndex}`] = !segment ? '-' : segment.bypassed ? 'bypassed' : segment.currentA;
    });
    return row;
  });
  // The first column after the case carries "no solution" and stays; any other column that is "-" in every row says nothing.
  const empty = new Set(columns.slice(3).filter((column) => rows.every((row) => row[column.key] === '-')));
  const kept = columns.filter((column) => !empty.has(column));
  return {
    columns: kept,
    rows: rows.map((row) => Object.fromEntries(kept.map((column) => [column.key, row[column.key]!]))),
    notes: [...empty].map((column) => `The column "${column.label}" is left out: no case has a value for it.`),
  };
}

/** The reasons of the cases without a solution, numbered as in the table, for a note beneath it. */
export function unsolvedNotes(table: Solutions): string[] {
  return table.cases.flatMap((solution, index) =>
    solution.solved ? [] : [`Case ${index + 1} (${solution.label}) has no solution: ${solution.reason}`],
  );
}
