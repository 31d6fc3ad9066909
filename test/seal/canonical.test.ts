// Specification of canonical JSON, checked against the examples published in RFC 8785.
import { describe, expect, it } from 'vitest';
import { canonicalBytes, canonicalJson } from '../../src/seal/canonical.ts';
import { sealErrorOf } from './fixtures.ts';

function float64FromHex(hex: string): number {
  return Buffer.from(hex, 'hex').readDoubleBE(0);
}

describe('canonicalJson', () => {
  // RFC 8785 (JSON Canonicalization Scheme), §3.2.2 input and §3.2.3/§3.2.4 output, written as in the RFC.
  const rfcSectionThreeInput = String.raw`{
    "numbers": [333333333.33333329, 1E30, 4.50, 2e-3, 0.000000000000000000000000001],
    "string": "\u20ac$\u000F\u000aA'\u0042\u0022\u005c\\\"\/",
    "literals": [null, true, false]
  }`;

  it('reproduces the worked example of RFC 8785 §3.2.3 character for character', () => {
    const expected = String.raw`{"literals":[null,true,false],"numbers":[333333333.3333333,1e+30,4.5,0.002,1e-27],"string":"€$\u000f\nA'B\"\\\\\"/"}`;
    expect(canonicalJson(JSON.parse(rfcSectionThreeInput))).toBe(expected);
  });

  it('encodes the worked example as the UTF-8 bytes listed in RFC 8785 §3.2.4', () => {
    const rfcBytesHex =
      '7b226c69746572616c73223a5b6e756c6c2c747275652c66616c73655d2c226e756d62657273223a5b3333333333333333332e333333333333332c' +
      '31652b33302c342e352c302e3030322c31652d32375d2c22737472696e67223a22e282ac245c75303030665c6e4127425c225c5c5c5c5c222f227d';
    expect(canonicalBytes(JSON.parse(rfcSectionThreeInput)).toString('hex')).toBe(rfcBytesHex);
  });

  it('orders object keys by UTF-16 code units as in the sorting example of RFC 8785 §3.2.3', () => {
    const input = JSON.parse(String.raw`{
      "\u20ac": "Euro Sign",
      "\r": "Carriage Return",
      "\ufb33": "Hebrew Letter Dalet With Dagesh",
      "1": "One",
      "\ud83d\ude00": "Emoji: Grinning Face",
      "\u0080": "Control",
      "\u00f6": "Latin Small Letter O With Diaeresis"
    }`);
    // Compared as text: parsing it back would move the integer-like key "1" to the front.
    const expected =
      '{"\\r":"Carriage Return","1":"One","\u0080":"Control","\u00f6":"Latin Small Letter O With Diaeresis",' +
      '"\u20ac":"Euro Sign","\ud83d\ude00":"Emoji: Grinning Face","\ufb33":"Hebrew Letter Dalet With Dagesh"}';
    expect(canonicalJson(input)).toBe(expected);
  });

  // RFC 8785 Appendix B, "Number Serialization Samples" (IEEE 754 bits → canonical text).
  it.each([
    ['0000000000000000', '0'],
    ['8000000000000000', '0'],
    ['0000000000000001', '5e-324'],
    ['8000000000000001', '-5e-324'],
    ['7fefffffffffffff', '1.7976931348623157e+308'],
    ['ffefffffffffffff', '-1.7976931348623157e+308'],
    ['4340000000000000', '9007199254740992'],
    ['c340000000000000', '-9007199254740992'],
    ['4430000000000000', '295147905179352830000'],
    ['44b52d02c7e14af5', '9.999999999999997e+22'],
    ['44b52d02c7e14af6', '1e+23'],
    ['44b52d02c7e14af7', '1.0000000000000001e+23'],
    ['444b1ae4d6e2ef4e', '999999999999999700000'],
    ['444b1ae4d6e2ef4f', '999999999999999900000'],
    ['444b1ae4d6e2ef50', '1e+21'],
    ['3eb0c6f7a0b5ed8c', '9.999999999999997e-7'],
    ['3eb0c6f7a0b5ed8d', '0.000001'],
    ['41b3de4355555553', '333333333.3333332'],
    ['41b3de4355555554', '333333333.33333325'],
    ['41b3de4355555555', '333333333.3333333'],
    ['41b3de4355555556', '333333333.3333334'],
    ['41b3de4355555557', '333333333.33333343'],
    ['becbf647612f3696', '-0.0000033333333333333333'],
    ['43143ff3c1cb0959', '1424953923781206.2'],
  ])('writes the IEEE 754 value %s as %s (RFC 8785 Appendix B)', (bitsHex, expected) => {
    expect(canonicalJson([float64FromHex(bitsHex)])).toBe(`[${expected}]`);
  });

  // RFC 8785 Appendix B lists NaN (7fffffffffffffff) and Infinity (7ff0000000000000) as errors.
  it.each([
    ['NaN', float64FromHex('7fffffffffffffff')],
    ['Infinity', float64FromHex('7ff0000000000000')],
    ['-Infinity', Number.NEGATIVE_INFINITY],
  ])('refuses %s and names where it was', (_label, value) => {
    const error = sealErrorOf(() => canonicalJson({ results: [{ value }] }));
    expect(error.code).toBe('seal-not-canonical-json');
    expect(error.quantity).toBe('$.results[0].value');
  });

  it('refuses an undefined member instead of silently dropping it', () => {
    const error = sealErrorOf(() => canonicalJson({ unit: undefined }));
    expect(error.code).toBe('seal-not-canonical-json');
    expect(error.quantity).toBe('$.unit');
  });

  it('refuses an undefined array element instead of writing null', () => {
    expect(sealErrorOf(() => canonicalJson([1, undefined])).quantity).toBe('$[1]');
  });

  it('refuses class instances such as dates, whose toJSON would hide what is signed', () => {
    expect(sealErrorOf(() => canonicalJson({ when: new Date(0) })).code).toBe('seal-not-canonical-json');
  });

  it.each([
    ['a bigint', 10n],
    ['a function', () => 1],
    ['a symbol', Symbol('x')],
  ])('refuses %s', (_label, value) => {
    expect(sealErrorOf(() => canonicalJson({ value })).code).toBe('seal-not-canonical-json');
  });

  // RFC 8785 §3.2.2.2 requires I-JSON input; I-JSON (RFC 7493 §2.1) forbids unpaired surrogates.
  it('refuses a string holding a lone surrogate', () => {
    expect(sealErrorOf(() => canonicalJson({ name: 'line \ud800' })).code).toBe('seal-not-canonical-json');
  });

  it('accepts a surrogate pair, which is one well-formed character', () => {
    expect(canonicalJson({ name: '\ud83d\ude00' })).toBe('{"name":"😀"}');
  });
});
