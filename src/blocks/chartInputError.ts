// The error of a chart builder: an input it cannot draw meaningfully (the block library's own, so blocks need nothing from the report).
import type { CodesStartingWith } from '../diagnostics/codes.ts';
import { Problem } from '../diagnostics/diagnostic.ts';

export type ChartInputErrorCode = CodesStartingWith<'chart-input-'>;

/** An engineering input to a chart builder that cannot be drawn meaningfully. */
export class ChartInputError extends Problem {
  override readonly name = 'ChartInputError';
  declare readonly code: ChartInputErrorCode;

  constructor(code: ChartInputErrorCode, details: { quantity: string; value: number | string; allowed: string; hint: string }) {
    const message = `${details.quantity} = ${String(details.value)} is not usable for the chart (allowed: ${details.allowed})`;
    super(
      { code, message, hint: details.hint, quantity: details.quantity, expected: details.allowed, actual: details.value },
      { message: `${message}. ${details.hint}` },
    );
  }
}
