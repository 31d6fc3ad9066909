// Hand arithmetic for checking templates: complex numbers and ABCD two-ports written out here, independent of src/solver.
//
// Formulae (three-phase powers, line-to-line voltages, per-phase impedances):
// - Distributed line: A = D = cosh(γl), B = Zc sinh(γl), C = sinh(γl) / Zc with γ = sqrt(z y), Zc = sqrt(z / y)
//   (Glover, Sarma & Overbye, Power System Analysis and Design, 5th ed., §5.2; Grainger & Stevenson, Power System
//   Analysis, ch. 6; from memory).
// - Series impedance [1 Z; 0 1], shunt admittance [1 0; Y 1], cascade = matrix product, identical parallel circuits
//   [A B/2; 2C D] (same chapters; from memory).

export interface Cx {
  re: number;
  im: number;
}

export const cx = (re: number, im = 0): Cx => ({ re, im });
export const add = (a: Cx, b: Cx): Cx => cx(a.re + b.re, a.im + b.im);
export const sub = (a: Cx, b: Cx): Cx => cx(a.re - b.re, a.im - b.im);
export const mul = (a: Cx, b: Cx): Cx => cx(a.re * b.re - a.im * b.im, a.re * b.im + a.im * b.re);
export const scale = (a: Cx, k: number): Cx => cx(a.re * k, a.im * k);
export const conj = (a: Cx): Cx => cx(a.re, -a.im);
export const abs = (a: Cx): number => Math.hypot(a.re, a.im);
export const div = (a: Cx, b: Cx): Cx => scale(mul(a, conj(b)), 1 / (b.re * b.re + b.im * b.im));
export function sqrt(a: Cx): Cx {
  const r = abs(a);
  const re = Math.sqrt((r + a.re) / 2);
  const im = Math.sign(a.im || 1) * Math.sqrt((r - a.re) / 2);
  return cx(re, im);
}
export function exp(a: Cx): Cx {
  const m = Math.exp(a.re);
  return cx(m * Math.cos(a.im), m * Math.sin(a.im));
}
export const cosh = (a: Cx): Cx => scale(add(exp(a), exp(scale(a, -1))), 0.5);
export const sinh = (a: Cx): Cx => scale(sub(exp(a), exp(scale(a, -1))), 0.5);

export interface Abcd {
  A: Cx;
  B: Cx;
  C: Cx;
  D: Cx;
}

/** Exact distributed line from per-km series impedance (ohm/km) and shunt admittance (S/km). */
export function distributedLine(zOhmPerKm: Cx, ySPerKm: Cx, lengthKm: number): Abcd {
  const gammaL = scale(sqrt(mul(zOhmPerKm, ySPerKm)), lengthKm);
  const zc = sqrt(div(zOhmPerKm, ySPerKm));
  return { A: cosh(gammaL), B: mul(zc, sinh(gammaL)), C: div(sinh(gammaL), zc), D: cosh(gammaL) };
}

export const seriesZ = (zOhm: Cx): Abcd => ({ A: cx(1), B: zOhm, C: cx(0), D: cx(1) });
export const shuntY = (yS: Cx): Abcd => ({ A: cx(1), B: cx(0), C: yS, D: cx(1) });
export const parallelIdentical = (line: Abcd): Abcd => ({ A: line.A, B: scale(line.B, 0.5), C: scale(line.C, 2), D: line.D });

export function cascade(...parts: Abcd[]): Abcd {
  return parts.reduce((m, n) => ({
    A: add(mul(m.A, n.A), mul(m.B, n.C)),
    B: add(mul(m.A, n.B), mul(m.B, n.D)),
    C: add(mul(m.C, n.A), mul(m.D, n.C)),
    D: add(mul(m.C, n.B), mul(m.D, n.D)),
  }));
}

/** A system equivalent: |Z| = V^2 / S_sc at the angle atan(X/R). */
export function systemImpedance(nominalKv: number, shortCircuitMva: number, xOverR: number): Cx {
  const magnitude = (nominalKv * nominalKv) / shortCircuitMva;
  const angle = Math.atan(xOverR);
  return cx(magnitude * Math.cos(angle), magnitude * Math.sin(angle));
}

