// The series-compensation template runs as it stands, and its headline figures agree with textbook formulas computed here from its inputs.
import { readFileSync } from 'node:fs';
import { resolve } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import type { RunProduct } from '../../src/pipeline.ts';
import { SERIES_CAPACITOR_CAUTIONS } from '../../src/report/cautions.ts';
import { runSource } from '../support/studies.ts';

const TEMPLATE = resolve(import.meta.dirname, '../../templates/series-compensation.study.md');
const source = readFileSync(TEMPLATE, 'utf8');
const deg = Math.PI / 180;

let asItStands: RunProduct;
let lossless: RunProduct;

beforeAll(async () => {
  [asItStands, lossless] = await Promise.all([
    runSource(source, { file: TEMPLATE }),
    // The same study on a line without resistance, where the exact lossless line formulas hold to rounding.
    runSource(source, { file: TEMPLATE, overrides: [{ name: 'seriesResistance', text: '0 ohm/km' }] }),
  ]);
}, 240_000);

function input(product: RunProduct, name: string, unit: string): number {
  const entry = product.results.inputs.find((candidate) => candidate.name === name);
  if (!entry) throw new Error(`the template has no input ${name}`);
  expect(entry.unit).toBe(unit);
  return entry.value;
}

function figure(product: RunProduct, name: string, note?: string): number {
  const entry = product.results.results.find((candidate) => candidate.name === name && (note === undefined || candidate.note?.startsWith(note)));
  if (!entry) throw new Error(`the template reports no result "${name}"${note ? ` noted "${note}"` : ''}`);
  if (typeof entry.value !== 'number') throw new Error(`the result "${name}" is not a number`);
  return entry.value;
}

function criterionValue(product: RunProduct, name: string): number {
  const entry = product.results.criteria.find((candidate) => candidate.name === name);
  if (!entry) throw new Error(`the template judges no criterion "${name}"`);
  return entry.value;
}

/** The line's data as the front matter gives it (per phase, at the system frequency). */
function lineOf(product: RunProduct) {
  const lengthKm = input(product, 'lineLength', 'km');
  const xOhmPerKm = input(product, 'seriesReactance', 'ohm/km');
  const bSPerKm = input(product, 'shuntSusceptance', 'uS/km') * 1e-6;
  return {
    lengthKm,
    xOhmPerKm,
    bSPerKm,
    reactanceOhm: xOhmPerKm * lengthKm,
    surgeImpedanceOhm: Math.sqrt(xOhmPerKm / bSPerKm),
    electricalLengthRad: lengthKm * Math.sqrt(xOhmPerKm * bSPerKm),
    voltageKv: input(product, 'nominalVoltage', 'kV'),
    targetMw: input(product, 'targetTransfer', 'MW'),
    angleRad: input(product, 'angleLimit', 'deg') * deg,
  };
}

