// Typed error for everything that can go wrong while finding Chromium, printing, stamping or reading a PDF.

import type { CodesStartingWith } from '../../diagnostics/codes.ts';
import { Problem } from '../../diagnostics/diagnostic.ts';

export type PdfErrorCode = CodesStartingWith<'pdf-'>;

export class PdfError extends Problem {
  override readonly name = 'PdfError';
  declare readonly code: PdfErrorCode;

  constructor(
    code: PdfErrorCode,
    problem: string,
    details: { quantity: string; value: string; allowed: string; hint: string },
    options?: { cause?: unknown },
  ) {
    const message = `${problem} (${details.quantity}: ${details.value}; expected ${details.allowed})`;
    super(
      { code, message, hint: details.hint, quantity: details.quantity, expected: details.allowed, actual: details.value },
      { message: `${message}. ${details.hint}`, ...options },
    );
  }
}

export function messageOf(value: unknown): string {
  return value instanceof Error ? value.message : String(value);
}
