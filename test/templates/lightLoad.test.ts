// The light-load template runs as it stands, and its headline figures agree with hand two-port arithmetic on its own inputs.
import { beforeAll, describe, expect, it } from 'vitest';
import {
  type Abcd,
  abs,
  bisect,
  cascade,
  cx,
  distributedLine,
  seriesZ,
  shuntFromRating,
  shuntY,
  steadyStateLimitMw,
  systemImpedance,
} from '../support/handAbcd.ts';
import { type TemplateRun, runTemplate } from '../support/templateRun.ts';

// The template's corridor states these beside its inputs: the Brennock EMF at 1.01 pu with X/R 15, Solvay Point at 1.0 pu with X/R 10.
const BRENNOCK_EMF_PU = 1.01;
const BRENNOCK_X_OVER_R = 15;
const SOLVAY_X_OVER_R = 10;

let run: TemplateRun;
let nominalKv: number;
let ratingKv: number;
let line: Abcd;
let lengthKm: number;
let omega: number;

beforeAll(async () => {
  run = await runTemplate('light-load');
  nominalKv = run.input('nominalVoltage', 'kV');
  ratingKv = run.input('highestSystemVoltage', 'kV');
  lengthKm = run.input('lineLength', 'km');
  omega = 2 * Math.PI * run.input('frequency', 'Hz');
  const z = cx(run.input('seriesResistance', 'ohm/km'), run.input('seriesReactance', 'ohm/km'));
  const y = cx(0, omega * run.input('positiveSequenceCapacitance', 'nF/km') * 1e-9);
  line = distributedLine(z, y, lengthKm);
}, 240_000);

const brennock = () => seriesZ(systemImpedance(nominalKv, run.input('brennockShortCircuit', 'MVA'), BRENNOCK_X_OVER_R));
const solvay = () => seriesZ(systemImpedance(nominalKv, run.input('solvayShortCircuit', 'MVA'), SOLVAY_X_OVER_R));
const reactors = (bus: string) => shuntFromRating(run.result(`Shunt reactors at ${bus}`), ratingKv, 'reactor');
/** Open-end voltage in pu: Vr = E / |A| of the chain from the EMF to the open end. */
const openEndPu = (chain: Abcd, emfKv: number) => emfKv / abs(chain.A) / nominalKv;

describe('the light-load template', () => {
  it('writes a count of reactors times their rating with the multiplication sign', () => {
    const body = run.product.report.body;
    expect(body).toMatch(/\d × \d/);
    expect(body).not.toMatch(/\d x \d/);
  });

  it('meets every criterion it states', () => {
    expect(run.product.results.criteria.every((entry) => entry.passed)).toBe(true);
    expect(run.product.results.criteria.length).toBeGreaterThanOrEqual(5);
  });

  it('gives the Ferranti rise of the line alone as 1 / |cosh(γl)|', () => {
    expect(run.result('Open-end voltage of the line alone, sending bus at nominal')).toBeCloseTo(1 / abs(line.A), 9);
  });

  it('gives the open-end voltage on energisation from either end through the system impedance, E / |A + Zs C|', () => {
    const fromBrennock = openEndPu(cascade(brennock(), line), BRENNOCK_EMF_PU * nominalKv);
    const fromSolvay = openEndPu(cascade(solvay(), line), nominalKv);
    expect(run.result('Open-end voltage at Solvay Point, energised from Brennock, no reactors')).toBeCloseTo(fromBrennock, 6);
    expect(run.result('Open-end voltage at Brennock, energised from Solvay Point, no reactors')).toBeCloseTo(fromSolvay, 6);
  });

  it('rates the reactor that holds the open end at nominal at the highest system voltage: Q = B V_rated^2', () => {
    // |A + B (-j b)| = 1 with the sending bus held: b by bisection, then the nameplate at the rated voltage.
    const gap = (susceptanceS: number) => abs(cascade(line, shuntY(cx(0, -susceptanceS))).A) - 1;
    const susceptanceS = bisect(gap, 0, 0.01);
    expect(run.result('Reactor that holds the open end at nominal (line alone)')).toBeCloseTo(susceptanceS * ratingKv ** 2, 6);
    // Rated at nominal voltage (the old template's defect) the nameplate would read (400/420)^2 = 9 % lower.
    expect(susceptanceS * nominalKv ** 2).toBeLessThan(0.95 * run.result('Reactor that holds the open end at nominal (line alone)'));
  });

  it('gives the open-end voltages with the chosen standard reactors, each of susceptance Q_rated / V_rated^2', () => {
    const withReactors = (system: Abcd, emfKv: number, closedEnd: 'Brennock' | 'Solvay Point') => {
      const [near, far] = closedEnd === 'Brennock' ? ['Brennock', 'Solvay Point'] : ['Solvay Point', 'Brennock'];
      return openEndPu(cascade(system, reactors(near!), line, reactors(far!)), emfKv);
    };
    expect(run.result('Open-end voltage at Solvay Point with the reactors, energised from Brennock')).toBeCloseTo(
      withReactors(brennock(), BRENNOCK_EMF_PU * nominalKv, 'Brennock'),
      6,
    );
    expect(run.result('Open-end voltage at Brennock with the reactors, energised from Solvay Point')).toBeCloseTo(
      withReactors(solvay(), nominalKv, 'Solvay Point'),
      6,
    );
    expect(run.result('Shunt reactors in total')).toBe(run.result('Shunt reactors at Brennock') + run.result('Shunt reactors at Solvay Point'));
  });

  it('gives the steady-state limit between the EMFs with the reactors out and left in, and the loss between them', () => {
    const emfs = [BRENNOCK_EMF_PU * nominalKv, nominalKv] as const;
    const out = steadyStateLimitMw(cascade(brennock(), line, solvay()), ...emfs);
    const inService = steadyStateLimitMw(cascade(brennock(), reactors('Brennock'), line, reactors('Solvay Point'), solvay()), ...emfs);
    expect(run.result('Steady-state limit between the EMFs, reactors out')).toBeCloseTo(out, 6);
    expect(run.result('Steady-state limit between the EMFs, reactors left in')).toBeCloseTo(inService, 6);
    expect(run.result('Loadability lost with the reactors left in')).toBeCloseTo(out - inService, 6);
    expect(out - inService).toBeGreaterThan(0);
  });

  it("sizes the neutral reactor by Kimbark's Xn = Xp^2 / (X12 - 3 Xp) for full cancellation, shared by the banks", () => {
    // Kimbark, IEEE Trans. PAS-83 (1964), from memory. Xp: the phase reactors of all banks together, at the rated voltage;
    // X12: the interphase capacitance (C1 - C0) / 3 of the whole line.
    const totalMvar = run.result('Shunt reactors in total');
    const phaseOhm = ratingKv ** 2 / totalMvar;
    const c1 = run.input('positiveSequenceCapacitance', 'nF/km') * 1e-9;
    const c0 = run.input('zeroSequenceCapacitance', 'nF/km') * 1e-9;
    const interphaseOhm = 1 / (omega * ((c1 - c0) / 3) * lengthKm);
    const neutralOhm = phaseOhm ** 2 / (interphaseOhm - 3 * phaseOhm);
    const banks = ['Brennock', 'Solvay Point'].filter((bus) => run.result(`Shunt reactors at ${bus}`) > 0).length;
    expect(run.result('Neutral reactor per bank')).toBeCloseTo(banks * neutralOhm, 6);
  });
});
