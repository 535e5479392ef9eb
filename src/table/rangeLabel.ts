/**
 * Range-like labels: the way exports write a numeric interval as text
 * ("<12", "12-15", "16", ">16", "65+", "under 18", "18 to 24 years",
 * "$10,000-$19,999", "75 and over"). A label is read as an interval on the
 * number line, so that levels can be put in the order of their numbers and
 * a recode can say which numbers a rule takes.
 *
 * The grammar (common practice in survey and census tables; no single source):
 * - a number: digits with an optional decimal part, thousands written in
 *   groups of three with commas ("10,000"), an optional currency sign before
 *   it ($ € £ ¥), an optional "k" for thousands after it ("$10k"), a sign
 *   where a number can start ("-5", "< -5");
 * - unit words after a number ("yrs", "years old", "%", "hours/week") are
 *   kept apart as the unit; a word before the first number makes the label
 *   not range-like ("item 2", "Q3" are names, not ranges);
 * - the forms:
 *     a                                      [a, a]
 *     a-b, a–b, a to b, a through b, a..b,
 *       from a to b, between a and b         [a, b]   (needs a ≤ b)
 *     a to under b, a to <b, a-<b,
 *       a to less than b                     [a, b)   (needs a < b)
 *     <a, under a, below a, less than a,
 *       fewer than a, younger than a,
 *       none or less than a                  (−∞, a)
 *     <=a, ≤a, up to a, at most a,
 *       a or less, a or fewer, a and under,
 *       a and below, a or younger            (−∞, a]
 *     >a, over a, above a, more than a,
 *       greater than a, older than a         (a, ∞)
 *     >=a, ≥a, a+, a plus, at least a,
 *       a or more, a and over, a and above,
 *       a or older, a and older, a or over   [a, ∞)
 * Anything else (a comma or bracket outside a number, an unknown joining
 * word, a reversed range such as "2024-06") is not range-like.
 */
export interface RangeLabel {
  lower: number;
  lowerClosed: boolean;
  upper: number;
  upperClosed: boolean;
  /** Unit words after the numbers, lower-cased and joined by one space ('' when none). */
  unit: string;
}

type Token = { kind: 'number'; value: number } | { kind: 'op'; text: string } | { kind: 'word'; text: string };

const NUMBER_AT = /(?:[$€£¥]\s?)?(?:\d{1,3}(?:,\d{3})+(?:\.\d+)?|\d+(?:\.\d+)?|\.\d+)(?:k(?![\p{L}]))?/uy;
const WORD_AT = /[\p{L}%°'’/][\p{L}\p{M}%°'’/.]*/uy;
const SPACE = /\s/u;
const DIGIT = /[0-9]/;

/** Words that join numbers; every other word after a number is a unit. */
const PHRASES: [string[], string][] = [
  [['up', 'to'], '<='],
  [['at', 'most'], '<='],
  [['no', 'more', 'than'], '<='],
  [['at', 'least'], '>='],
  [['less', 'than'], '<'],
  [['fewer', 'than'], '<'],
  [['younger', 'than'], '<'],
  [['lower', 'than'], '<'],
  [['more', 'than'], '>'],
  [['greater', 'than'], '>'],
  [['older', 'than'], '>'],
  [['higher', 'than'], '>'],
  [['or', 'more'], '+'],
  [['or', 'over'], '+'],
  [['and', 'over'], '+'],
  [['and', 'above'], '+'],
  [['or', 'above'], '+'],
  [['or', 'older'], '+'],
  [['and', 'older'], '+'],
  [['or', 'greater'], '+'],
  [['or', 'higher'], '+'],
  [['plus'], '+'],
  [['or', 'less'], 'LE'],
  [['or', 'fewer'], 'LE'],
  [['and', 'under'], 'LE'],
  [['and', 'below'], 'LE'],
  [['or', 'under'], 'LE'],
  [['or', 'below'], 'LE'],
  [['or', 'younger'], 'LE'],
  [['and', 'younger'], 'LE'],
  [['under'], '<'],
  [['below'], '<'],
  [['over'], '>'],
  [['above'], '>'],
  [['to'], '-'],
  [['through'], '-'],
  [['thru'], '-'],
  [['none', 'or'], 'none or'],
  [['between'], 'between'],
  [['and'], 'and'],
  [['from'], 'from'],
];
const JOINING = new Set(PHRASES.flatMap(([words]) => words));