describe('the series-compensation template', () => {
  it('runs to a report that meets its criteria and carries the series-capacitor cautions', () => {
    expect(asItStands.results.criteria.length).toBeGreaterThan(5);
    expect(asItStands.results.criteria.filter((entry) => !entry.passed)).toEqual([]);
    const texts = asItStands.results.cautions.map((entry) => entry.text);
    for (const caution of SERIES_CAPACITOR_CAUTIONS) expect(texts).toContain(caution.text);
    // Its four charts: the power-angle curves, the two placements' profiles, the cases' profiles and the frequency scan.
    const report = asItStands.report.head + asItStands.report.body;
    expect(report.match(/<svg/g)?.length ?? 0).toBeGreaterThanOrEqual(4);
  });

  it('marks every example value in its front matter as an example', () => {
    for (const entry of asItStands.results.inputs) expect(entry.description, entry.name).toMatch(/^Example: /);
  });

  // Glover, Sarma & Overbye, Power System Analysis and Design, ch. 5 (lossless line: A = cos(beta l), B = j Zc sin(beta l),
  // P = Vs Vr sin(delta) / (Zc sin(beta l)); from memory). A mid-line capacitor between two lossless half lines gives
  // B = j (Zc sin(theta) - Xc cos^2(theta / 2)), so the target at the angle limit needs Xc = (Zc sin(theta) - V^2 sin(delta) / P) / cos^2(theta / 2).
  it('finds on a lossless line the degree the exact lossless line formula gives for a mid-line bank', () => {
    const line = lineOf(lossless);
    const neededOhm = (line.voltageKv ** 2 * Math.sin(line.angleRad)) / line.targetMw;
    const capacitorOhm = (line.surgeImpedanceOhm * Math.sin(line.electricalLengthRad) - neededOhm) / Math.cos(line.electricalLengthRad / 2) ** 2;
    expect(figure(lossless, 'Bank reactance for the target (mid-line)')).toBeCloseTo(capacitorOhm, 6);
    expect(figure(lossless, 'Degree of series compensation for the target')).toBeCloseTo((100 * capacitorOhm) / line.reactanceOhm, 6);
  });

  it('gives on a lossless line the uncompensated transfer V^2 sin(delta) / (Zc sin(beta l)) and the bypassed transfer below it', () => {
    const line = lineOf(lossless);
    const uncompensatedMw = (line.voltageKv ** 2 * Math.sin(line.angleRad)) / (line.surgeImpedanceOhm * Math.sin(line.electricalLengthRad));
    expect(figure(lossless, 'Transfer at the angle limit without compensation')).toBeCloseTo(uncompensatedMw, 6);
    expect(figure(lossless, 'Transfer with the bank bypassed')).toBe(Math.floor(uncompensatedMw / 10) * 10);
  });

  // The same algebra with half the bank at each end of the lossless line: B = j (Zc sin(theta) - Xc cos(theta) - Xc^2 sin(theta) / (4 Zc)),
  // a quadratic in Xc. A mid-line bank offsets Xc cos^2(theta / 2) > Xc cos(theta), so the ends need more reactance for the same target.
  it('sizes the banks at both ends on a lossless line as the smallest whole ohm the exact formula allows, above the mid-line bank', () => {
    const line = lineOf(lossless);
    const neededOhm = (line.voltageKv ** 2 * Math.sin(line.angleRad)) / line.targetMw;
    const a = Math.sin(line.electricalLengthRad) / (4 * line.surgeImpedanceOhm);
    const b = Math.cos(line.electricalLengthRad);
    const c = neededOhm - line.surgeImpedanceOhm * Math.sin(line.electricalLengthRad);
    const bothEndsOhm = (-b + Math.sqrt(b * b - 4 * a * c)) / (2 * a);
    const templateBothEnds = figure(lossless, 'Bank reactance of the alternative', 'both ends');
    expect(templateBothEnds).toBeGreaterThanOrEqual(bothEndsOhm);
    expect(templateBothEnds - 1).toBeLessThan(bothEndsOhm);
    expect(figure(lossless, 'Bank reactance carried forward', 'mid-line')).toBeLessThan(templateBothEnds);
  });

  // The planning formula of Anderson & Farmer, Series Compensation of Power Systems (1996), ch. 1, and Kundur, Power System Stability
  // and Control (1994), P = V1 V2 sin(delta) / (X_line (1 - k)) (from memory): lumped and lossless, it is a planner's first estimate.
  it('needs, with the line resistance, more compensation than the lossless line and about the planning formula degree', () => {
    const line = lineOf(asItStands);
    const plannedPercent = 100 * (1 - (line.voltageKv ** 2 * Math.sin(line.angleRad)) / (line.targetMw * line.reactanceOhm));
    const degreePercent = figure(asItStands, 'Degree of series compensation for the target');
    expect(degreePercent).toBeGreaterThan(figure(lossless, 'Degree of series compensation for the target'));
    // Within one percentage point: the accuracy a planner expects of the lumped formula on a line of a few hundred km (common practice).
    expect(Math.abs(degreePercent - plannedPercent)).toBeLessThan(1);
  });

  // The capacitor's rated voltage is I_rated Xc (rms, per phase) and the varistor's protective level k sqrt(2) I_rated Xc (peak):
  // Anderson & Farmer (1996), ch. on capacitor ratings and protection; IEC 60143-1 states the protective level as a peak (from memory).
  it('rates the capacitor voltage as I Xc rms and the protective level as k times its peak', () => {
    const ratedA = figure(asItStands, 'Rated current the cases require');
    const reactanceOhm = figure(asItStands, 'Bank reactance carried forward');
    const capacitorKvRms = figure(asItStands, 'Capacitor voltage at rated current (rms, per phase)');
    expect(capacitorKvRms).toBeCloseTo((ratedA * reactanceOhm) / 1e3, 9);
    const protectiveKvPeak = figure(asItStands, 'Varistor protective level (peak, per phase)');
    expect(protectiveKvPeak / (Math.SQRT2 * capacitorKvRms)).toBeCloseTo(input(asItStands, 'protectiveLevel', 'pu'), 12);
    expect(criterionValue(asItStands, 'Offered bank rating covers the required rating')).toBeGreaterThanOrEqual(ratedA);
  });

  it('rates the bank for the swing current over the swing capability when the swing governs, in 100 A steps', () => {
    const swingA = input(asItStands, 'swingCurrent', 'A') / input(asItStands, 'swingCapability', 'pu');
    expect(asItStands.results.results.find((entry) => entry.name === 'Rated current the cases require')?.note).toContain('swing duty');
    expect(figure(asItStands, 'Rated current the cases require')).toBe(Math.ceil(swingA / 100) * 100);
  });

  // Kundur (1994), ch. 15: the series resonance of a compensated radial path f_er = f0 sqrt(Xc / X) appears on the rotor at f0 - f_er
  // (from memory). X is the generator's subtransient and transformer reactance, the line and the receiving system (X/R 12 in the template).
  it('screens the resonance with f0 sqrt(Xc / X) and its complement clears every torsional mode by the margin', () => {
    const line = lineOf(asItStands);
    const f0 = input(asItStands, 'frequency', 'Hz');
    const unitOhm = line.voltageKv ** 2 / input(asItStands, 'unitRating', 'MVA');
    const systemOhm = (line.voltageKv ** 2 / input(asItStands, 'quellmoorShortCircuit', 'MVA')) * Math.sin(Math.atan(12));
    const totalOhm =
      (input(asItStands, 'unitSubtransient', 'pu') + input(asItStands, 'unitTransformer', 'pu')) * unitOhm + line.reactanceOhm + systemOhm;
    const capacitorOhm = figure(asItStands, 'Bank reactance carried forward');
    const resonanceHz = f0 * Math.sqrt(capacitorOhm / totalOhm);
    expect(figure(asItStands, 'Hand check f0 sqrt(Xc/X)')).toBeCloseTo(resonanceHz, 9);
    const modesHz = [1, 2, 3, 4].map((index) => input(asItStands, `torsionalMode${index}`, 'Hz'));
    const separationHz = Math.min(...modesHz.map((mode) => Math.abs(mode - (f0 - resonanceHz))));
    expect(separationHz).toBeGreaterThanOrEqual(input(asItStands, 'modeMargin', 'Hz'));
    expect(criterionValue(asItStands, 'Separation of resonance complements from the torsional modes')).toBeGreaterThanOrEqual(
      input(asItStands, 'modeMargin', 'Hz'),
    );
  });

  // The scan's driving-point reactance crosses zero where a lossless chain of nominal pi sections does: each half line as a nominal pi
  // (Glover, Sarma & Overbye ch. 5; its error is of order (beta l)^2 / 12 at the resonance, below 0.1 % here), charging included.
  it('finds the resonance of the scan where a lossless nominal-pi chain built here has zero reactance', () => {
    const line = lineOf(asItStands);
    const f0 = input(asItStands, 'frequency', 'Hz');
    const unitOhm = line.voltageKv ** 2 / input(asItStands, 'unitRating', 'MVA');
    const machineOhm = (input(asItStands, 'unitSubtransient', 'pu') + input(asItStands, 'unitTransformer', 'pu')) * unitOhm;
    const systemOhm = (line.voltageKv ** 2 / input(asItStands, 'quellmoorShortCircuit', 'MVA')) * Math.sin(Math.atan(12));
    const capacitorOhm = figure(asItStands, 'Bank reactance carried forward');
    const halfSeriesOhm = (line.xOhmPerKm * line.lengthKm) / 2;
    const quarterShuntS = (line.bSPerKm * line.lengthKm) / 4;
    // Reactances only: a shunt susceptance B across a reactance X gives X / (1 - B X).
    const drivingPointOhm = (frequencyHz: number) => {
      const r = frequencyHz / f0;
      const shunt = (x: number, susceptanceS: number) => x / (1 - susceptanceS * r * x);
      let x = shunt(systemOhm * r, quarterShuntS);
      x = shunt(x + halfSeriesOhm * r, quarterShuntS);
      x = shunt(x - capacitorOhm / r, quarterShuntS);
      x = shunt(x + halfSeriesOhm * r, quarterShuntS);
      return x + machineOhm * r;
    };
    let low = 1;
    while (drivingPointOhm(low + 0.01) < 0) low += 0.01;
    let high = low + 0.01;
    for (let step = 0; step < 60; step += 1) {
      const middle = (low + high) / 2;
      if (drivingPointOhm(middle) < 0) low = middle;
      else high = middle;
    }
    const scanHz = figure(asItStands, 'Electrical resonance from the scan', 'mid-line');
    expect(Math.abs(scanHz - low) / low).toBeLessThan(0.005);
    expect(figure(asItStands, 'Its complement f0 - f_er')).toBeCloseTo(f0 - scanHz, 9);
  });
});
