// The vocabulary of values that commonly mean missing (src/table/missingLooking.ts).
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { isMissingLooking, MISSING_LOOKING_TOKENS, numericIgnoringTokens } from '../../src/table/missingLooking.js';
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
  it('a numeric column stays numeric when its only non-numbers are such tokens', () => {
    expect(numericIgnoringTokens(['34', 'NA', '51', '-', '.'])).toEqual({ numeric: true, integer: true, tokens: ['NA', '-', '.'] });
    expect(numericIgnoringTokens(['1.5', '#N/A'])).toEqual({ numeric: true, integer: false, tokens: ['#N/A'] });
    expect(numericIgnoringTokens(['34', 'unknown']).numeric).toBe(false);
    expect(numericIgnoringTokens(['NA', '?']).numeric).toBe(false);
  });
});