function numberValue(text: string): number {
  let t = text.replace(/^[$€£¥]\s?/u, '').replace(/,/g, '');
  let scale = 1;
  if (t.endsWith('k')) {
    scale = 1000;
    t = t.slice(0, -1);
  }
  return Number(t) * scale;
}

function tokenize(label: string): Token[] | null {
  const text = label.toLowerCase();
  const tokens: Token[] = [];
  let i = 0;
  const previousIsValue = () => {
    const last = tokens[tokens.length - 1];
    return last !== undefined && (last.kind === 'number' || (last.kind === 'word' && !JOINING.has(last.text)));
  };
  while (i < text.length) {
    const ch = text[i];
    if (SPACE.test(ch)) {
      i++;
      continue;
    }
    // A sign belongs to a number where a number can start.
    if ((ch === '-' || ch === '+' || ch === '−') && !previousIsValue()) {
      NUMBER_AT.lastIndex = i + 1;
      const m = NUMBER_AT.exec(text);
      if (m) {
        const value = numberValue(m[0]);
        tokens.push({ kind: 'number', value: ch === '+' ? value : -value });
        i = NUMBER_AT.lastIndex;
        continue;
      }
    }
    NUMBER_AT.lastIndex = i;
    const number = NUMBER_AT.exec(text);
    if (number) {
      tokens.push({ kind: 'number', value: numberValue(number[0]) });
      i = NUMBER_AT.lastIndex;
      continue;
    }
    const two = text.slice(i, i + 2);
    if (two === '<=' || two === '>=' || two === '..') {
      tokens.push({ kind: 'op', text: two === '..' ? '-' : two });
      i += 2;
      continue;
    }
    if ('<>≤≥+-–—−'.includes(ch)) {
      const op = ch === '≤' ? '<=' : ch === '≥' ? '>=' : ch === '–' || ch === '—' || ch === '−' ? '-' : ch;
      tokens.push({ kind: 'op', text: op });
      i++;
      continue;
    }
    WORD_AT.lastIndex = i;
    const word = WORD_AT.exec(text);
    if (word) {
      tokens.push({ kind: 'word', text: word[0].replace(/\.$/, '') });
      i = WORD_AT.lastIndex;
      continue;
    }
    return null;
  }
  return tokens;
}

interface Shape {
  pattern: string;
  numbers: number[];
  unit: string;
}

/** Replaces joining phrases by their operator and sets unit words aside. */
function shapeOf(tokens: Token[]): Shape | null {
  const parts: string[] = [];
  const numbers: number[] = [];
  const units: string[] = [];
  let seenNumber = false;
  let k = 0;
  while (k < tokens.length) {
    const token = tokens[k];
    if (token.kind === 'number') {
      parts.push('N');
      numbers.push(token.value);
      seenNumber = true;
      k++;
      continue;
    }
    if (token.kind === 'op') {
      parts.push(token.text);
      k++;
      continue;
    }
    const phrase = PHRASES.find(([words]) => words.every((w, j) => {
      const t = tokens[k + j];
      return t !== undefined && t.kind === 'word' && t.text === w;
    }));
    if (phrase) {
      parts.push(phrase[1]);
      k += phrase[0].length;
      continue;
    }
    // A unit word: only after a number (and after other unit words).
    const previous = tokens[k - 1];
    if (!seenNumber || previous === undefined || previous.kind === 'op') return null;
    if (previous.kind === 'word' && JOINING.has(previous.text)) return null;
    if (!units.includes(token.text)) units.push(token.text);
    k++;
  }
  if (numbers.length === 0) return null;
  return { pattern: parts.join(' '), numbers, unit: units.join(' ') };
}

