// Typed errors for chart rendering: a Vega-Lite spec that cannot be drawn.

import type { CodesStartingWith } from '../../diagnostics/codes.ts';
import { Problem } from '../../diagnostics/diagnostic.ts';

export type ChartSpecErrorCode = CodesStartingWith<'chart-spec-'> | 'chart-data-not-inline' | 'chart-render-failed';

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
export class ChartSpecError extends Problem {
  override readonly name = 'ChartSpecError';
  declare readonly code: ChartSpecErrorCode;

  constructor(code: ChartSpecErrorCode, problem: string, details: ChartSpecErrorDetails) {
    const message = `${problem} (at ${details.quantity}: ${details.value}; allowed: ${details.allowed})`;
    super(
      { code, message, hint: details.hint, quantity: details.quantity, expected: details.allowed, actual: details.value },
      { message: `${message}. ${details.hint}` },
    );
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
