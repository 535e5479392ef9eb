/**
 * Waves and their order: the date, week, month, year or number a wave's
 * file name (or period level) carries, the order it gives, and the scores
 * on which a trend over the waves is measured.
 *
 * What counts as a key, tried in this order on a file's base name (the
 * directories and the extensions .csv, .tsv, .txt, .gz, .parquet left out);
 * the last match in the name wins:
 *   date   2026-01-05, 2026_01_05, 2026.01.05 or 20260105 (a real calendar day)
 *   week   2026-W05 or 2026W05 (ISO 8601 week; W in either case; a real week of that year)
 *   month  2026-01, 2026_01 or 2026.01 (not followed by a day)
 *   number the last run of digits (all numbers of the waves 1800–2199 with four
 *          digits: years)
 * A period level (one file with a period column) is a key only as a whole:
 * "2026-01-05", "2026-W05", "2026-01", "1974", "3".
 *
 * Dated keys (date, week, month, year) place a wave in time, in years, so
 * that a trend is measured per year: a date (and a week, at its Monday) in
 * years of 365.2425 days counted from 1970-01-01, a month as year + (month −
 * 1)/12, a year as itself; other waves are evenly spaced, one unit per wave.
 */
import { compareNatural } from './naturalOrder.js';

export type WaveKeyKind = 'date' | 'week' | 'month' | 'year' | 'number';

export interface WaveKey {
  kind: WaveKeyKind;
  /** The key as written in the name or level ("2026-W05", "20260105", "12"). */
  text: string;
  /** A value that orders keys of one kind. */
  order: number;
  /** Decimal years (dated kinds), null for plain numbers. */
  time: number | null;
}

const DAY_MS = 86_400_000;
const YEAR_DAYS = 365.2425;

/** Decimal years of a calendar day (UTC), in years of 365.2425 days from 1970-01-01. */
export function decimalYear(year: number, month: number, day: number): number {
  return 1970 + Date.UTC(year, month - 1, day) / DAY_MS / YEAR_DAYS;
}

function isCalendarDay(year: number, month: number, day: number): boolean {
  if (month < 1 || month > 12 || day < 1) return false;
  const date = new Date(Date.UTC(year, month - 1, day));
  return date.getUTCFullYear() === year && date.getUTCMonth() === month - 1 && date.getUTCDate() === day;
}

/** The Monday of ISO week `week` of `year` (ISO 8601: week 1 holds the year's first Thursday), or null for a week the year does not have. */
export function isoWeekMonday(year: number, week: number): { year: number; month: number; day: number } | null {
  if (week < 1 || week > 53) return null;
  const jan4 = Date.UTC(year, 0, 4);
  const jan4Weekday = (new Date(jan4).getUTCDay() + 6) % 7; // Monday 0
  const monday = new Date(jan4 - jan4Weekday * DAY_MS + (week - 1) * 7 * DAY_MS);
  // A 53rd week exists only when its Thursday still falls in `year`.
  const thursday = new Date(monday.getTime() + 3 * DAY_MS);
  if (thursday.getUTCFullYear() !== year) return null;
  return { year: monday.getUTCFullYear(), month: monday.getUTCMonth() + 1, day: monday.getUTCDate() };
}

interface Pattern {
  kind: Exclude<WaveKeyKind, 'number' | 'year'>;
  regex: RegExp;
  read(m: RegExpExecArray): WaveKey | null;
}

const PATTERNS: Pattern[] = [
  {
    kind: 'date',
    regex: /(?<!\d)(\d{4})([-_.]?)(\d{2})\2(\d{2})(?!\d)/g,
    read: (m) => {
      const [y, mo, d] = [Number(m[1]), Number(m[3]), Number(m[4])];
      if (!isCalendarDay(y, mo, d)) return null;
      const time = decimalYear(y, mo, d);
      return { kind: 'date', text: m[0], order: time, time };
    },
  },
  {
    kind: 'week',
    regex: /(?<!\d)(\d{4})-?[Ww](\d{1,2})(?!\d)/g,
    read: (m) => {
      const monday = isoWeekMonday(Number(m[1]), Number(m[2]));
      if (monday === null) return null;
      const time = decimalYear(monday.year, monday.month, monday.day);
      return { kind: 'week', text: m[0], order: time, time };
    },
  },
  {
    kind: 'month',
    regex: /(?<!\d)(\d{4})[-_.](\d{2})(?![-_.]?\d)/g,
    read: (m) => {
      const [y, mo] = [Number(m[1]), Number(m[2])];
      if (mo < 1 || mo > 12) return null;
      const time = y + (mo - 1) / 12;
      return { kind: 'month', text: m[0], order: time, time };
    },
  },
];

/** The last match of a pattern in a text that reads as a valid key. */
function lastMatch(pattern: Pattern, text: string): WaveKey | null {
  let found: WaveKey | null = null;
  pattern.regex.lastIndex = 0;
  for (let m = pattern.regex.exec(text); m !== null; m = pattern.regex.exec(text)) found = pattern.read(m) ?? found;
  return found;
}

/** A file's base name without its directories and data extensions. */
export function baseName(path: string): string {
  const name = path.split(/[\\/]/).pop() ?? path;
  return name.replace(/(\.(csv|tsv|txt|gz|gzip|parquet|parq|pq))+$/i, '');
}

/** The key a file name carries (see the module comment), or null. */
export function keyOfName(path: string): WaveKey | null {
  const name = baseName(path);
  for (const pattern of PATTERNS) {
    const key = lastMatch(pattern, name);
    if (key !== null) return key;
  }
  const numbers = name.match(/\d+/g);
  if (!numbers) return null;
  const text = numbers[numbers.length - 1];
  return { kind: 'number', text, order: Number(text), time: null };
}

