// Physical quantities with units: one mathjs instance that knows the units of the trade (var, pu), dimension checks.
import { create, createUnitDependencies, unitDependencies, type Unit } from 'mathjs';

// Only units: the instance is made of the unit factories and what they depend on, so a bundle carries no more of mathjs.
const math = create({ ...unitDependencies, ...createUnitDependencies }, {});
// Reactive power is written in var/kvar/Mvar in the trade; dimensionally it is a volt-ampere.
math.createUnit('var', { definition: '1 VA', prefixes: 'short', aliases: ['VAr'] });
// A per-unit value has no fixed base, so pu is its own dimension: it cannot silently become kV.
math.createUnit('pu');
// Loadability is stated in multiples of the line's surge impedance loading: a dimension of its own, like pu.
math.createUnit('SIL');

/** The quantity kinds an input may declare; each maps to a unit whose dimension it must have. */
export const QUANTITY_KINDS = {
  voltage: 'V',
  current: 'A',
  length: 'm',
  frequency: 'Hz',
  'active power': 'W',
  'reactive power': 'var',
  'apparent power': 'VA',
  impedance: 'ohm',
  admittance: 'S',
  'impedance per length': 'ohm/m',
  'admittance per length': 'S/m',
  'inductance per length': 'H/m',
  'capacitance per length': 'F/m',
  inductance: 'H',
  capacitance: 'F',
  angle: 'rad',
  time: 's',
  'per unit': 'pu',
  ratio: '1',
} as const;

export type QuantityKind = keyof typeof QUANTITY_KINDS;

export interface ParsedQuantity {
  /** The number as written, in `unit`. */
  value: number;
  /** The unit as written (normalised spacing), '' for a plain number. */
  unit: string;
  /** The value in coherent SI units (V, A, m, Hz, W, var, ohm, S, rad, s). */
  si: number;
}

export class UnitProblem extends Error {
  readonly hint: string;
  constructor(message: string, hint: string) {
    super(message);
    this.name = 'UnitProblem';
    this.hint = hint;
  }
}

/** A quantity is short: "0.031 ohm/km". Anything longer is not a quantity, and is refused before it is read. */
const MAX_QUANTITY_CHARACTERS = 80;
const PLAIN_NUMBER = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;
const LEADING_NUMBER = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?(?=\s*[A-Za-z(])/;
const QUANTITY_HINT = 'write a number and a unit, e.g. "400 kV", "0.031 ohm/km", "3.9 uS/km"; nothing is calculated here';

/**
 * A number and a unit, read by mathjs's unit parser only: never by its expression evaluator, so no text of a
 * study (front matter, --set) is ever computed in the host.
 */
function toUnit(text: string): Unit | number {
  const trimmed = text.trim();
  if (trimmed === '') throw new UnitProblem('the quantity is empty', 'write a number and a unit, e.g. "400 kV"');
  if (trimmed.length > MAX_QUANTITY_CHARACTERS) {
    throw new UnitProblem(`is ${trimmed.length} characters long; a quantity has at most ${MAX_QUANTITY_CHARACTERS}`, QUANTITY_HINT);
  }
  const written = trimmed.replace(/µ/g, 'u').replace(/Ω/g, 'ohm');
  if (PLAIN_NUMBER.test(written)) return Number(written);
  if (!LEADING_NUMBER.test(written)) throw new UnitProblem(`"${trimmed}" is not a number with a unit`, QUANTITY_HINT);
  try {
    return math.Unit.parse(written);
  } catch (error) {
    throw new UnitProblem(`"${trimmed}" is not a number with a unit (${(error as Error).message})`, QUANTITY_HINT);
  }
}

/** The unit as a reader writes it and the parser reads it back: "ohm/km", "m/s^2", "kV A". */
function unitText(unit: Unit): string {
  return unit.formatUnits().replace(/ \/ /g, '/');
}

/** Parse "400 kV", "3.9 uS/km" or a bare number; throws UnitProblem for anything else. */
export function parseQuantity(text: string | number): ParsedQuantity {
  if (typeof text === 'number') {
    if (!Number.isFinite(text)) throw new UnitProblem(`${text} is not a finite number`, 'give a finite number');
    return { value: text, unit: '', si: text };
  }
  const parsed = toUnit(text);
  if (typeof parsed === 'number') {
    if (!Number.isFinite(parsed)) throw new UnitProblem(`"${text}" is not a finite number`, 'give a finite number');
    return { value: parsed, unit: '', si: parsed };
  }
  const value = parsed.toNumeric(parsed.formatUnits()) as number;
  // SI for a per-unit value is the per-unit number itself: pu has no SI base.
  const si = parsed.equalBase(math.unit('1 pu')) ? value : (parsed.toSI().toNumeric() as number);
  if (!Number.isFinite(value) || !Number.isFinite(si)) {
    throw new UnitProblem(`"${text}" is not a finite quantity`, 'give a finite number');
  }
  return { value: cleanFloat(value), unit: unitText(parsed), si };
}

/** mathjs stores prefixed values scaled, so 3.9 uS reads back as 3.9000000000000004; 15 significant digits undo that. */
function cleanFloat(value: number): number {
  return Number(value.toPrecision(15));
}

export function sameDimension(unitA: string, unitB: string): boolean {
  const a = unitA === '' || unitA === '1' ? null : toUnit(`1 ${unitA}`);
  const b = unitB === '' || unitB === '1' ? null : toUnit(`1 ${unitB}`);
  const aIsNumber = a === null || typeof a === 'number';
  const bIsNumber = b === null || typeof b === 'number';
  if (aIsNumber || bIsNumber) return aIsNumber && bIsNumber;
  return (a as Unit).equalBase(b as Unit);
}

/** Express `value` given in `fromUnit` in `toUnit`; throws UnitProblem when the dimensions differ. */
export function convertQuantity(value: number, fromUnit: string, toUnitText: string): number {
  if (!sameDimension(fromUnit, toUnitText)) {
    throw new UnitProblem(
      `cannot express ${fromUnit || 'a plain number'} as ${toUnitText || 'a plain number'}: the dimensions differ`,
      `ask for a unit of the same dimension as ${fromUnit || 'a plain number'}`,
    );
  }
  if (fromUnit === '' || fromUnit === '1') return value;
  return cleanFloat(math.unit(value, fromUnit).toNumeric(toUnitText) as number);
}

/** A voltage or current unit that says which value of the wave it is: "kV rms", "kV peak". */
const WAVE_VALUE = /^(.+?)\s+(rms|peak)$/;

/** Check that a unit text is one mathjs knows (for result and table units); returns a problem or null. */
export function unitProblem(unit: string): string | null {
  if (unit === '' || unit === '%' || unit === 'pu' || unit === 'p.u.') return null;
  const [, base = unit, waveValue] = WAVE_VALUE.exec(unit) ?? [];
  try {
    const parsed = toUnit(`1 ${base}`);
    if (waveValue && !(typeof parsed !== 'number' && (parsed.equalBase(math.unit('1 V')) || parsed.equalBase(math.unit('1 A'))))) {
      return `"${waveValue}" qualifies only a voltage or a current, not ${base}`;
    }
    return null;
  } catch (error) {
    return (error as Error).message;
  }
}

export function describeKinds(): string {
  return Object.keys(QUANTITY_KINDS).join(', ');
}