/** A shunt reactor (negative) or capacitor (positive) from its three-phase rating at its rated voltage: B = Q / V^2. */
export const shuntFromRating = (qMvar: number, ratedKv: number, kind: 'reactor' | 'capacitor'): Abcd =>
  shuntY(cx(0, ((kind === 'reactor' ? -1 : 1) * qMvar) / (ratedKv * ratedKv)));

/**
 * A constant-power load P + jQ at the receiving end, sending voltage E held, receiving voltage real: E Vr = |A Vr^2 + B (P - jQ)|
 * (Vs = A Vr + B I with I* = S / Vr in line-to-line kV, MW, Mvar). A quadratic in x = Vr^2; the upper root is the normal branch.
 */
export function receivingVoltageKv(network: Abcd, sendingKv: number, pMw: number, qMvar: number): number {
  const bs = mul(network.B, cx(pMw, -qMvar));
  const a = abs(network.A) ** 2;
  const b = 2 * mul(network.A, conj(bs)).re - sendingKv * sendingKv;
  const c = abs(bs) ** 2;
  const discriminant = b * b - 4 * a * c;
  if (discriminant < 0) throw new Error('beyond the nose');
  return Math.sqrt((-b + Math.sqrt(discriminant)) / (2 * a));
}

/**
 * The nose of the P-V curve at tan(phi) = Q / P: the discriminant of the quadratic above is zero, which gives
 * P = E^2 / (2 (|A| |B k| + Re(A conj(B k)))) with k = 1 - j tan(phi) (Van Cutsem & Vournas, Voltage Stability of
 * Electric Power Systems, ch. 2, the same quadratic; derived here, from memory).
 */
export function noseMw(network: Abcd, sendingKv: number, tanPhi: number): number {
  const bk = mul(network.B, cx(1, -tanPhi));
  return (sendingKv * sendingKv) / (2 * (abs(network.A) * abs(bk) + mul(network.A, conj(bk)).re));
}

/**
 * Reactive power the network delivers into a bus held at busKv with active power pMw drawn there: the larger root of
 * |A V + B (P - jQ) / V| = E, the normal (small-angle) branch.
 */
export function deliveredMvar(network: Abcd, sendingKv: number, busKv: number, pMw: number): number {
  const fixed = add(scale(network.A, busKv), scale(network.B, pMw / busKv));
  const perQ = scale(mul(network.B, cx(0, -1)), 1 / busKv);
  const a = abs(perQ) ** 2;
  const b = 2 * mul(fixed, conj(perQ)).re;
  const c = abs(fixed) ** 2 - sendingKv * sendingKv;
  return (-b + Math.sqrt(b * b - 4 * a * c)) / (2 * a);
}

/**
 * Receiving-end power between two held EMFs at the angle that maximises it (δ = arg B): Es Er / |B| - |A| Er^2 cos(β - α) / |B|
 * (Glover, Sarma & Overbye, 5th ed., §5.5, the receiving-end power of a two-port; from memory).
 */
export function steadyStateLimitMw(network: Abcd, sendingKv: number, receivingKv: number): number {
  const alpha = Math.atan2(network.A.im, network.A.re);
  const beta = Math.atan2(network.B.im, network.B.re);
  return (sendingKv * receivingKv) / abs(network.B) - (abs(network.A) * receivingKv * receivingKv * Math.cos(beta - alpha)) / abs(network.B);
}

/** Bisection for the root of a continuous function that changes sign between low and high. */
export function bisect(fn: (value: number) => number, low: number, high: number): number {
  let lower = low;
  let upper = high;
  const lowerSign = Math.sign(fn(lower));
  for (let step = 0; step < 200; step += 1) {
    const middle = (lower + upper) / 2;
    if (Math.sign(fn(middle)) === lowerSign) lower = middle;
    else upper = middle;
  }
  return (lower + upper) / 2;
}
