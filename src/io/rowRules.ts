/**
 * The rules a row passes before counting: --where filters, --recode
 * mappings, and the row's weight or frequency (RowGate).
 */
import { dataError, usageError } from '../errors.js';
import { isNumericLabel } from '../table/naturalOrder.js';
import { parseRangeRecode, RangeRecode, RecodeMap } from '../table/rangeRecode.js';
import { indexCodebook, LevelOutcome, levelOutcome, LevelRules } from '../table/levelRules.js';
import { rangeContains } from '../table/rangeLabel.js';
import { editDistance } from './columns.js';

/** `--where 'column=v1,v2'` keeps rows whose value is one of the values; `'column!=v'` drops them. */
export interface WhereClause {
  column: string;
  negate: boolean;
  values: Set<string>;
  text: string;
}

/**
 * `--recode 'column:from=to,from=to'` renames or merges levels before
 * counting; a `from` may also be a range of numbers (`<18`, `18-64`,
 * `>=65`: table/rangeRecode.ts).
 */
export interface Recode {
  column: string;
  /** Level renames, every rule as written. */
  mapping: Map<string, string>;
  /** The rules, ranges included. */
  rules: RangeRecode;
}

export function parseWhere(spec: string): WhereClause {
  const match = /^([^!=]+?)\s*(!=|=)\s*(.*)$/s.exec(spec);
  if (!match || match[1].trim() === '') throw usageError(`--where "${spec}": expected column=value[,value…] or column!=value[,value…]`);
  const values = match[3].split(',').map((v) => v.trim()).filter((v) => v !== '');
  if (values.length === 0) throw usageError(`--where "${spec}": no value after ${match[2]}`);
  return { column: match[1].trim(), negate: match[2] === '!=', values: new Set(values), text: spec };
}

export function parseRecode(spec: string): Recode {
  const rules = parseRangeRecode(spec);
  return { column: rules.column, mapping: rules.levels, rules };
}

/** Joins several --recode options for the same column into one lookup (later ones win; ranges answer too). */
export function recodesByColumn(recodes: readonly Recode[]): Map<string, RecodeMap> {
  const out = new Map<string, RecodeMap>();
  for (const r of recodes) {
    const existing = out.get(r.column) ?? new RecodeMap();
    existing.add(r.rules);
    out.set(r.column, existing);
  }
  return out;
}

const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

export type WeightKind = 'weight' | 'freq';

/**
 * Parses a weight or frequency field. Weights must be finite and ≥ 0;
 * frequencies must also be whole numbers. With decimalComma, "1,5" is 1.5.
 * Returns the number or a one-line reason it is refused.
 */
export function parseWeightValue(raw: string | undefined, kind: WeightKind, decimalComma: boolean): number | string {
  const text = (raw ?? '').trim();
  if (text === '') return 'is empty';
  const normalised = decimalComma ? text.replace(',', '.') : text;
  if (!NUMBER.test(normalised)) {
    if (/^[+-]?(inf|infinity|nan)$/i.test(normalised)) return `"${text}" is not a finite number`;
    if (!decimalComma && /^\d+,\d+$/.test(text)) return `"${text}" is not a number (pass --decimal-comma for decimal commas)`;
    return `"${text}" is not a number`;
  }
  const value = Number(normalised);
  if (!Number.isFinite(value)) return `"${text}" is not a finite number`;
  if (value < 0) return `"${text}" is negative`;
  if (kind === 'freq' && !Number.isInteger(value)) return `"${text}" is not a whole number (a frequency counts rows)`;
  // A count past 2^53 that a double cannot hold exactly would be changed silently: refused (merge adds such counts exactly).
  if (kind === 'freq' && value > Number.MAX_SAFE_INTEGER) {
    const exact = parseExactCount(text, decimalComma);
    if (typeof exact === 'bigint' && exact !== BigInt(value)) return `"${text}" is past 2^53 and cannot be counted exactly (it would be read as ${BigInt(value)}); split the line into smaller counts`;
  }
  return value;
}

