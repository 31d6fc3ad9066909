// Benchmark: a 10,000-point voltage profile along a compensated line, solver versus the same arithmetic in a plain Float64Array loop.
import { pathToFileURL } from 'node:url';
import * as solver from '../src/solver/index.ts';

const POINT_COUNT = 10_000;
const REPETITIONS = 41;

const perKm = { frequencyHz: 50, seriesResistanceOhmPerKm: 0.028, seriesReactanceOhmPerKm: 0.32, shuntSusceptanceUsPerKm: 3.6 };
const halfLengthKm = 200;

function buildNetwork() {
  const line = solver.lineModel({ ...perKm, lengthKm: 2 * halfLengthKm, label: 'Kestrel Ridge - Varnmouth 400 kV' });
  const half = (label: string) => solver.lineModel({ ...perKm, lengthKm: halfLengthKm, label });
  const reactor = (label: string) => solver.shuntReactor({ qMvar: 150, ratedVoltageKv: 400, label });
  return solver.cascade({
    label: 'compensated route',
    elements: [
      reactor('sending reactor'),
      half('first half'),
      solver.seriesCapacitor({ degreeOfCompensation: 0.4, compensatedLine: line, label: 'series capacitor' }),
      half('second half'),
      reactor('receiving reactor'),
    ],
  });
}

/** The profile arithmetic written out by hand on typed arrays: V(d) = cosh(gd) V0 - Zc sinh(gd) I0, I(d) = -sinh(gd)/Zc V0 + cosh(gd) I0. */
function plainProfile(
  network: solver.CascadeTwoPort,
  sendingVoltage: { re: number; im: number },
  sendingCurrent: { re: number; im: number },
): { positionKm: Float64Array; voltageV: Float64Array; voltageAngleDeg: Float64Array; currentA: Float64Array } {
  const routeKm = network.elements.reduce((sum, element) => sum + (element.kind === 'line-section' ? element.lengthKm : 0), 0);
  const stepKm = routeKm / (POINT_COUNT - 1);
  const capacity = POINT_COUNT + 2 * network.elements.length;
  const positionKm = new Float64Array(capacity);
  const voltageV = new Float64Array(capacity);
  const voltageAngleDeg = new Float64Array(capacity);
  const currentA = new Float64Array(capacity);
  let count = 0;
  const store = (atKm: number, voltageRe: number, voltageIm: number, currentRe: number, currentIm: number) => {
    positionKm[count] = atKm;
    voltageV[count] = Math.sqrt(voltageRe * voltageRe + voltageIm * voltageIm);
    voltageAngleDeg[count] = (Math.atan2(voltageIm, voltageRe) * 180) / Math.PI;
    currentA[count] = Math.sqrt(currentRe * currentRe + currentIm * currentIm);
    count += 1;
  };
  let vRe = sendingVoltage.re;
  let vIm = sendingVoltage.im;
  let iRe = sendingCurrent.re;
  let iIm = sendingCurrent.im;
  let startKm = 0;
  store(0, vRe, vIm, iRe, iIm);
  for (const element of network.elements) {
    if (element.kind === 'line-section') {
      const zRe = element.perKm.seriesResistanceOhmPerKm;
      const zIm = element.perKm.seriesReactanceOhmPerKm;
      const yRe = element.perKm.shuntConductanceUsPerKm * 1e-6;
      const yIm = element.perKm.shuntSusceptanceUsPerKm * 1e-6;
      // gamma = sqrt(z y), Zc = sqrt(z / y), principal square roots.
      const zyRe = zRe * yRe - zIm * yIm;
      const zyIm = zRe * yIm + zIm * yRe;
      const zyMod = Math.hypot(zyRe, zyIm);
      const gRe = Math.sqrt((zyMod + zyRe) / 2);
      const gIm = Math.sign(zyIm) * Math.sqrt((zyMod - zyRe) / 2);
      const yMod2 = yRe * yRe + yIm * yIm;
      const qRe = (zRe * yRe + zIm * yIm) / yMod2;
      const qIm = (zIm * yRe - zRe * yIm) / yMod2;
      const qMod = Math.hypot(qRe, qIm);
      const zcRe = Math.sqrt((qMod + qRe) / 2);
      const zcIm = Math.sign(qIm) * Math.sqrt((qMod - qRe) / 2);
      const zcMod2 = zcRe * zcRe + zcIm * zcIm;
      const first = Math.floor(startKm / stepKm + 1e-9) + 1;
      let nextVRe = vRe;
      let nextVIm = vIm;
      let nextIRe = iRe;
      let nextIIm = iIm;
      for (let index = first; ; index += 1) {
        const atEnd = index * stepKm >= startKm + element.lengthKm - 1e-9 * stepKm;
        const distance = atEnd ? element.lengthKm : index * stepKm - startKm;
        const aRe = gRe * distance;
        const aIm = gIm * distance;
        const ePlus = Math.exp(aRe);
        const eMinus = 1 / ePlus;
        const cos = Math.cos(aIm);
        const sin = Math.sin(aIm);
        const coshRe = ((ePlus + eMinus) / 2) * cos;
        const coshIm = ((ePlus - eMinus) / 2) * sin;
        const sinhRe = ((ePlus - eMinus) / 2) * cos;
        const sinhIm = ((ePlus + eMinus) / 2) * sin;
        const bRe = zcRe * sinhRe - zcIm * sinhIm;
        const bIm = zcRe * sinhIm + zcIm * sinhRe;
        const cRe = (sinhRe * zcRe + sinhIm * zcIm) / zcMod2;
        const cIm = (sinhIm * zcRe - sinhRe * zcIm) / zcMod2;
        nextVRe = coshRe * vRe - coshIm * vIm - (bRe * iRe - bIm * iIm);
        nextVIm = coshRe * vIm + coshIm * vRe - (bRe * iIm + bIm * iRe);
        nextIRe = coshRe * iRe - coshIm * iIm - (cRe * vRe - cIm * vIm);
        nextIIm = coshRe * iIm + coshIm * iRe - (cRe * vIm + cIm * vRe);
        store(startKm + distance, nextVRe, nextVIm, nextIRe, nextIIm);
        if (atEnd) break;
      }
      vRe = nextVRe;
      vIm = nextVIm;
      iRe = nextIRe;
      iIm = nextIIm;
      startKm += element.lengthKm;
    } else {
      const { B, C } = element;
      const nextVRe = vRe - (B.re * iRe - B.im * iIm);
      const nextVIm = vIm - (B.re * iIm + B.im * iRe);
      iRe -= C.re * vRe - C.im * vIm;
      iIm -= C.re * vIm + C.im * vRe;
      vRe = nextVRe;
      vIm = nextVIm;
      store(startKm, vRe, vIm, iRe, iIm);
    }
  }
  return {
    positionKm: positionKm.subarray(0, count),
    voltageV: voltageV.subarray(0, count),
    voltageAngleDeg: voltageAngleDeg.subarray(0, count),
    currentA: currentA.subarray(0, count),
  };
}

