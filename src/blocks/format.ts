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

/** A value with its unit, as a reader expects it: "123.4 Mvar", "1.05 pu", "12 %". */
export function formatQuantity(value: number | string | boolean, unit = '', digits = DEFAULT_DIGITS): string {
  const text = typeof value === 'number' ? formatNumber(value, digits) : typeof value === 'boolean' ? (value ? 'yes' : 'no') : value;
  if (!unit) return text;
  return unit === '%' ? `${text} %` : `${text} ${unit}`;
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

/** A count as a reader reads it in a message or a limit: "100,000 cells". */
export function formatCount(value: number): string {
  return COUNT_FORMAT.format(value);
}

const COUNT_FORMAT = new Intl.NumberFormat('en-GB');
