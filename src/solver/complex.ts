// Complex arithmetic for the solver: complex.js inside, the plain { re, im } form at every public edge.
import { Complex } from 'complex.js';
import { requireNumber, requireObject } from './errors.ts';

export { Complex };

/** A complex number as it crosses the process boundary and appears in the calculation log. */
export interface ComplexValue {
  re: number;
  im: number;
}

export function toPlain(value: Complex): ComplexValue {
  return { re: value.re, im: value.im };
}

export function fromPlain(value: ComplexValue): Complex {
  return new Complex(value.re, value.im);
}

export function fromPolar(magnitude: number, angleRad: number): Complex {
  return new Complex(magnitude * Math.cos(angleRad), magnitude * Math.sin(angleRad));
}

export function angleDegOf(value: Complex | ComplexValue): number {
  return (Math.atan2(value.im, value.re) * 180) / Math.PI;
}

function magnitudeOf(value: Complex | ComplexValue): number {
  return Math.hypot(value.re, value.im);
}

/** Validates a { re, im } input coming from a study block. */
export function requireComplex(quantity: string, value: unknown, hint: string): Complex {
  const record = requireObject(quantity, value, hint);
  const re = requireNumber(`${quantity}.re`, record.re, {}, hint);
  const im = requireNumber(`${quantity}.im`, record.im, {}, hint);
  return new Complex(re, im);
}

export interface PolarForm {
  magnitude: number;
  angleDeg: number;
}

/** Magnitude and angle of a { re, im } value, for tables in a study. */
export function polarForm(options: { value: ComplexValue }): PolarForm {
  const hint = 'Pass { value: { re, im } }, e.g. a field of a two-port or an operating point.';
  const value = requireComplex('value', requireObject('options', options, hint).value, hint);
  return { magnitude: magnitudeOf(value), angleDeg: angleDegOf(value) };
}
