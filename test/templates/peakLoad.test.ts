// The peak-load template runs as it stands, and its headline figures agree with hand two-port arithmetic on its own inputs.
import { beforeAll, describe, expect, it } from 'vitest';
import {
  type Abcd,
  bisect,
  cascade,
  cx,
  deliveredMvar,
  distributedLine,
  noseMw,
  parallelIdentical,
  receivingVoltageKv,
  seriesZ,
  shuntFromRating,
  systemImpedance,
} from '../support/handAbcd.ts';
import { type TemplateRun, runTemplate } from '../support/templateRun.ts';

// The template's Fennick Cross system has X/R 12 (stated in its block beside the inputs).
const FENNICK_X_OVER_R = 12;

let run: TemplateRun;
let nominalKv: number;
let ratingKv: number;
let emfKv: number;
let pMw: number;
let qMvar: number;
let tanPhi: number;
let stepMvar: number;
let oneCircuit: Abcd;

beforeAll(async () => {
  run = await runTemplate('peak-load');
  nominalKv = run.input('nominalVoltage', 'kV');
  ratingKv = run.input('highestSystemVoltage', 'kV');
  emfKv = run.input('fennickEmf', '') * nominalKv;
  pMw = run.input('peakLoad', 'MW');
  tanPhi = Math.tan(Math.acos(run.input('peakPowerFactor', '')));
  qMvar = pMw * tanPhi;
  stepMvar = run.input('capacitorStep', '');
  const z = cx(run.input('seriesResistance', 'ohm/km'), run.input('seriesReactance', 'ohm/km'));
  const y = cx(0, run.input('shuntSusceptance', 'uS/km') * 1e-6);
  oneCircuit = distributedLine(z, y, run.input('lineLength', 'km'));
}, 240_000);

const source = () => seriesZ(systemImpedance(nominalKv, run.input('fennickShortCircuit', 'MVA'), FENNICK_X_OVER_R));
const bothCircuits = () => cascade(source(), parallelIdentical(oneCircuit));
const capacitors = (mvar: number, ratedKv = ratingKv) => shuntFromRating(mvar, ratedKv, 'capacitor');

describe('the peak-load template', () => {
  it('meets every criterion it states', () => {
    expect(run.product.results.criteria.every((entry) => entry.passed)).toBe(true);
    expect(run.product.results.criteria.length).toBeGreaterThanOrEqual(8);
  });

  it('gives the receiving voltage at the peak without support as the upper root of E Vr = |A Vr^2 + B (P - jQ)|', () => {
    expect(run.result('Lyrebay voltage at the winter peak without support')).toBeCloseTo(
      receivingVoltageKv(bothCircuits(), emfKv, pMw, qMvar) / nominalKv,
      6,
    );
  });

  it('gives the nose of the P-V curve without support where that quadratic has a double root', () => {
    expect(run.result('Nose of the P-V curve without support')).toBeCloseTo(noseMw(bothCircuits(), emfKv, tanPhi), 6);
  });

  it('sizes the capacitor bank that holds 1.0 pu at the peak, rated at the highest system voltage', () => {
    // With Vr held at nominal the bank only changes the Q the line must deliver: Q_bank = Q_load - Q_delivered(Vr).
    const bankAtNominalMvar = qMvar - deliveredMvar(bothCircuits(), emfKv, nominalKv, pMw);
    expect(run.result('Capacitor bank that holds Lyrebay at 1.0 pu at the peak')).toBeCloseTo(bankAtNominalMvar * (ratingKv / nominalKv) ** 2, 6);
    expect(run.result('Capacitor steps')).toBe(Math.ceil(run.result('Capacitor bank that holds Lyrebay at 1.0 pu at the peak') / stepMvar));
  });

  it('sizes the SVC for the peak with one circuit out: the support that holds 1.0 pu with the peak steps in', () => {
    const steps = run.result('Capacitor steps');
    const network = cascade(source(), oneCircuit, capacitors(steps * stepMvar));
    const needMvar = qMvar - deliveredMvar(network, emfKv, nominalKv, pMw);
    expect(run.result('SVC output the peak with one circuit out needs')).toBeCloseTo(needMvar, 6);
    expect(run.result('SVC capacitive rating')).toBeGreaterThanOrEqual(1.1 * needMvar);
  });

  it('puts Lyrebay at the peak hour on the SVC slope V = Vref - slope x I_capacitive, with the steps in', () => {
    const steps = run.result('Capacitor steps');
    const baseMva = run.result('SVC capacitive rating');
    const slope = run.input('svcSlope', '') / 100;
    const network = cascade(bothCircuits(), capacitors(steps * stepMvar));
    // The peak hour carries the peak load (the daily duty's largest share is 1.0).
    const svcMvar = (busPu: number) => qMvar - deliveredMvar(network, emfKv, busPu * nominalKv, pMw);
    const busPu = bisect((v) => v - 1 + (slope * svcMvar(v)) / baseMva / v, 0.9, 1.1);
    expect(run.result('Lyrebay voltage at the peak hour')).toBeCloseTo(busPu, 6);
    expect(run.result('SVC output at the peak hour')).toBeCloseTo(svcMvar(busPu), 4);
    expect(run.result('Lyrebay voltage at the peak, corridor model')).toBeCloseTo(busPu, 6);
  });

  it('holds Lyrebay on the SVC slope at the peak with one circuit out, in the corridor model', () => {
    const network = cascade(source(), oneCircuit, capacitors(run.result('Capacitor steps') * stepMvar));
    const slope = run.input('svcSlope', '') / 100;
    const svcMvar = (busPu: number) => qMvar - deliveredMvar(network, emfKv, busPu * nominalKv, pMw);
    const busPu = bisect((v) => v - 1 + (slope * svcMvar(v)) / run.result('SVC capacitive rating') / v, 0.9, 1.1);
    expect(run.result('Lyrebay voltage at the peak with one circuit out')).toBeCloseTo(busPu, 6);
  });

  it('gives the supported nose with the steps in and the SVC at its capacitive limit as a fixed capacitor', () => {
    const network = cascade(
      bothCircuits(),
      capacitors(run.result('Capacitor steps') * stepMvar),
      capacitors(run.result('SVC capacitive rating'), nominalKv),
    );
    expect(run.result('Nose of the P-V curve at the peak, supported')).toBeCloseTo(noseMw(network, emfKv, tanPhi), 6);
  });

  it('gives the Q-V margin at the peak as the depth below zero of the support curve Q_load - Q_delivered(V)', () => {
    const network = cascade(bothCircuits(), capacitors(run.result('Capacitor steps') * stepMvar));
    const support = (busKv: number) => qMvar - deliveredMvar(network, emfKv, busKv, pMw);
    // The curve is smooth with one minimum: a ternary search from a wide bracket.
    let low = 0.3 * nominalKv;
    let high = 1.2 * nominalKv;
    for (let step = 0; step < 200; step += 1) {
      const left = low + (high - low) / 3;
      const right = high - (high - low) / 3;
      if (support(left) < support(right)) high = right;
      else low = left;
    }
    expect(run.result('Q-V margin at the peak')).toBeCloseTo(-support((low + high) / 2), 4);
  });
});
