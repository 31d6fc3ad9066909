// The one catalogue of problem codes: every code is kebab-case and has a meaning, and a code outside it does not type-check.
import { readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { DIAGNOSTIC_CODES, type DiagnosticCode, isDiagnosticCode } from '../../src/diagnostics/codes.ts';
import type { Diagnostic } from '../../src/diagnostics/diagnostic.ts';
import { SolverDomainError } from '../../src/solver/errors.ts';
import { SealError } from '../../src/seal/errors.ts';

function sourceFiles(folder: string): string[] {
  return readdirSync(folder, { withFileTypes: true }).flatMap((entry) => {
    const path = join(folder, entry.name);
    if (entry.isDirectory()) return sourceFiles(path);
    return entry.name.endsWith('.ts') ? [path] : [];
  });
}

describe('the code catalogue', () => {
  it('writes every code in kebab-case with a one-line meaning', () => {
    for (const [code, meaning] of Object.entries(DIAGNOSTIC_CODES)) {
      expect(code).toMatch(/^[a-z]+(-[a-z0-9]+)*$/);
      expect(meaning.length).toBeGreaterThan(10);
      expect(meaning).not.toContain('\n');
    }
  });

  it('refuses a code outside the catalogue as a type error', () => {
    // @ts-expect-error the solver's old upper-case spelling is no longer a code
    const old: DiagnosticCode = 'OUT_OF_RANGE';
    // @ts-expect-error a typo in a code is caught by the compiler
    const typo: Diagnostic = { code: 'front-matter-yml', message: 'x' };
    // @ts-expect-error a solver error takes only the solver's codes
    const foreign = new SolverDomainError({ code: 'seal-key-exists', quantity: 'q', value: 1, allowedRange: '[0, 1]', hint: 'h' });
    // @ts-expect-error a seal error takes only seal- codes
    const notSeal = new SealError({ code: 'out-of-range', message: 'm', hint: 'h' });
    expect([old, typo.code, foreign.code, notSeal.code]).toEqual(['OUT_OF_RANGE', 'front-matter-yml', 'seal-key-exists', 'out-of-range']);
  });

  it('knows a TypeScript diagnostic by its number and nothing else by pattern', () => {
    expect(isDiagnosticCode('type-2322')).toBe(true);
    expect(isDiagnosticCode('type-')).toBe(false);
    expect(isDiagnosticCode('block-OUT_OF_RANGE')).toBe(false);
    expect(isDiagnosticCode('out-of-range')).toBe(true);
  });

  it('has no code that no module raises', () => {
    const sources = sourceFiles(join(import.meta.dirname, '../../src'))
      .filter((path) => !path.endsWith('codes.ts'))
      .map((path) => readFileSync(path, 'utf8'))
      .join('\n');
    const unused = Object.keys(DIAGNOSTIC_CODES).filter((code) => {
      // Codes composed from a prefix and a text problem's code (block-non-finite, inline-output-limit, ...) or the API function's name.
      const composed = /^(block|inline)-(output-limit|text-characters|non-finite)$|^block-(result|criterion)-name$/.test(code);
      return !composed && !sources.includes(`'${code}'`) && !sources.includes(`\`${code}\``);
    });
    expect(unused).toEqual([]);
  });
});
