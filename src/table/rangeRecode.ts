/**
 * Recodes whose rules name ranges of numbers as well as levels (--recode
 * 'age:<18=minor,18-64=adult').
 */
import { usageError } from '../errors.js';
import { compareNatural, isNumericLabel } from './naturalOrder.js';
import { describeRange, parseRangeLabel, rangeContains, rangeOverlap, RangeLabel } from './rangeLabel.js';

/**
 * A recode whose rules may name ranges of numbers as well as levels:
 * `--recode 'age:<18=minor,18-64=adult,>=65=senior'`.
 *
 * Each rule `from=to` is read in this order:
 * - `from` equal to a level (after trimming) renames that level, as plain
 *   recodes always did; this comes first, so a level that happens to look
 *   like a range ("16-24" in an age-band column) is still renamed as a level;
 * - otherwise, when `from` is range-like (rangeLabel.ts: `<18`, `18-64`,
 *   `>=65`, `65+`, `under 18`, a single number), a value that is a number
 *   inside the range gets the label `to`.
 * Ranges may not overlap (a number would have two labels): that is an error
 * naming both rules and a number they share. A numeric value that no rule
 * covers keeps its own label and is reported as uncovered.
 *
 * The labels the rules produce come out in the order of their ranges
 * (minor, adult, senior), not in alphabetical order: `order` lists them.
 */
export interface RangeRecode {
  column: string;
  /** Level renames (every rule, as written). */
  levels: Map<string, string>;
  /** Range rules in the order of their ranges. */
  ranges: { range: RangeLabel; from: string; to: string }[];
  /** Target labels of range rules, ordered by the smallest number each one takes. */
  order: string[];
}

/** Finds the '=' that separates a rule, skipping the one in '<=' and '>='. */
function ruleSeparator(part: string): number {
  for (let i = 0; i < part.length; i++) {
    if (part[i] !== '=') continue;
    const before = part[i - 1];
    if (i > 0 && (before === '<' || before === '>') && part.slice(0, i - 1).trim() === '') continue;
    if (i > 0) return i;
  }
  return -1;
}

/** Parses `column:from=to,from=to`, where a `from` may be a level or a range of numbers. */
export function parseRangeRecode(spec: string, option = '--recode'): RangeRecode {
  const colon = spec.indexOf(':');
  if (colon <= 0) throw usageError(`${option} "${spec}": expected column:from=to[,from=to…]`);
  const column = spec.slice(0, colon).trim();
  const levels = new Map<string, string>();
  const ranges: RangeRecode['ranges'] = [];
  for (const raw of spec.slice(colon + 1).split(',')) {
    const part = raw.trim();
    if (part === '') continue;
    const eq = ruleSeparator(part);
    if (eq <= 0) throw usageError(`${option} "${spec}": "${part}" is not from=to`);
    const from = part.slice(0, eq).trim();
    const to = part.slice(eq + 1).trim();
    if (from === '' || to === '') throw usageError(`${option} "${spec}": "${part}" needs a level or range on both sides of =`);
    levels.set(from, to);
    const range = isNumericLabel(from) ? { lower: Number(from), lowerClosed: true, upper: Number(from), upperClosed: true, unit: '' } : parseRangeLabel(from);
    if (range === null) continue;
    for (const other of ranges) {
      if (other.from === from) continue;
      const shared = rangeOverlap(other.range, range);
      if (shared !== null) {
        throw usageError(`${option} "${spec}": "${other.from}" and "${from}" overlap (both take ${shared}); give each number one rule`);
      }
    }
    const earlier = ranges.findIndex((r) => r.from === from);
    if (earlier >= 0) ranges.splice(earlier, 1);
    ranges.push({ range, from, to });
  }
  if (levels.size === 0) throw usageError(`${option} "${spec}": no from=to pair`);
  ranges.sort((a, b) => (a.range.lower !== b.range.lower ? (a.range.lower < b.range.lower ? -1 : 1) : compareNatural(a.from, b.from)));
  const order: string[] = [];
  for (const r of ranges) if (!order.includes(r.to)) order.push(r.to);
  return { column, levels, ranges, order };
}

export interface RangeRecodeResult {
  /** The label of each value given (values no rule takes keep their own). */
  labels: string[];
  /** Numeric values that no range covers, in natural order. */
  uncovered: string[];
}

/** The label a value gets: its level rule, else the range that holds its number, else itself. */
export function recodeValue(recode: RangeRecode, value: string): { label: string; rule: 'level' | 'range' | 'none' } {
  const renamed = recode.levels.get(value);
  if (renamed !== undefined) return { label: renamed, rule: 'level' };
  if (recode.ranges.length > 0 && isNumericLabel(value)) {
    const x = Number(value);
    for (const r of recode.ranges) if (rangeContains(r.range, x)) return { label: r.to, rule: 'range' };
  }
  return { label: value, rule: 'none' };
}

/** Applies the recode to a column's distinct values (its level dictionary). */
export function applyRangeRecode(recode: RangeRecode, values: readonly string[]): RangeRecodeResult {
  const uncovered: string[] = [];
  const labels = values.map((value) => {
    const result = recodeValue(recode, value);
    if (result.rule === 'none' && recode.ranges.length > 0 && isNumericLabel(value)) uncovered.push(value);
    return result.label;
  });
  return { labels, uncovered: uncovered.sort(compareNatural) };
}

/** One line for values no range covers, naming a few of them. */
export function uncoveredNote(recode: RangeRecode, uncovered: readonly string[]): string | null {
  if (uncovered.length === 0) return null;
  const shown = uncovered.slice(0, 5).map((v) => `"${v}"`).join(', ');
  const more = uncovered.length > 5 ? ` and ${uncovered.length - 5} more` : '';
  const rules = recode.ranges.map((r) => describeRange(r.range)).join('; ');
  return `--recode "${recode.column}": ${shown}${more} fall${uncovered.length === 1 ? 's' : ''} in no range (${rules}) and keep${uncovered.length === 1 ? 's' : ''} ${uncovered.length === 1 ? 'its' : 'their'} own label`;
}

/**
 * The recodes of one column (several --recode options), as one lookup: a
 * Map from level to new label whose `get` also answers for numbers that a
 * range rule takes, so that every reader of recodes (filters, counting,
 * scan, the engine's filters) applies ranges alike. Later options win.
 */
export class RecodeMap extends Map<string, string> {
  private readonly recodes: RangeRecode[] = [];

  static of(recodes: readonly RangeRecode[]): RecodeMap {
    const map = new RecodeMap();
    for (const r of recodes) map.add(r);
    return map;
  }

  add(recode: RangeRecode): void {
    this.recodes.push(recode);
    for (const [from, to] of recode.levels) this.set(from, to);
  }

  override get(value: string): string | undefined {
    const renamed = super.get(value);
    if (renamed !== undefined) return renamed;
    for (let k = this.recodes.length - 1; k >= 0; k--) {
      const result = recodeValue(this.recodes[k], value);
      if (result.rule === 'range') return result.label;
    }
    return undefined;
  }

  /** The labels of range rules in the order of their ranges (the latest option's first). */
  get order(): string[] {
    const order: string[] = [];
    for (let k = this.recodes.length - 1; k >= 0; k--) for (const label of this.recodes[k].order) if (!order.includes(label)) order.push(label);
    return order;
  }
}
