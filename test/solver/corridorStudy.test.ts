import { describe, expect, test } from 'vitest';
import { runSource, studyText } from '../support/studies.ts';
import { solveCorridorCases } from '../../src/solver/index.ts';

const corridorCode = [
  'const perKm = { seriesResistanceOhmPerKm: 0.028, seriesReactanceOhmPerKm: 0.32, shuntSusceptanceUsPerKm: 3.6 };',
  'const corridor = {',
  '  frequencyHz: 50, nominalVoltageKv: 400,',
  '  sendingSystem: { shortCircuitMva: 15000, xOverR: 15, emfKv: 410 },',
  '  receivingSystem: { shortCircuitMva: 8000, xOverR: 12, emfKv: 400 },',
  "  buses: [{ name: 'Kestrel Ridge' }, { name: 'Varnmouth', reactors: [{ name: 'VM-R1', qMvar: 100, ratedVoltageKv: 420 }] }],",
  "  sections: [{ from: 'Kestrel Ridge', to: 'Varnmouth', lengthKm: 320, ...perKm }],",
  '};',
  'const cases = [',
  "  { label: 'energise', loading: { kind: 'energisation' as const, closedEnd: 'sending' as const } },",
  "  { label: 'impossible', loading: { kind: 'receiving-load' as const, pMw: 20000, qMvar: 0 } },",
  '];',
].join('\n');

describe('the corridor case solver in a study block', () => {
  // The block API exposes every lowercase solver export; this shows the case table type-checks, survives the sandbox boundary and
  // reaches the results as the same figure the solver gives directly.
  test('runs a case table through the sandbox and records the open-end voltage it gives directly', async () => {
    const source = studyText({
      body: [
        '# Cases',
        '',
        '```ts',
        corridorCode,
        'const operatingCases = solver.solveCorridorCases({ corridor, cases });',
        'const first = operatingCases.cases[0];',
        "const openEndKv = result('Open-end voltage', first && first.solved && first.energisation ? first.energisation.openEndVoltageKv : 0, { unit: 'kV', digits: 6 });",
        "result('Unsolved cases', operatingCases.cases.filter((entry) => !entry.solved).length, { unit: '', digits: 1 });",
        '```',
        '',
        'The open end sits at {{ openEndKv }}.',
        '',
      ].join('\n'),
    });
    const product = await runSource(source, { typecheck: true });
    const direct = new Function('solver', `${corridorCode.replace(/ as const/g, '')}; return solver({ corridor, cases });`)(solveCorridorCases);
    const openEnd = product.results.results.find((entry) => entry.name === 'Open-end voltage');
    expect(openEnd?.value).toBeCloseTo(direct.cases[0].energisation.openEndVoltageKv, 9);
    expect(product.results.results.find((entry) => entry.name === 'Unsolved cases')?.value).toBe(1);
    expect(product.results.solverCalls).toBe(1);
  }, 60_000);
});
