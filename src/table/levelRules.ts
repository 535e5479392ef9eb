/**
 * What a column's value becomes before counting (codebook, recode, --keep-
 * missing), and the level order those rules give.
 */
import { CodebookColumn, codeKey } from './codebook.js';
import { compareNatural, isNumericLabel } from './naturalOrder.js';
import { cutLabel } from './bins.js';

import { MISSING_LEVEL } from './twoWayTable.js';

/**
 * What a value of a column becomes before counting, under the column's
 * codebook entry, its recode and --keep-missing, applied in this order:
 * 1. an empty field (or a --missing value) is missing, reason "empty";
 * 2. the codebook: a missing code is missing with its reason, a labelled
 *    code becomes its label, an unlisted value stays as it is;
 * 2b. cut points (codebook cuts or --cuts): a number becomes its bin's label;
 * 3. --recode: a rule naming the label (or, failing that, the raw code)
 *    renames it; a range rule takes a value that is a number in its range;
 * 4. with --keep-missing, a missing value is a level after all: the missing
 *    code's label (or its reason), or "(missing)" for empty fields.
 */
export interface LevelRules {
  codebook: CodebookColumn | null;
  /** The column's recodes (rangeRecode.ts, RecodeMap): a new label for a value, ranges included. */
  recode: RecodeLookup | null;
  keepMissing: boolean;
  /** Cut points (the codebook's cuts, or --cuts): a number becomes the label of its bin. */
  cuts?: readonly number[] | null;
  /** Whether the cut labels read as whole numbers ("18–24") or not ("18 to <25"): see bins.ts. */
  wholeCuts?: boolean;
}

export interface RecodeLookup {
  get(value: string): string | undefined;
  /** New labels in the order of their ranges. */
  readonly order: readonly string[];
}

/** The level empty fields become with --keep-missing: the table's missing level. */
export const EMPTY_LEVEL = MISSING_LEVEL;
/** The reason of an empty field (or a value named by --missing). */
export const EMPTY_REASON = 'empty';

export type LevelOutcome =
  | { kind: 'level'; label: string; code: string | null; missingReason: string | null }
  | { kind: 'missing'; reason: string };

export function levelOutcome(rules: LevelRules, raw: string | null, codebookIndex = indexCodebook(rules.codebook)): LevelOutcome {
  if (raw === null) return rules.keepMissing ? { kind: 'level', label: EMPTY_LEVEL, code: null, missingReason: EMPTY_REASON } : { kind: 'missing', reason: EMPTY_REASON };
  const entry = codebookIndex.get(codeKey(raw));
  if (entry && entry.missing !== null) {
    return rules.keepMissing ? { kind: 'level', label: entry.label, code: entry.code, missingReason: entry.missing } : { kind: 'missing', reason: entry.missing };
  }
  let label = entry ? entry.label : raw;
  if (!entry && rules.cuts && rules.cuts.length > 0 && isNumericLabel(raw)) label = cutLabel(Number(raw), rules.cuts, rules.wholeCuts ?? false);
  if (rules.recode) {
    const byLabel = rules.recode.get(label);
    if (byLabel !== undefined) label = byLabel;
    else if (label !== raw) label = rules.recode.get(raw) ?? label;
  }
  return { kind: 'level', label, code: entry ? entry.code : null, missingReason: null };
}

interface IndexedCode {
  code: string;
  label: string;
  missing: string | null;
}

/** The codebook's codes by matching key (codebook.ts: codeKey). */
export function indexCodebook(column: CodebookColumn | null): Map<string, IndexedCode> {
  const index = new Map<string, IndexedCode>();
  if (!column) return index;
  for (const v of column.values) index.set(codeKey(v.code), { code: v.code, label: v.label, missing: null });
  for (const m of column.missing) index.set(codeKey(m.code), { code: m.code, label: m.label ?? m.reason, missing: m.reason });
  return index;
}

/**
 * The order of a column's levels: the codebook's (labels of listed codes in
 * listed order, carried through the recode), then the recode's range labels
 * in the order of their ranges, then other levels in natural order, then
 * levels that stand for missing values (--keep-missing), in codebook order
 * and "(missing)" last.
 */
export function levelOrder(rules: LevelRules, levels: readonly string[]): string[] {
  const present = new Set(levels);
  const order: string[] = [];
  const take = (label: string) => {
    if (present.has(label) && !order.includes(label)) order.push(label);
  };
  const index = indexCodebook(rules.codebook);
  const missingLevels = missingLevelLabels(rules);
  if (rules.codebook) {
    for (const v of rules.codebook.values) {
      const outcome = levelOutcome(rules, v.code, index);
      if (outcome.kind === 'level') take(outcome.label);
    }
  }
  for (const label of rules.recode?.order ?? []) take(label);
  const rest = levels.filter((l) => !order.includes(l) && !missingLevels.has(l)).sort(compareNatural);
  order.push(...rest);
  for (const m of rules.codebook?.missing ?? []) take(m.label ?? m.reason);
  take(EMPTY_LEVEL);
  return order;
}

/** The order rows left out are reported in, by reason: the codebook's missing codes in its order, then empty fields. */
export function missingReasonOrder(rules: LevelRules | null): string[] {
  return [...new Set([...(rules?.codebook?.missing ?? []).map((m) => m.reason), EMPTY_REASON])];
}

/** The levels that stand for missing values when --keep-missing keeps them: "(missing)" and the labels (or reasons) of the codebook's missing codes. */
export function missingLevelLabels(rules: LevelRules): Set<string> {
  return new Set<string>([EMPTY_LEVEL, ...(rules.codebook?.missing ?? []).map((m) => m.label ?? m.reason)]);
}

/**
 * How many equal-frequency bins a column is cut into, or null: none when
 * its rules turn its values into other levels (codebook labels, cut points,
 * a recode: they win); else the codebook's bins for the column, else
 * --bins k. (Whether the column's values are numbers is bins.ts's
 * binNumericLevels.)
 */
export function binsOf(rules: LevelRules | null, bins: number | null): number | null {
  if (rules && (rules.recode || (rules.cuts ?? null) !== null || (rules.codebook?.values.length ?? 0) > 0)) return null;
  return rules?.codebook?.bins ?? bins;
}

/**
 * What the codebook says about a side of a table, for the report: the
 * question, whether the column is ordered, and per level the codes that
 * carry it (after the recode; a level no listed code carries gets none).
 * Null when the codebook does not describe the column.
 */
export function codebookFacts(rules: LevelRules, levels: readonly string[]): { question: string | null; ordered: boolean; codes: string[][] } | null {
  const column = rules.codebook;
  if (!column) return null;
  const index = indexCodebook(column);
  const codes = new Map<string, string[]>(levels.map((l) => [l, []]));
  for (const code of [...column.values.map((v) => v.code), ...column.missing.map((m) => m.code)]) {
    const outcome = levelOutcome(rules, code, index);
    if (outcome.kind === 'level') codes.get(outcome.label)?.push(code);
  }
  // Bins of numbers are in order by construction.
  const ordered = column.ordered || column.cuts !== null || column.bins !== null;
  return { question: column.question, ordered, codes: levels.map((l) => codes.get(l) as string[]) };
}
