/**
 * The natural order of level labels, the same on every machine: numbers and
 * ranges by value, digit runs by value, the rest by code point.
 */
import { compareRanges, parseRangeLabel, RangeLabel } from './rangeLabel.js';

/**
 * Natural order for level labels, the same on every machine (no locale).
 * The rule, in order:
 * 1. Labels that are numbers or range-like (rangeLabel.ts: "16", "<12",
 *    "12-15 yrs", ">16", "65+", "under 18", "$10,000-$19,999") come first,
 *    ordered as intervals on the number line: by lower bound (−∞ for "<12"),
 *    a closed bound before an open one ("16" before ">16"), then by upper
 *    bound ("<12" before "<=12"), then by unit ("16" before "16 yrs"), then
 *    by code point. So `<12 yrs` < `12-15 yrs` < `16 yrs` < `>16 yrs`, and
 *    `under 18` < `18-24` < `65+`.
 * 2. Other labels follow, compared run by run: digit runs by their numeric
 *    value ("item 2" before "item 10"), other runs by Unicode code point.
 * 3. Full ties fall back to code point order of the whole label.
 */
const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

export function compareCodePoints(a: string, b: string): number {
  const n = Math.min(a.length, b.length);
  for (let i = 0; i < n; i++) {
    const x = a.codePointAt(i) as number;
    const y = b.codePointAt(i) as number;
    if (x !== y) return x < y ? -1 : 1;
    if (x > 0xffff) i++;
  }
  return a.length === b.length ? 0 : a.length < b.length ? -1 : 1;
}

function compareDigitRuns(a: string, b: string): number {
  const x = a.replace(/^0+(?=\d)/, '');
  const y = b.replace(/^0+(?=\d)/, '');
  if (x.length !== y.length) return x.length < y.length ? -1 : 1;
  return x < y ? -1 : x > y ? 1 : 0;
}

const RUN = /\d+|\D+/g;

const NOT_RANGE = null;
/** Parsed labels, kept for the sorts of one table (cleared when it grows large). */
const rangeCache = new Map<string, RangeLabel | null>();

/** A label as an interval: numbers are the point [x, x]; null when the label is neither number nor range-like. */
export function rangeKey(label: string): RangeLabel | null {
  let key = rangeCache.get(label);
  if (key !== undefined) return key;
  if (NUMBER.test(label)) {
    const x = Number(label);
    key = Number.isFinite(x) ? { lower: x, lowerClosed: true, upper: x, upperClosed: true, unit: '' } : NOT_RANGE;
  } else key = parseRangeLabel(label);
  if (rangeCache.size >= 100_000) rangeCache.clear();
  rangeCache.set(label, key);
  return key;
}

export function compareNatural(a: string, b: string): number {
  if (NUMBER.test(a) && NUMBER.test(b)) {
    const d = Number(a) - Number(b);
    if (d !== 0) return d < 0 ? -1 : 1;
    return compareCodePoints(a, b);
  }
  const rangeA = rangeKey(a);
  const rangeB = rangeKey(b);
  if (rangeA !== null && rangeB !== null) {
    const d = compareRanges(rangeA, rangeB);
    if (d !== 0) return d;
    if (rangeA.unit !== rangeB.unit) return compareCodePoints(rangeA.unit, rangeB.unit);
    return compareCodePoints(a, b);
  }
  if ((rangeA === null) !== (rangeB === null)) return rangeA !== null ? -1 : 1;
  const runsA = a.match(RUN) ?? [];
  const runsB = b.match(RUN) ?? [];
  const n = Math.min(runsA.length, runsB.length);
  for (let i = 0; i < n; i++) {
    const x = runsA[i];
    const y = runsB[i];
    const xDigits = x.charCodeAt(0) >= 48 && x.charCodeAt(0) <= 57;
    const yDigits = y.charCodeAt(0) >= 48 && y.charCodeAt(0) <= 57;
    const d = xDigits && yDigits ? compareDigitRuns(x, y) : compareCodePoints(x, y);
    if (d !== 0) return d;
  }
  if (runsA.length !== runsB.length) return runsA.length < runsB.length ? -1 : 1;
  return compareCodePoints(a, b);
}

export function isNumericLabel(value: string): boolean {
  return NUMBER.test(value);
}
