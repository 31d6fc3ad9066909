// Typed error for everything that can go wrong while finding Chromium, printing, stamping or reading a PDF.

export type PdfErrorCode =
  | 'PDF_CHROMIUM_NOT_FOUND'
  | 'PDF_INVALID_OPTION'
  | 'PDF_BROWSER_LAUNCH_FAILED'
  | 'PDF_BROWSER_TIMEOUT'
  | 'PDF_PRINT_FAILED'
  | 'PDF_READ_FAILED';

export class PdfError extends Error {
  override readonly name = 'PdfError';
  readonly code: PdfErrorCode;
  /** The option or part of the PDF concerned. */
  readonly quantity: string;
  readonly value: string;
  readonly allowed: string;
  readonly hint: string;

  constructor(
    code: PdfErrorCode,
    problem: string,
    details: { quantity: string; value: string; allowed: string; hint: string },
    options?: { cause?: unknown },
  ) {
    super(`${problem} (${details.quantity}: ${details.value}; expected ${details.allowed}). ${details.hint}`, options);
    this.code = code;
    this.quantity = details.quantity;
    this.value = details.value;
    this.allowed = details.allowed;
    this.hint = details.hint;
  }
}

export function messageOf(value: unknown): string {
  return value instanceof Error ? value.message : String(value);
}