/** The largest power of ten an exact count may carry in its exponent (10^1000 is far past any count). */
const MAX_COUNT_EXPONENT = 1000;

/**
 * A count's exact value as an integer, from its text ("12", "1.5e3",
 * "120000000000000000001"), with no rounding: merge adds counts with it,
 * so counts past 2^53 are never changed. Returns the integer or a
 * one-line reason it is refused (as parseWeightValue for a frequency).
 */
export function parseExactCount(raw: string | undefined, decimalComma = false): bigint | string {
  const text = (raw ?? '').trim();
  const normalised = decimalComma ? text.replace(',', '.') : text;
  const parts = /^([+-]?)(\d*)(?:\.(\d*))?(?:[eE]([+-]?\d+))?$/.exec(normalised);
  if (parts === null || !NUMBER.test(normalised)) {
    const reason = parseWeightValue(raw, 'freq', decimalComma);
    return typeof reason === 'string' ? reason : `"${text}" is not a number`;
  }
  const [, sign, whole, fraction = '', exponentText = '0'] = parts;
  let digits = (whole + fraction).replace(/^0+/, '');
  if (digits === '') return 0n;
  if (sign === '-') return `"${text}" is negative`;
  let exponent = Number(exponentText) - fraction.length;
  // Trailing zeros move into the exponent, so "1500.00" is 15e2.
  const trailing = /0*$/.exec(digits)![0].length;
  digits = digits.slice(0, digits.length - trailing);
  exponent += trailing;
  if (exponent < 0) return `"${text}" is not a whole number (a frequency counts rows)`;
  if (exponent > MAX_COUNT_EXPONENT) return `"${text}" is too large to be a count`;
  return BigInt(digits) * 10n ** BigInt(exponent);
}

export function weightError(label: string, line: number, option: string, column: string, reason: string): Error {
  return dataError(`${label}, line ${line}: ${option} column "${column}" ${reason}; fix it or pass --skip-bad-rows to count and skip such rows`);
}

/** Labels of a column's value ids after its recode, cached per id. */
export class RecodedLabels {
  private readonly cache: (string | undefined)[] = [];
  constructor(
    private readonly labels: () => readonly string[],
    private readonly mapping: ReadonlyMap<string, string> | undefined,
    private readonly missingLabel: string,
  ) {}
  of(id: number): string {
    if (id === 0) return this.missingLabel;
    let value = this.cache[id];
    if (value === undefined) {
      const raw = this.labels()[id - 1];
      value = this.mapping?.get(raw) ?? raw;
      this.cache[id] = value;
    }
    return value;
  }
}

/**
 * The row-level rules every reading command applies before counting, in
 * this order: --where filters (on recoded values; a missing value satisfies
 * no filter), then the weight or frequency of the row. `admit` returns the
 * row's weight, or −1 when the row is left out (and counts why).
 */
export class RowGate {
  filtered = 0;
  badWeights = 0;
  private readonly whereCache: Int8Array[];

  constructor(
    private readonly where: readonly { clause: WhereClause; slot: number; labels: { of(id: number): string } }[],
    private readonly weight: { slot: number; kind: WeightKind; column: string; decimalComma: boolean } | null,
    private readonly skipBadRows: boolean,
    private readonly sourceLabel: string,
  ) {
    this.whereCache = where.map(() => new Int8Array(0));
  }

  private passes(k: number, id: number): boolean {
    if (id <= 0) return false;
    let cache = this.whereCache[k];
    if (id >= cache.length) {
      const grown = new Int8Array(Math.max(cache.length * 2, id + 16));
      grown.set(cache);
      cache = this.whereCache[k] = grown;
    }
    if (cache[id] === 0) {
      const { clause, labels } = this.where[k];
      cache[id] = clause.values.has(labels.of(id)) !== clause.negate ? 1 : 2;
    }
    return cache[id] === 1;
  }

