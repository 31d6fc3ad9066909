// Typed errors for chart rendering (bad Vega-Lite specs) and chart builders (bad engineering inputs).

/** Stable codes a caller can branch on; the message is for people. */
export type ChartSpecErrorCode =
  | 'CHART_SPEC_NOT_OBJECT'
  | 'CHART_SPEC_INVALID'
  | 'CHART_DATA_NOT_INLINE'
  | 'CHART_SPEC_NOT_ALLOWED'
  | 'CHART_RENDER_FAILED';

export interface ChartSpecErrorDetails {
  /** Where in the spec the problem is, as a dotted path (e.g. `layer.1.data.url`); `(spec)` for the whole spec. */
  quantity: string;
  /** The offending value, shortened for display. */
  value: string;
  /** What would have been accepted. */
  allowed: string;
  hint: string;
}

/** A Vega-Lite spec that cannot be turned into a chart: malformed, external data, or rejected by Vega. */
export class ChartSpecError extends Error {
  override readonly name = 'ChartSpecError';
  readonly code: ChartSpecErrorCode;
  readonly quantity: string;
  readonly value: string;
  readonly allowed: string;
  readonly hint: string;

  constructor(code: ChartSpecErrorCode, problem: string, details: ChartSpecErrorDetails) {
    super(`${problem} (at ${details.quantity}: ${details.value}; allowed: ${details.allowed}). ${details.hint}`);
    this.code = code;
    this.quantity = details.quantity;
    this.value = details.value;
    this.allowed = details.allowed;
    this.hint = details.hint;
  }
}

export type ChartInputErrorCode = 'CHART_INPUT_OUT_OF_RANGE' | 'CHART_INPUT_EMPTY' | 'CHART_INPUT_NOT_FINITE';

/** An engineering input to a chart builder that cannot be drawn meaningfully. */
export class ChartInputError extends Error {
  override readonly name = 'ChartInputError';
  readonly code: ChartInputErrorCode;
  readonly quantity: string;
  readonly value: number | string;
  readonly allowed: string;
  readonly hint: string;

  constructor(code: ChartInputErrorCode, details: { quantity: string; value: number | string; allowed: string; hint: string }) {
    super(`${details.quantity} = ${String(details.value)} is not usable for the chart (allowed: ${details.allowed}). ${details.hint}`);
    this.code = code;
    this.quantity = details.quantity;
    this.value = details.value;
    this.allowed = details.allowed;
    this.hint = details.hint;
  }
}

/** Short, single-line rendering of an arbitrary value for error messages. */
export function describeValue(value: unknown): string {
  let text: string;
  try {
    text = typeof value === 'string' ? JSON.stringify(value) : (JSON.stringify(value) ?? String(value));
  } catch {
    text = String(value);
  }
  return text.length > 80 ? `${text.slice(0, 77)}...` : text;
}
