/**
 * The typed codebook: each column's labels, missing codes and nets, and how
 * a column's values are labelled.
 */
import { compareNatural, isNumericLabel } from './naturalOrder.js';

/**
 * A codebook: what the analyst knows about the columns of a weekly export
 * that the file itself does not say. One typed form, whichever file form it
 * was read from (JSON or CSV, src/io/codebookFile.ts; docs/codebook.md).
 */
export interface Codebook {
  /** The codebook file as given (for messages). */
  file: string;
  title: string | null;
  source: string | null;
  columns: CodebookColumn[];
}

export interface CodebookColumn {
  name: string;
  /** The question as asked, for report headings. */
  question: string | null;
  /** The listed codes are in a meaningful order (an ordered pair gets the ordinal measures). */
  ordered: boolean;
  /** Labelled codes, in level order. */
  values: CodeEntry[];
  /** Codes that mean "no answer", each with its reason. */
  missing: MissingCode[];
  /** Named groups of levels, for the banner tables that report them beside the levels. */
  nets: Net[];
  /** Cut points for a numeric column (bins closed on the left, as --cuts). */
  cuts: number[] | null;
  /** Equal-frequency bins for a numeric column (as --bins). */
  bins: number | null;
  /** A free note for the analyst. */
  note: string | null;
  /** Where the entry is, for messages: "book.csv, line 4" or "book.json at /columns/0". */
  at: string;
}

export interface CodeEntry {
  code: string;
  label: string;
  at: string;
}

export interface MissingCode {
  code: string;
  reason: string;
  /** The level's name with --keep-missing (the reason when absent). */
  label: string | null;
  at: string;
}

export interface Net {
  name: string;
  /** Codes of the column's labelled values. */
  codes: string[];
  at: string;
}

/**
 * How codes are matched to values: the same text, or, when both are
 * numbers, the same number ("1" matches "1.0" and "01": exports write codes
 * both ways). The key is the text for non-numbers and the number otherwise.
 */
export function codeKey(code: string): string {
  return isNumericLabel(code) ? `#${Number(code)}` : `=${code}`;
}

/** What one value of the data becomes under a column's codebook entry. */
export type ValueMeaning =
  | { kind: 'level'; label: string; code: string }
  | { kind: 'missing'; reason: string; label: string; code: string }
  | { kind: 'unlabelled'; label: string };

export interface ColumnLabelling {
  /** The meaning of each value given, in the same order. */
  meanings: ValueMeaning[];
  /**
   * Level order: the labels of the listed codes in codebook order (each
   * label once), then labels of unlabelled values in natural order.
   */
  order: string[];
  /** For each level label, the codes that carry it (several when codes share a label). */
  codesOf: Map<string, string[]>;
  /** Listed codes (labelled or missing) that no value matched: not a mistake, nobody gave that answer. */
  unseen: string[];
  /** Values with no entry in a column that lists labels. */
  unlabelled: string[];
}

/**
 * Applies a column's entry to the column's distinct values (its level
 * dictionary). Missing codes take precedence over labels only in the sense
 * that a code is one or the other (the reader refuses a code listed twice).
 * A column that lists no labelled codes (only missing codes, cuts or bins)
 * keeps its values as they are, and none of them counts as unlabelled.
 */
export function labelColumn(column: CodebookColumn, values: readonly string[]): ColumnLabelling {
  const byKey = new Map<string, ValueMeaning>();
  for (const entry of column.values) byKey.set(codeKey(entry.code), { kind: 'level', label: entry.label, code: entry.code });
  for (const entry of column.missing) byKey.set(codeKey(entry.code), { kind: 'missing', reason: entry.reason, label: entry.label ?? entry.reason, code: entry.code });
  const seen = new Set<string>();
  const unlabelled: string[] = [];
  const codesOf = new Map<string, string[]>();
  const meanings = values.map<ValueMeaning>((value) => {
    const key = codeKey(value);
    const meaning = byKey.get(key);
    if (meaning) {
      seen.add(key);
      return meaning;
    }
    if (column.values.length > 0) unlabelled.push(value);
    return { kind: 'unlabelled', label: value };
  });
  const order: string[] = [];
  for (const entry of column.values) {
    if (!seen.has(codeKey(entry.code))) continue;
    if (!codesOf.has(entry.label)) {
      order.push(entry.label);
      codesOf.set(entry.label, []);
    }
    (codesOf.get(entry.label) as string[]).push(entry.code);
  }
  const rest = [...new Set(meanings.filter((m) => m.kind === 'unlabelled').map((m) => m.label))].filter((l) => !codesOf.has(l)).sort(compareNatural);
  order.push(...rest);
  const unseen = [...column.values.map((e) => e.code), ...column.missing.map((e) => e.code)].filter((code) => !seen.has(codeKey(code)));
  return { meanings, order, codesOf, unseen, unlabelled: unlabelled.sort(compareNatural) };
}

/** The codebook entry of a column, or undefined. */
export function codebookColumn(codebook: Codebook | null | undefined, name: string): CodebookColumn | undefined {
  return codebook?.columns.find((c) => c.name === name);
}

/** Warnings a codebook raises against one week's data (never errors: see docs/codebook.md). */
export interface CodebookWarning {
  code: 'code-not-seen' | 'unlabelled-value';
  column: string;
  message: string;
}

function listed(items: readonly string[]): string {
  const shown = items.slice(0, 8).map((v) => `"${v}"`).join(', ');
  return items.length > 8 ? `${shown} and ${items.length - 8} more` : shown;
}

export function labellingWarnings(column: CodebookColumn, labelling: ColumnLabelling, file: string): CodebookWarning[] {
  const warnings: CodebookWarning[] = [];
  if (labelling.unseen.length > 0) {
    const n = labelling.unseen.length;
    warnings.push({
      code: 'code-not-seen',
      column: column.name,
      message: `${file}: code${n === 1 ? '' : 's'} ${listed(labelling.unseen)} of "${column.name}" ${n === 1 ? 'does' : 'do'} not occur in the data (no row gave ${n === 1 ? 'that answer' : 'those answers'})`,
    });
  }
  if (labelling.unlabelled.length > 0) {
    const n = labelling.unlabelled.length;
    warnings.push({
      code: 'unlabelled-value',
      column: column.name,
      message: `"${column.name}" holds ${listed(labelling.unlabelled)}, which ${file} does not label; ${n === 1 ? 'it stays a level of its own' : 'they stay levels of their own'}, after the labelled ones`,
    });
  }
  return warnings;
}
