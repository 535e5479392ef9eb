import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { detectMissingTokens, isMissingLooking, MISSING_LOOKING_TOKENS, missingTokenNotes, numericIgnoringTokens } from '../../src/io/missingTokens.js';
import { ROOT } from '../helpers.js';

describe('missing-looking tokens', () => {
  it('include every default missing marker of the pandas CSV reader (recorded by scripts/record_missing_tokens.py), apart from the empty field, which is always missing', () => {
    const recorded = JSON.parse(readFileSync(join(ROOT, 'fixtures', 'reference', 'missing-tokens.json'), 'utf8')) as { tokens: string[] };
    for (const token of recorded.tokens.filter((t) => t !== '')) expect(MISSING_LOOKING_TOKENS).toContain(token);
  });
  it('add the marks of common practice (".", "-", "?", spreadsheet errors) and match exactly, case as written', () => {
    for (const token of ['.', '-', '--', '?', '#NULL!', 'missing']) expect(isMissingLooking(token)).toBe(true);
    for (const value of ['None', 'Na', 'none', '0', 'no', 'N', ' NA']) expect(isMissingLooking(value)).toBe(false);
  });
  it('says which column holds which token in how many rows, leaving out tokens already declared missing', () => {
    const findings = detectMissingTokens(
      [
        { name: 'age', labels: ['34', 'NA', '51', '.'], counts: [10, 3, 7, 1] },
        { name: 'answer', labels: ['yes', 'no', 'n/a'], counts: [5, 6, 2] },
        { name: 'region', labels: ['north', 'south'], counts: [1, 1] },
      ],
      new Set(['n/a']),
    );
    expect(findings).toEqual([
      { column: 'age', token: 'NA', rows: 3 },
      { column: 'age', token: '.', rows: 1 },
    ]);
    expect(missingTokenNotes(findings)).toEqual([`column "age" holds "NA" (3 rows), "." (1 row), values that commonly mean missing; counted as levels unless you pass --missing NA,.`]);
  });
  it('quotes a token with an apostrophe for the shell in the suggested option', () => {
    expect(missingTokenNotes([{ column: 'x', token: "N'A", rows: 1 }])[0]).toContain(`--missing 'N'\\''A'`);
  });
  it('a numeric column stays numeric when its only non-numbers are such tokens', () => {
    expect(numericIgnoringTokens(['34', 'NA', '51', '-', '.'])).toEqual({ numeric: true, integer: true, tokens: ['NA', '-', '.'] });
    expect(numericIgnoringTokens(['1.5', '#N/A'])).toEqual({ numeric: true, integer: false, tokens: ['#N/A'] });
    expect(numericIgnoringTokens(['34', 'unknown']).numeric).toBe(false);
    expect(numericIgnoringTokens(['NA', '?']).numeric).toBe(false);
  });
});