  /** Whether a row's values pass every --where filter (nothing is counted). */
  passesFilters(ids: Int32Array): boolean {
    for (let k = 0; k < this.where.length; k++) if (!this.passes(k, ids[this.where[k].slot])) return false;
    return true;
  }

  admit(ids: Int32Array, texts: readonly (string | undefined)[], line: number): number {
    for (let k = 0; k < this.where.length; k++) {
      if (!this.passes(k, ids[this.where[k].slot])) {
        this.filtered++;
        return -1;
      }
    }
    if (this.weight === null) return 1;
    const parsed = parseWeightValue(texts[this.weight.slot], this.weight.kind, this.weight.decimalComma);
    if (typeof parsed === 'string') {
      if (this.skipBadRows) {
        this.badWeights++;
        return -1;
      }
      throw weightError(this.sourceLabel, line, this.weight.kind === 'freq' ? '--freq' : '--weight', this.weight.column, parsed);
    }
    return parsed;
  }
}

/**
 * A column's value ids as counting sees them (table/levelRules.ts): the
 * level each id becomes under the codebook, the recode and --keep-missing,
 * or the reason it is missing; cached per id. Id 0 is an empty field (or a
 * --missing value).
 */
export class ColumnLevels {
  private readonly reasons: (LevelOutcome | undefined)[] = [];
  private readonly levels: (LevelOutcome | undefined)[] = [];
  private readonly index: ReturnType<typeof indexCodebook>;
  private labelRules: LevelRules | null = null;

  constructor(
    private readonly labels: () => readonly string[],
    readonly rules: LevelRules,
  ) {
    this.index = indexCodebook(rules.codebook);
  }

  private raw(id: number): string | null {
    return id === 0 ? null : id < 0 ? '' : this.labels()[id - 1];
  }

  /** Whether an id is counted, and as what: decided while reading (cut labels aside). */
  outcome(id: number): LevelOutcome {
    let outcome = id >= 0 ? this.reasons[id] : undefined;
    if (outcome === undefined) {
      outcome = levelOutcome(this.rules, this.raw(id), this.index);
      if (id >= 0) this.reasons[id] = outcome;
    }
    return outcome;
  }

  /**
   * The level of an id; for an id that is missing, its reason (filters see
   * it; counting leaves it out). Cut labels read as whole numbers when every
   * number of the column is one, judged the first time a label is asked for
   * (after reading, for the table).
   */
  /** Equal-frequency bins (--bins): the bin label of each value id, decided once the column is read. */
  useBins(labelOfId: readonly string[]): void {
    this.bins = labelOfId;
  }

  private bins: readonly string[] | null = null;

  of(id: number): string {
    if (this.bins !== null && id > 0 && this.outcome(id).kind === 'level') return this.bins[id];
    let outcome = id >= 0 ? this.levels[id] : undefined;
    if (outcome === undefined) {
      if (this.labelRules === null) {
        const cuts = this.rules.cuts;
        const whole = cuts ? cuts.every(Number.isInteger) && this.labels().every((l) => !isNumericLabel(l) || Number.isInteger(Number(l))) : false;
        this.labelRules = { ...this.rules, wholeCuts: whole };
      }
      outcome = levelOutcome(this.labelRules, this.raw(id), this.index);
      if (id >= 0) this.levels[id] = outcome;
    }
    return outcome.kind === 'level' ? outcome.label : outcome.reason;
  }

  /** Why an id is left out, or null when it is counted. */
  missingReason(id: number): string | null {
    const outcome = this.outcome(id);
    return outcome.kind === 'missing' ? outcome.reason : null;
  }
}

/**
 * A value named by --where or --recode that no row of its column holds: a
 * typo filters everything or nothing, or renames nothing, so the report
 * says so (analysis/report.ts: unmatchedValueWarnings).
 */
