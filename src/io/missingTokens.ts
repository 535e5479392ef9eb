/**
 * Values that look like "no value" (the list: table/missingLooking.ts),
 * found per column and reported as notes, never treated as missing unless
 * the user says so.
 */
import { isMissingLooking, MISSING_LOOKING_TOKENS } from '../table/missingLooking.js';
import { EncodedColumn, rowsPerCode } from '../table/encodedColumn.js';
import { shellWord } from '../escape/shell.js';

export interface MissingTokenFinding {
  column: string;
  token: string;
  /** Rows holding the token (weighted rows are still counted as rows). */
  rows: number;
}

export interface ColumnValues {
  name: string;
  /** Distinct (trimmed, non-empty) values. */
  labels: readonly string[];
  /** Rows per value, parallel to labels; absent when only presence is known. */
  counts?: ArrayLike<number>;
}

/** An encoded column as the detector reads it: its labels with their rows where its codes are kept, else the missing-looking values it holds. */
export function encodedValues(column: EncodedColumn): ColumnValues {
  return column.codes ? { name: column.name, labels: column.labels, counts: rowsPerCode(column.codes, column.labels.length).subarray(1) } : { name: column.name, labels: column.missingLooking };
}

/**
 * Which column holds which missing-looking token, and in how many rows
 * (column by column, each column's tokens in the order of the list, so that
 * every way of reading gives the same note). Tokens the user already treats
 * as missing (`declared`) are not reported: they never reach the labels
 * anyway, and the note would be noise.
 */
export function detectMissingTokens(columns: readonly ColumnValues[], declared: ReadonlySet<string> = new Set()): MissingTokenFinding[] {
  const findings: MissingTokenFinding[] = [];
  for (const column of columns) {
    const found: MissingTokenFinding[] = [];
    column.labels.forEach((label, k) => {
      if (isMissingLooking(label) && !declared.has(label)) found.push({ column: column.name, token: label, rows: column.counts ? column.counts[k] : 0 });
    });
    found.sort((a, b) => MISSING_LOOKING_TOKENS.indexOf(a.token) - MISSING_LOOKING_TOKENS.indexOf(b.token));
    findings.push(...found);
  }
  return findings;
}

/**
 * What became of a column's missing-looking values: counted as levels (the
 * default), kept as levels beside the bins its numbers were cut into, or
 * looked past because the column's other values are numbers.
 */
export type TokenTreatment = 'level' | 'binned' | 'numeric';

/**
 * One line per column: the column, its tokens with their rows, what became
 * of them (treatment) and the option that treats them as missing.
 */
export function missingTokenNotes(findings: readonly MissingTokenFinding[], treatment: (column: string) => TokenTreatment = () => 'level'): string[] {
  const byColumn = new Map<string, MissingTokenFinding[]>();
  for (const f of findings) byColumn.set(f.column, [...(byColumn.get(f.column) ?? []), f]);
  const notes: string[] = [];
  for (const [column, list] of byColumn) {
    const named = list.map((f) => (f.rows > 0 ? `"${f.token}" (${f.rows.toLocaleString('en-US')} row${f.rows === 1 ? '' : 's'})` : `"${f.token}"`)).join(', ');
    const option = `--missing ${shellWord(list.map((f) => f.token).join(','))}`;
    const one = list.length === 1;
    const what = one ? 'a value that commonly means' : 'values that commonly mean';
    const happened = {
      level: `counted as ${one ? 'a level' : 'levels'} unless you pass ${option}`,
      binned: `the column's other values are numbers, cut into bins, and ${one ? 'it is counted as a level' : 'these are counted as levels'} beside the bins unless you pass ${option}`,
      numeric: `the column's other values are numbers, so it is read as numeric; ${option} treats ${one ? 'it' : 'them'} as missing`,
    }[treatment(column)];
    notes.push(`column "${column}" holds ${named}, ${what} missing; ${happened}`);
  }
  return notes;
}
