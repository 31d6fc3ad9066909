// The error of the seal modules: one diagnostic with a stable `seal-` code, what was wrong, and what to do about it.
import type { CodesStartingWith } from '../diagnostics/codes.ts';
import { Problem, plainValue } from '../diagnostics/diagnostic.ts';

export type SealErrorCode = CodesStartingWith<'seal-'>;

export interface SealErrorDetails {
  code: SealErrorCode;
  message: string;
  hint: string;
  /** The quantity or field at fault, e.g. `passphrase` or `results[2].value`. */
  quantity?: string;
  /** The offending value, when it is safe to repeat (never a passphrase or key). */
  value?: unknown;
  /** The values that would have been accepted, in words. */
  allowed?: string;
}

export class SealError extends Problem {
  override readonly name = 'SealError';
  declare readonly code: SealErrorCode;
  declare readonly hint: string;
  /** The offending value as it was (the diagnostic's `actual` is its plain form). */
  readonly value?: unknown;

  constructor(details: SealErrorDetails, options?: { cause?: unknown }) {
    super(
      {
        code: details.code,
        message: details.message,
        hint: details.hint,
        ...(details.quantity !== undefined ? { quantity: details.quantity } : {}),
        ...(details.allowed !== undefined ? { expected: details.allowed } : {}),
        ...(details.value !== undefined ? { actual: plainValue(details.value) } : {}),
      },
      options,
    );
    if (details.value !== undefined) this.value = details.value;
  }
}