export interface UnmatchedValue {
  option: '--where' | '--recode';
  /** The option as given (the --where clause; for --recode, the rule `from=to`). */
  spec: string;
  column: string;
  value: string;
  /** Why it matches nothing: no row holds it; it is read as missing; it occurs only before the column's recode or codebook labels. */
  why: 'absent' | 'missing' | 'before-recode';
  /** The closest value the column holds (a typo's likely meaning), or null. */
  closest: string | null;
}

/**
 * A column's values as read (each distinct value once, missing ones apart)
 * and the label each becomes: for 'filter', the label --where sees (after
 * the codebook, cut points and recode); for 'recode', the label before the
 * recode. Null when the column was not read or not tracked in full (then
 * nothing is said of it).
 */
export type ColumnValues = (column: string, stage: 'filter' | 'recode') => { raw: readonly string[]; labelOf: (raw: string) => string } | null;

/** Columns with more distinct values than this get no "did you mean" (the search is quadratic in the value's length). */
const CLOSEST_SEARCH_LIMIT = 10_000;

/** The closest of `present` to `value` by edit distance, ignoring case (a typo's likely meaning): at most one edit in three characters, else null. */
function closestValue(value: string, present: readonly string[]): string | null {
  // Short values (a code such as "9") are a step from any other: no guess for them.
  if (present.length > CLOSEST_SEARCH_LIMIT || value.length < 3 || value.length > 200) return null;
  let best: string | null = null;
  let bestDistance = Math.max(1, Math.floor(value.length / 3)) + 1;
  for (const candidate of present) {
    if (Math.abs(candidate.length - value.length) >= bestDistance) continue;
    const d = editDistance(value.toLowerCase(), candidate.toLowerCase());
    if (d < bestDistance) {
      best = candidate;
      bestDistance = d;
    }
  }
  return best;
}

/**
 * The --where values that match no row: those of every clause that no
 * value of its column takes after the column's rules (recode, codebook
 * labels), each with the reason and the closest value the column holds.
 * `columnValues` gives each column's values.
 */
export function unmatchedWhereValues(
  where: readonly WhereClause[],
  columnValues: ColumnValues,
  missing: readonly string[],
): UnmatchedValue[] {
  const out: UnmatchedValue[] = [];
  const missingTokens = new Set(missing.map((m) => m.trim()));
  for (const clause of where) {
    const values = columnValues(clause.column, 'filter');
    if (values === null) continue;
    const labels = new Set(values.raw.map(values.labelOf));
    const raws = new Set(values.raw);
    for (const value of clause.values) {
      if (labels.has(value)) continue;
      const why = missingTokens.has(value) ? 'missing' : raws.has(value) ? 'before-recode' : 'absent';
      out.push({ option: '--where', spec: clause.text, column: clause.column, value, why, closest: why === 'absent' ? closestValue(value, [...labels]) : null });
    }
  }
  return out;
}

/**
 * The --recode rules that rename nothing: a level rule whose `from` no
 * value of its column takes (as read, or as the codebook or cut points
 * label it before the recode), and a rule of a single number that no value
 * equals. A rule of a range that takes no value is listed only when the
 * column holds no number at all (an age band with no one in it is no typo).
 */
export function unusedRecodeRules(
  recodes: readonly Recode[],
  columnValues: ColumnValues,
): UnmatchedValue[] {
  const out: UnmatchedValue[] = [];
  for (const recode of recodes) {
    const values = columnValues(recode.column, 'recode');
    if (values === null) continue;
    // A rule names the label before the recode (a codebook's or a cut's) or, failing that, the raw value (table/levelRules.ts).
    const taken = new Set([...values.raw, ...values.raw.map(values.labelOf)]);
    const numbers = values.raw.filter(isNumericLabel).map(Number);
    for (const [from, to] of recode.rules.levels) {
      if (taken.has(from)) continue;
      const range = recode.rules.ranges.find((r) => r.from === from)?.range;
      // A range with no one in it is no typo, where the column holds numbers at all.
      if (range && numbers.length > 0 && !(range.lower === range.upper && range.lowerClosed && range.upperClosed)) continue;
      if (range && numbers.some((x) => rangeContains(range, x))) continue;
      out.push({ option: '--recode', spec: `${recode.column}:${from}=${to}`, column: recode.column, value: from, why: 'absent', closest: closestValue(from, [...taken]) });
    }
  }
  return out;
}