/** The key a period level is, as a whole, or null (the level is then ordered naturally and the waves evenly spaced). */
export function keyOfLevel(level: string): WaveKey | null {
  const text = level.trim();
  for (const pattern of PATTERNS) {
    const key = lastMatch(pattern, text);
    if (key !== null && key.text === text) return key;
  }
  if (/^\d+$/.test(text)) return { kind: 'number', text, order: Number(text), time: null };
  return null;
}

/**
 * Plain numbers that are all four-digit numbers from 1800 to 2199 are read
 * as years (1 January of each); other keys are left as they are.
 */
export function readYears(keys: readonly (WaveKey | null)[]): (WaveKey | null)[] {
  const numbers = keys.every((k) => k !== null && k.kind === 'number');
  if (!numbers || !keys.every((k) => /^\d{4}$/.test(k!.text) && k!.order >= 1800 && k!.order < 2200)) return [...keys];
  return keys.map((k) => ({ kind: 'year', text: k!.text, order: k!.order, time: k!.order }));
}

export type WaveOrderMode = 'auto' | 'names' | 'given';

export interface WaveOrder {
  /** Positions of the inputs in wave order. */
  order: number[];
  /** 'names': sorted by the keys in the file names; 'given': as given. */
  by: 'names' | 'given';
  /** The kind of key every wave carries (after readYears), or null when some wave has none. */
  kind: WaveKeyKind | null;
  /** The keys, in input order. */
  keys: (WaveKey | null)[];
}

/** The problem that keeps file names from ordering the waves, or null. */
function namesProblem(paths: readonly string[], keys: readonly (WaveKey | null)[]): string | null {
  const without = paths.filter((_p, k) => keys[k] === null);
  if (without.length > 0) return `${without[0]} has no date, week or number in its name`;
  const kinds = [...new Set(keys.map((k) => k!.kind))];
  if (kinds.length > 1) {
    const first = paths[keys.findIndex((k) => k!.kind === kinds[0])];
    const other = paths[keys.findIndex((k) => k!.kind === kinds[1])];
    return `the names mix kinds of key (${first}: ${kinds[0]}, ${other}: ${kinds[1]})`;
  }
  const seen = new Map<number, number>();
  for (let k = 0; k < keys.length; k++) {
    const earlier = seen.get(keys[k]!.order);
    if (earlier !== undefined) return `${paths[earlier]} and ${paths[k]} carry the same ${keys[k]!.kind} (${keys[k]!.text})`;
    seen.set(keys[k]!.order, k);
  }
  return null;
}

/**
 * The order of waves given as files: with 'names' sorted by the keys in
 * their names (every name must carry one, all of one kind, no two alike:
 * otherwise `problem` explains and the caller refuses); with 'given' as
 * given; with 'auto' by the names when every name carries a key, else as
 * given (a collision or a mix of kinds is still a problem: the names were
 * meant to order the waves and cannot).
 */
export function orderOfFiles(paths: readonly string[], mode: WaveOrderMode): WaveOrder & { problem: string | null } {
  const keys = readYears(paths.map(keyOfName));
  const allKeyed = keys.every((k) => k !== null);
  const kinds = new Set(keys.filter((k) => k !== null).map((k) => k!.kind));
  const kind = allKeyed && kinds.size === 1 ? [...kinds][0] : null;
  const given = { order: paths.map((_p, k) => k), by: 'given' as const, kind, keys, problem: null };
  if (mode === 'given' || (mode === 'auto' && !allKeyed)) return given;
  const problem = namesProblem(paths, keys);
  if (problem !== null) return { ...given, problem };
  const order = paths.map((_p, k) => k).sort((a, b) => keys[a]!.order - keys[b]!.order);
  return { order, by: 'names', kind, keys, problem: null };
}

/** Period levels in natural order, or in the order listed. */
export function orderOfLevels(levels: readonly string[], listed?: readonly string[], codebookOrder = false): { levels: string[]; by: 'natural' | 'listed' | 'codebook'; kind: WaveKeyKind | null; keys: (WaveKey | null)[] } {
  const ordered = listed ? [...listed] : codebookOrder ? [...levels] : [...levels].sort(compareNatural);
  const keys = readYears(ordered.map(keyOfLevel));
  const kinds = new Set(keys.map((k) => k?.kind ?? null));
  const kind = kinds.size === 1 && !kinds.has(null) ? ([...kinds][0] as WaveKeyKind) : null;
  return { levels: ordered, by: listed ? 'listed' : codebookOrder ? 'codebook' : 'natural', kind, keys };
}

export type Spacing = 'auto' | 'even';

export interface WaveScores {
  /** One score per wave, in wave order: decimal years for dated waves, else 0, 1, 2, … */
  values: number[];
  /** What one unit of score is: a year, or one wave. */
  unit: 'year' | 'wave';
}

/**
 * The scores of the waves for a trend: their time in years when every wave
 * carries a dated key of one kind (and spacing is 'auto'), else their
 * positions 0, 1, …, K−1 (evenly spaced).
 */
export function waveScores(keys: readonly (WaveKey | null)[], kind: WaveKeyKind | null, spacing: Spacing): WaveScores {
  const dated = spacing === 'auto' && kind !== null && kind !== 'number' && keys.every((k) => k !== null && k.time !== null);
  if (dated) return { values: keys.map((k) => k!.time as number), unit: 'year' };
  return { values: keys.map((_k, i) => i), unit: 'wave' };
}
