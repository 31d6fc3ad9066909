import { describe, expect, it } from 'vitest';
import { caseTableContent } from '../../src/blocks/caseTable.ts';
import { solveCorridorCases, type CorridorInput } from '../../src/solver/index.ts';
import { runSource, studyText } from '../support/studies.ts';

const perKm = { seriesResistanceOhmPerKm: 0.028, seriesReactanceOhmPerKm: 0.32, shuntSusceptanceUsPerKm: 3.6 };
const corridor: CorridorInput = {
  frequencyHz: 50,
  nominalVoltageKv: 400,
  sendingSystem: { shortCircuitMva: 12000, xOverR: 12, emfKv: 405 },
  receivingSystem: { shortCircuitMva: 8000, xOverR: 12, emfKv: 400 },
  buses: [
    { name: 'Upper Lode' },
    { name: 'Sallow', svc: { name: 'SV', capacitiveMvar: 200, inductiveMvar: 100, slopePercent: 3, referenceVoltageKv: 400 } },
  ],
  sections: [
    {
      from: 'Upper Lode',
      to: 'Sallow',
      lengthKm: 300,
      ...perKm,
      seriesCapacitors: [{ name: 'S1', position: 'mid-section', reactanceOhm: 25, ratedCurrentA: 2000 }],
    },
  ],
};
const cases = [
  { label: 'transfer', loading: { kind: 'transfer' as const, pMw: 600 } },
  { label: 'bypassed, SVC out', loading: { kind: 'transfer' as const, pMw: 400 }, bypassed: ['S1'], unitsOut: ['SV'] },
  { label: 'beyond the nose', loading: { kind: 'transfer' as const, pMw: 40000 } },
];
const table = solveCorridorCases({ corridor, cases });

describe('the case table', () => {
  it('gives each case a numbered row with its bus voltages, angle, SVC output and segment current', () => {
    const { rows, columns } = caseTableContent(table);
    expect(columns.map((column) => column.label)).toEqual([
      'No.',
      'Case',
      'Upper Lode',
      'Sallow',
      'Highest along the line',
      'Angle across',
      'SV',
      'S1',
    ]);
    const first = table.cases[0]!;
    if (!first.solved) throw new Error('unsolved');
    expect(rows[0]).toMatchObject({
      number: '1',
      case: 'transfer',
      bus1: first.buses[1]!.voltagePu,
      segment0: first.sections[0]!.seriesCapacitors[0]!.currentA,
    });
    expect(rows[0]!.angle).toBeCloseTo(Math.abs(first.buses[0]!.angleDeg - first.buses[1]!.angleDeg), 12);
    expect(rows[1]).toMatchObject({ svc0: 'out', segment0: 'bypassed' });
  });

  it('says "along the lines" when the corridor has several lines', () => {
    const twoLines: CorridorInput = {
      ...corridor,
      buses: [{ name: 'Upper Lode' }, { name: 'Mere' }, { name: 'Sallow' }],
      sections: [
        { from: 'Upper Lode', to: 'Mere', lengthKm: 150, ...perKm },
        { from: 'Mere', to: 'Sallow', lengthKm: 150, ...perKm },
      ],
    };
    const { columns } = caseTableContent(solveCorridorCases({ corridor: twoLines, cases: [cases[0]!] }));
    expect(columns.map((column) => column.label)).toContain('Highest along the lines');
  });

  it('leaves out a column with no value in any case and says so in a note', () => {
    const energisations = solveCorridorCases({
      corridor,
      cases: [
        { label: 'energised from Upper Lode', loading: { kind: 'energisation', closedEnd: 'sending' } },
        { label: 'energised from Sallow', loading: { kind: 'energisation', closedEnd: 'receiving' } },
      ],
    });
    const { columns, notes } = caseTableContent(energisations);
    expect(columns.map((column) => column.key)).not.toContain('angle');
    expect(notes).toEqual(['The column "Angle across" is left out: no case has a value for it.']);
  });

  it('keeps a row for a case without a solution', () => {
    const { rows } = caseTableContent(table);
    expect(rows[2]).toMatchObject({ number: '3', case: 'beyond the nose', bus0: 'no solution' });
  });

  it('can put the buses in rows and the cases in columns', () => {
    const { rows, columns } = caseTableContent(table, 'buses-as-rows');
    expect(columns.map((column) => column.label)).toEqual(['Bus', '1. transfer', '2. bypassed, SVC out', '3. beyond the nose']);
    expect(rows.map((row) => row.bus)).toEqual(['Upper Lode', 'Sallow']);
    expect(rows[1]!.case3).toBe('no solution');
  });

  it('is one call in a block, and the report shows the table with the reason of an unsolved case beneath it', async () => {
    const body = `\`\`\`ts
const corridor = ${JSON.stringify(corridor).replace('"mid-section"', '"mid-section" as const')};
caseTable(solver.solveCorridorCases({ corridor, cases: ${JSON.stringify(cases).replaceAll('"transfer"', '"transfer" as const')} }), { caption: 'Operating cases' });
\`\`\``;
    const product = await runSource(studyText({ body }), { typecheck: true });
    expect(product.report.body).toContain('Operating cases');
    expect(product.report.body).toContain('Case 3 (beyond the nose) has no solution');
    expect(product.report.body).toContain('bypassed');
  });
});
