// How numbers and quantities are written in a report: significant figures, units, never NaN.

export const DEFAULT_DIGITS = 4;

/** `value` to `digits` significant figures; exponent form only outside 1e-4 .. 1e9. */
export function formatNumber(value: number, digits = DEFAULT_DIGITS): string {
  if (!Number.isFinite(value)) throw new RangeError(`cannot format the non-finite number ${value}`);
  if (value === 0) return '0';
  const magnitude = Math.abs(value);
  if (magnitude < 1e-4 || magnitude >= 1e9) {
    const [mantissa, exponent] = value.toExponential(digits - 1).split('e');
    return `${mantissa}×10^${Number(exponent)}`;
  }
  const text = value.toPrecision(digits);
  // toPrecision falls into exponent form for large integers; write them out instead.
  const plain = text.includes('e') ? String(Number(text)) : text;
  return plain === '-0' ? '0' : plain;
}

/** Unit words a study types (the unit parser reads them) and the symbols the trade prints for them. */
const UNIT_SYMBOLS: Readonly<Record<string, string>> = { ohm: 'Ω', ohms: 'Ω', kohm: 'kΩ', Mohm: 'MΩ', mohm: 'mΩ', deg: '°' };
/** The micro prefix typed as "u" (uS, uF, uH, us): printed µ. */
const TYPED_MICRO = /^u(?=[SFHsAVmW]$|[SFHsAVmW]\b)/;

/** A unit as the trade writes it: "ohm/km" as Ω/km, "uS/km" as µS/km, "deg" as °; "kV rms" and "kV peak" as they are. */
export function displayUnit(unit: string): string {
  return unit.replace(/[A-Za-z]+/g, (word) => UNIT_SYMBOLS[word] ?? word.replace(TYPED_MICRO, 'µ'));
}

/** A value with its unit, as a reader expects it: "123.4 Mvar", "1.05 pu", "12 %", "30°", "255 Ω". */
export function formatQuantity(value: number | string | boolean, unit = '', digits = DEFAULT_DIGITS): string {
  const text = typeof value === 'number' ? formatNumber(value, digits) : typeof value === 'boolean' ? (value ? 'yes' : 'no') : value;
  if (!unit) return text;
  const shown = displayUnit(unit);
  // A plane angle's degree sign follows the number without a space (SI Brochure, 9th ed., 5.4.3, from memory).
  return shown === '°' ? `${text}°` : `${text} ${shown}`;
}

/**
 * The one format of a table column's numbers, so that a column reads at one resolution ("50.0" beside "100.0", "0.98"
 * beside "1.15"): the decimals that give its largest value `digits` significant figures, one more if a smaller value
 * would otherwise keep fewer than `digits - 1`. A column that spans more decades than that (mixed quantities, values
 * near zero) or needs exponent form keeps each value's own significant figures rather than lose any.
 */
export function columnFormat(values: readonly number[], digits = DEFAULT_DIGITS): (value: number) => string {
  const own = (value: number) => formatNumber(value, digits);
  const magnitudes = values.filter((value) => value !== 0 && Number.isFinite(value)).map((value) => Math.abs(value));
  if (magnitudes.length === 0) return own;
  const largest = Math.max(...magnitudes);
  if (largest < 1e-4 || largest >= 1e9) return own;
  // Exponents of the rounded values: 9.996 to three figures is 10.0, one decimal, not two.
  const exponent = (magnitude: number) => Math.floor(Math.log10(Number(magnitude.toPrecision(digits))));
  const byLargest = Math.max(0, digits - 1 - exponent(largest));
  const needed = Math.max(byLargest, digits - 2 - exponent(Math.min(...magnitudes)));
  if (needed > byLargest + 1) return own;
  return (value) => {
    if (!Number.isFinite(value)) throw new RangeError(`cannot format the non-finite number ${value}`);
    const text = value.toFixed(needed);
    return /^-0(\.0*)?$/.test(text) ? text.slice(1) : text;
  };
}

/** A stated number (a limit, a setting) at most `digits` significant figures, without padding zeros: "1 km", "0.95 pu". */
export function formatStated(value: number, digits = DEFAULT_DIGITS): string {
  if (!Number.isFinite(value)) throw new RangeError(`cannot format the non-finite number ${value}`);
  const magnitude = Math.abs(value);
  if (value !== 0 && (magnitude < 1e-4 || magnitude >= 1e9)) {
    const [mantissa, exponent] = Number(value.toPrecision(digits)).toExponential().split('e');
    return `${mantissa}×10^${Number(exponent)}`;
  }
  return String(Number(value.toPrecision(digits)));
}

/** A criterion's limits in words, as the report shows them and the seal signs them: "0.95 to 1.05 pu", "at most 800 km". */
export function formatLimits(limits: { min?: number; max?: number; unit: string; digits: number }): string {
  // Limits are stated numbers, not computed ones: no padding zeros ("1 km", not "1.000 km").
  const show = (value: number) => formatQuantity(formatStated(value, limits.digits), limits.unit);
  if (limits.min !== undefined && limits.max !== undefined) return `${show(limits.min)} to ${show(limits.max)}`;
  if (limits.min !== undefined) return `at least ${show(limits.min)}`;
  return `at most ${show(limits.max as number)}`;
}

/** A count as a reader reads it in a message or a limit: "100,000 cells". */
export function formatCount(value: number): string {
  return COUNT_FORMAT.format(value);
}

const COUNT_FORMAT = new Intl.NumberFormat('en-GB');
