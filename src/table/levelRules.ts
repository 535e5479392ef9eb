/**
 * What a column's value becomes before counting (codebook, recode, --keep-
 * missing), and the level order those rules give.
 */
import { CodebookColumn, codeKey } from './codebook.js';
import { compareNatural } from './naturalOrder.js';
import { RangeRecode, recodeValue } from './rangeRecode.js';
import { MISSING_LEVEL } from './twoWayTable.js';

/**
 * What a value of a column becomes before counting, under the column's
 * codebook entry, its recode and --keep-missing, applied in this order:
 * 1. an empty field (or a --missing value) is missing, reason "empty";
 * 2. the codebook: a missing code is missing with its reason, a labelled
 *    code becomes its label, an unlisted value stays as it is;
 * 3. --recode: a rule naming the label (or, failing that, the raw code)
 *    renames it; a range rule takes a value that is a number in its range;
 * 4. with --keep-missing, a missing value is a level after all: the missing
 *    code's label (or its reason), or "(missing)" for empty fields.
 */
export interface LevelRules {
  codebook: CodebookColumn | null;
  recode: RangeRecode | null;
  keepMissing: boolean;
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
  if (rules.recode) {
    const byLabel = recodeValue(rules.recode, label);
    if (byLabel.rule !== 'none') label = byLabel.label;
    else if (label !== raw) label = recodeValue(rules.recode, raw).label;
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
  const missingLevels = new Set<string>([EMPTY_LEVEL]);
  if (rules.codebook) {
    for (const v of rules.codebook.values) {
      const outcome = levelOutcome(rules, v.code, index);
      if (outcome.kind === 'level') take(outcome.label);
    }
    for (const m of rules.codebook.missing) missingLevels.add(m.label ?? m.reason);
  }
  for (const label of rules.recode?.order ?? []) take(label);
  const rest = levels.filter((l) => !order.includes(l) && !missingLevels.has(l)).sort(compareNatural);
  order.push(...rest);
  for (const m of rules.codebook?.missing ?? []) take(m.label ?? m.reason);
  take(EMPTY_LEVEL);
  return order;
}
