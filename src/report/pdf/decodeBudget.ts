// A ceiling on how many bytes pdf-lib may decompress while kvarbook reads a PDF it did not write.
import { AsyncLocalStorage } from 'node:async_hooks';
import { createRequire } from 'node:module';

/**
 * Counted as the buffers pdf-lib allocates to decompress into (up to twice the bytes decompressed).
 * A PDF deflates about 1000:1, so a 1 MB file can ask for a gigabyte. 64 MiB is well above what a
 * kvarbook PDF decompresses when read (its object streams and attachments: the report, the results,
 * the seal and the study, itself limited to 8 MB), and well below a machine's memory.
 */
export const MAX_DECODED_BYTES = 64 * 1024 * 1024;

export interface DecodeBudget {
  limitBytes: number;
  usedBytes: number;
  /** What is being read, for the error: e.g. `EmbeddedFiles/report.html`. */
  part: string;
  /** Set once the limit was passed; pdf-lib may catch the throw and carry on, so callers look here too. */
  exceededIn?: string;
}

// Every stream filter pdf-lib implements (Flate, LZW, RunLength, ASCII85, ASCIIHex) decodes through
// DecodeStream and grows its output only in ensureBuffer: counting there bounds them all, nested
// filters included. The CommonJS build is the one `import 'pdf-lib'` loads, so this is the same class.
interface DecodeStreamLike {
  buffer: Uint8Array;
  minBufferLength: number;
  ensureBuffer(requested: number): Uint8Array;
}
const DecodeStream = (createRequire(import.meta.url)('pdf-lib/cjs/core/streams/DecodeStream.js') as { default: { prototype: DecodeStreamLike } })
  .default;
const budgets = new AsyncLocalStorage<DecodeBudget>();
const unbounded = DecodeStream.prototype.ensureBuffer;

export class DecodeBudgetExceeded extends Error {
  constructor(readonly budget: DecodeBudget) {
    super(`more than ${budget.limitBytes / 1024 / 1024} MiB decompressed`);
  }
}

DecodeStream.prototype.ensureBuffer = function boundedEnsureBuffer(this: DecodeStreamLike, requested: number): Uint8Array {
  const budget = budgets.getStore();
  if (budget !== undefined && requested > this.buffer.byteLength) {
    // Counted before allocating, as pdf-lib sizes the new buffer: the next power of two from its minimum.
    let size = this.minBufferLength;
    while (size < requested) size *= 2;
    budget.usedBytes += size - this.buffer.byteLength;
    if (budget.usedBytes > budget.limitBytes) {
      budget.exceededIn ??= budget.part;
      throw new DecodeBudgetExceeded(budget);
    }
  }
  return unbounded.call(this, requested);
};

/** Runs `read` with every decompression inside it, synchronous or awaited, counted against one budget. */
export function withDecodeBudget<T>(budget: DecodeBudget, read: () => Promise<T>): Promise<T> {
  return budgets.run(budget, read);
}
