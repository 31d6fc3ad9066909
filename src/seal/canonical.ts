// Canonical JSON (RFC 8785, JSON Canonicalization Scheme): the exact bytes that get hashed and signed.
import canonicalize from 'canonicalize';
import { SealError } from './errors.ts';

export type JsonValue = null | boolean | number | string | JsonValue[] | { [key: string]: JsonValue };

/**
 * The RFC 8785 text of `value`. Only plain JSON data is accepted: the library would silently drop
 * `undefined` members and call `toJSON`, either of which would let two different in-memory values
 * sign as the same bytes, so anything outside the JSON data model is refused with its path.
 */
export function canonicalJson(value: unknown): string {
  assertPlainJson(value, '$');
  const text = canonicalize(value);
  if (text === undefined) {
    // Unreachable after the walk above; kept as a typed refusal rather than a non-null assertion.
    throw notJson('$', 'a value with no JSON form');
  }
  return text;
}

/** The UTF-8 bytes of the canonical text: what is signed and hashed. */
export function canonicalBytes(value: unknown): Buffer {
  return Buffer.from(canonicalJson(value), 'utf8');
}

// With the u flag a proper surrogate pair reads as one code point, so only a lone half matches.
const LONE_SURROGATE = /\p{Surrogate}/u;

function assertPlainJson(value: unknown, path: string): void {
  if (value === null || typeof value === 'boolean') return;
  if (typeof value === 'number') {
    if (!Number.isFinite(value)) throw notJson(path, String(value));
    return;
  }
  if (typeof value === 'string') {
    if (LONE_SURROGATE.test(value)) throw notJson(path, 'a string with a lone UTF-16 surrogate');
    return;
  }
  if (Array.isArray(value)) {
    for (let index = 0; index < value.length; index++) {
      // Holes in sparse arrays read as undefined and are refused like any undefined.
      assertPlainJson(value[index], `${path}[${index}]`);
    }
    return;
  }
  if (typeof value === 'object') {
    const prototype = Object.getPrototypeOf(value);
    if (prototype !== Object.prototype && prototype !== null) {
      throw notJson(path, `an instance of ${value.constructor?.name ?? 'a class'}`);
    }
    for (const [key, member] of Object.entries(value)) {
      assertPlainJson(member, `${path}.${key}`);
    }
    return;
  }
  throw notJson(path, typeof value === 'undefined' ? 'undefined' : `a ${typeof value}`);
}

function notJson(path: string, found: string): SealError {
  return new SealError({
    code: 'seal-not-canonical-json',
    message: `Cannot put ${found} at ${path} into canonical JSON.`,
    quantity: path,
    value: found,
    allowed: 'null, true/false, finite numbers, well-formed strings, arrays and plain objects',
    hint: 'Convert dates to ISO strings, drop or null out missing values, and make sure every number is finite before sealing.',
  });
}