/** An unmatched value in one sentence, the same in every format and in the error of a table left with too few levels. */
export function unmatchedValueWords(u: UnmatchedValue): string {
  const option = `${u.option} "${u.spec}"`;
  const guess = u.closest !== null ? ` (did you mean "${u.closest}"?)` : '';
  if (u.option === '--recode') return `${option}: "${u.value}" never occurs in ${u.column}${guess}; the rule renames nothing`;
  const clause = parseWhere(u.spec);
  const effect = clause.negate ? 'it drops no row' : 'it matches no row';
  if (u.why === 'missing') return `${option}: "${u.value}" is read as a missing value, and a row with a missing value passes no filter; ${effect}`;
  if (u.why === 'before-recode') return `${option}: "${u.value}" occurs in ${u.column} only before its recode or codebook labels, which --where reads; ${effect}`;
  return `${option}: "${u.value}" never occurs in ${u.column}${guess}; ${effect}`;
}

/** The unmatched values of several inputs (compare's periods, the waves) that none of them holds: a value some input holds is no typo. */
export function unmatchedInEvery(lists: readonly (readonly UnmatchedValue[])[]): UnmatchedValue[] {
  if (lists.length === 0) return [];
  const key = (u: UnmatchedValue) => JSON.stringify([u.option, u.spec, u.value]);
  const everywhere = lists.slice(1).reduce((keys, list) => new Set(list.map(key).filter((k) => keys.has(k))), new Set(lists[0].map(key)));
  return lists[0].filter((u) => everywhere.has(key(u)));
}

/**
 * The unmatched --where values and --recode rules of a scan or banner: the
 * filter columns' values as read (every row), and each recoded column's
 * values among the rows scanned (its labels before the recode, by its
 * codebook and cut points); a column dropped for its many values is not
 * judged.
 */
export function unmatchedOfEncoded(
  where: readonly WhereClause[],
  recodes: readonly Recode[],
  encoded: { whereValues: readonly (readonly string[] | null)[]; columns: readonly { name: string; labels: readonly string[]; codes: unknown }[]; layer: { name: string; labels: readonly string[] } | null },
  filterLookup: (column: string) => { get(value: string): string | undefined } | undefined,
  rulesOf: (column: string) => LevelRules,
  missing: readonly string[],
): UnmatchedValue[] {
  const values: ColumnValues = (column, stage) => {
    if (stage === 'filter') {
      const k = where.findIndex((w) => w.column === column);
      const raw = k >= 0 ? encoded.whereValues[k] : null;
      if (raw === null || raw === undefined) return null;
      const lookup = filterLookup(column);
      return { raw, labelOf: (r) => lookup?.get(r) ?? r };
    }
    const read = [...encoded.columns, ...(encoded.layer ? [encoded.layer] : [])].find((c) => c.name === column && ('codes' in c ? c.codes !== null : true));
    if (read === undefined) return null;
    const rules: LevelRules = { ...rulesOf(column), recode: null };
    const index = indexCodebook(rules.codebook);
    return {
      raw: read.labels,
      labelOf: (r) => {
        const outcome = levelOutcome(rules, r, index);
        return outcome.kind === 'level' ? outcome.label : r;
      },
    };
  };
  return [...unmatchedWhereValues(where, values, missing), ...unusedRecodeRules(recodes, values)];
}
