import { describe, expect, it } from 'vitest';
import { RECLOSING_CAUTIONS, SERIES_CAPACITOR_CAUTIONS } from '../../src/report/cautions.ts';
import { runSource, studyText } from '../support/studies.ts';

const fence = (code: string) => `\`\`\`ts\n${code}\n\`\`\`\n`;
const cautionTexts = async (code: string) => (await runSource(studyText({ body: fence(code) }))).results.cautions.map((caution) => caution.text);
const perKm = 'const perKm = { frequencyHz: 50, seriesResistanceOhmPerKm: 0.016, seriesReactanceOhmPerKm: 0.27, shuntSusceptanceUsPerKm: 4.1 };';

describe('the cautions a study earns by what it computes', () => {
  it('adds the series-capacitor cautions to a study that uses a series bank', async () => {
    const texts = await cautionTexts('const bank = solver.seriesCapacitor({ reactanceOhm: 30 });');
    for (const caution of SERIES_CAPACITOR_CAUTIONS) expect(texts).toContain(caution.text);
    for (const caution of RECLOSING_CAUTIONS) expect(texts).not.toContain(caution.text);
  });

  it('adds them for a corridor with series segments too', async () => {
    const texts = await cautionTexts(
      `${perKm}\nconst { frequencyHz, ...line } = perKm;\nconst operatingCases = solver.solveCorridorCases({ corridor: { frequencyHz, nominalVoltageKv: 400,
  sendingSystem: { shortCircuitMva: 15000, xOverR: 15, emfKv: 400 }, receivingSystem: { shortCircuitMva: 6000, xOverR: 12, emfKv: 400 },
  buses: [{ name: 'A' }, { name: 'B' }],
  sections: [{ from: 'A', to: 'B', lengthKm: 300, ...line, seriesCapacitors: [{ name: 'S', position: 'mid-section', reactanceOhm: 30, ratedCurrentA: 2000 }] }] },
  cases: [{ label: 'transfer', loading: { kind: 'transfer', pMw: 500 } }] });`,
    );
    for (const caution of SERIES_CAPACITOR_CAUTIONS) expect(texts).toContain(caution.text);
  });

  it('adds the reclosing cautions to a study that sizes a neutral reactor', async () => {
    const texts = await cautionTexts(
      'const reclosing = solver.neutralReactorDesign({ frequencyHz: 50, voltageKv: 420, lengthKm: 380, shuntCompensationDegree: 0.7, positiveSequenceCapacitanceNfPerKm: 12.5, zeroSequenceCapacitanceNfPerKm: 8.2, reactorBankCount: 2 });',
    );
    for (const caution of RECLOSING_CAUTIONS) expect(texts).toContain(caution.text);
    for (const caution of SERIES_CAPACITOR_CAUTIONS) expect(texts).not.toContain(caution.text);
  });

  it('adds neither to a study of an uncompensated line, nor for a corridor whose sections carry no segment', async () => {
    const texts =
      await cautionTexts(`${perKm}\nconst line = solver.lineModel({ ...perKm, lengthKm: 300 });\nconst { frequencyHz, ...constants } = perKm;
const one = solver.solveCorridorCase({ corridor: { frequencyHz, nominalVoltageKv: 400, sendingSystem: { shortCircuitMva: 15000, xOverR: 15, emfKv: 400 },
  receivingSystem: { shortCircuitMva: 6000, xOverR: 12, emfKv: 400 }, buses: [{ name: 'A' }, { name: 'B' }],
  sections: [{ from: 'A', to: 'B', lengthKm: 300, ...constants, seriesCapacitors: [] }] }, case: { label: 'x', loading: { kind: 'transfer', pMw: 100 } } });`);
    for (const caution of [...SERIES_CAPACITOR_CAUTIONS, ...RECLOSING_CAUTIONS]) expect(texts).not.toContain(caution.text);
  });
});