function median(values: number[]): number {
  const sorted = [...values].sort((a, b) => a - b);
  return sorted[Math.floor(sorted.length / 2)] ?? Number.NaN;
}

export async function runProfileBench(): Promise<{ solverMs: number; plainMs: number; ratio: number }> {
  const network = buildNetwork();
  const operatingPoint = solver.solveReceivingLoad({
    network,
    receivingVoltageKv: 400,
    load: { pMw: 900, powerFactor: 0.95, powerFactorSense: 'lagging' },
  });
  const solverTimes: number[] = [];
  const plainTimes: number[] = [];
  let solverPeak = 0;
  let plainPeak = 0;
  for (let repetition = 0; repetition < REPETITIONS; repetition += 1) {
    let start = performance.now();
    const profile = solver.voltageProfile({ network, operatingPoint, pointCount: POINT_COUNT });
    solverTimes.push(performance.now() - start);
    solverPeak = profile.maximum.voltageKv;
    start = performance.now();
    const plain = plainProfile(network, operatingPoint.sendingEnd.phaseVoltageV, operatingPoint.sendingEnd.lineCurrentA);
    plainTimes.push(performance.now() - start);
    plainPeak = (plain.voltageV.reduce((peak, value) => Math.max(peak, value), 0) * Math.sqrt(3)) / 1e3;
  }
  if (Math.abs(solverPeak - plainPeak) > 1e-6 * solverPeak) {
    throw new Error(`profile mismatch: solver peak ${solverPeak} kV, plain loop peak ${plainPeak} kV`);
  }
  const solverMs = median(solverTimes);
  const plainMs = median(plainTimes);
  return { solverMs, plainMs, ratio: solverMs / plainMs };
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  const { solverMs, plainMs, ratio } = await runProfileBench();
  console.log(`voltage profile, ${POINT_COUNT} points, median of ${REPETITIONS} runs`);
  console.log(`  solver:           ${solverMs.toFixed(2)} ms`);
  console.log(`  plain Float64Array loop: ${plainMs.toFixed(2)} ms`);
  console.log(`  ratio solver / plain: ${ratio.toFixed(2)}`);
}
