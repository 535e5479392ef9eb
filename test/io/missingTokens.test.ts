// Finding missing-looking values in a file's columns and the note that names them (src/io/missingTokens.ts).
import { describe, expect, it } from 'vitest';
import { detectMissingTokens, missingTokenNotes } from '../../src/io/missingTokens.js';

describe('the missing-token note', () => {
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
  it('says what became of the values: kept beside the bins of a binned column, or looked past in a numeric one', () => {
    const findings = [{ column: 'age', token: 'NA', rows: 3 }];
    expect(missingTokenNotes(findings, () => 'binned')).toEqual([`column "age" holds "NA" (3 rows), a value that commonly means missing; the column's other values are numbers, cut into bins, and it is counted as a level beside the bins unless you pass --missing NA`]);
    expect(missingTokenNotes(findings, () => 'numeric')).toEqual([`column "age" holds "NA" (3 rows), a value that commonly means missing; the column's other values are numbers, so it is read as numeric; --missing NA treats it as missing`]);
  });
  it('quotes a token with an apostrophe for the shell in the suggested option', () => {
    expect(missingTokenNotes([{ column: 'x', token: "N'A", rows: 1 }])[0]).toContain(`--missing 'N'\\''A'`);
  });
});