function interval(lower: number, lowerClosed: boolean, upper: number, upperClosed: boolean, unit: string): RangeLabel | null {
  if (!Number.isFinite(lower) && !Number.isFinite(upper)) return null;
  if (Number.isNaN(lower) || Number.isNaN(upper)) return null;
  if (lower > upper || (lower === upper && !(lowerClosed && upperClosed))) return null;
  return { lower, lowerClosed, upper, upperClosed, unit };
}

/** The interval a range-like label stands for, or null when the label is not range-like. */
export function parseRangeLabel(label: string): RangeLabel | null {
  if (label.length > 80) return null;
  // Every range has a number, and a number an ASCII digit: a label without
  // one is not range-like, known without the word patterns (whose Unicode
  // classes V8 compiles on their first use, a visible part of a run on a
  // small file; README, Speed).
  if (!DIGIT.test(label)) return null;
  const tokens = tokenize(label.trim());
  if (tokens === null || tokens.length === 0) return null;
  const shape = shapeOf(tokens);
  if (shape === null) return null;
  const [a, b] = shape.numbers;
  const u = shape.unit;
  switch (shape.pattern) {
    case 'N':
      return interval(a, true, a, true, u);
    case 'N - N':
    case 'from N - N':
    case 'between N and N':
      return interval(a, true, b, true, u);
    case 'N - < N':
    case 'from N - < N':
      return interval(a, true, b, false, u);
    case '< N':
    case 'none or < N':
      return interval(-Infinity, false, a, false, u);
    case '<= N':
    case 'none or <= N':
    case 'N LE':
      return interval(-Infinity, false, a, true, u);
    case '> N':
      return interval(a, false, Infinity, false, u);
    case '>= N':
    case 'N +':
      return interval(a, true, Infinity, false, u);
    default:
      return null;
  }
}

/** Whether a number lies in the interval. */
export function rangeContains(range: RangeLabel, x: number): boolean {
  const aboveLower = range.lowerClosed ? x >= range.lower : x > range.lower;
  const belowUpper = range.upperClosed ? x <= range.upper : x < range.upper;
  return aboveLower && belowUpper;
}

/** A number that two intervals share, or null when they do not overlap. */
export function rangeOverlap(a: RangeLabel, b: RangeLabel): number | null {
  // The overlap runs from the larger lower bound to the smaller upper bound;
  // a shared bound is in it only when both intervals hold it.
  const lower = Math.max(a.lower, b.lower);
  const lowerClosed = (a.lower < lower || a.lowerClosed) && (b.lower < lower || b.lowerClosed);
  const upper = Math.min(a.upper, b.upper);
  const upperClosed = (a.upper > upper || a.upperClosed) && (b.upper > upper || b.upperClosed);
  if (lower > upper) return null;
  if (lower === upper) return lowerClosed && upperClosed ? lower : null;
  if (lowerClosed && Number.isFinite(lower)) return lower;
  if (upperClosed && Number.isFinite(upper)) return upper;
  if (!Number.isFinite(lower)) return upper - 1;
  if (!Number.isFinite(upper)) return lower + 1;
  return (lower + upper) / 2;
}

/** Orders two intervals: lower bound first (closed before open), then upper bound (open before closed). */
export function compareRanges(a: RangeLabel, b: RangeLabel): number {
  if (a.lower !== b.lower) return a.lower < b.lower ? -1 : 1;
  if (a.lowerClosed !== b.lowerClosed) return a.lowerClosed ? -1 : 1;
  if (a.upper !== b.upper) return a.upper < b.upper ? -1 : 1;
  if (a.upperClosed !== b.upperClosed) return a.upperClosed ? 1 : -1;
  return 0;
}

/** How an interval is written back, for messages: "60", "18 to 64", "under 18", "65 or more". */
export function describeRange(range: RangeLabel): string {
  const f = (x: number) => String(x);
  if (range.lower === range.upper) return f(range.lower);
  if (!Number.isFinite(range.lower)) return `${range.upperClosed ? 'at most' : 'under'} ${f(range.upper)}`;
  if (!Number.isFinite(range.upper)) return range.lowerClosed ? `${f(range.lower)} or more` : `over ${f(range.lower)}`;
  return `${range.lowerClosed ? '' : 'over '}${f(range.lower)} to ${range.upperClosed ? '' : 'under '}${f(range.upper)}`;
}
