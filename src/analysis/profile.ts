/**
 * The profile record of a file: what each column looks like and what to do
 * with it before relating columns.
 */
import type { ColumnTally, ProfiledFile } from '../io/profileColumns.js';
import { missingTokenNotes, MissingTokenFinding } from '../io/missingTokens.js';
import { isMissingLooking } from '../table/missingLooking.js';
import { shellWord } from '../escape/shell.js';
import { Codebook, CodebookColumn, CodebookWarning, codebookColumn, labelColumn, labellingWarnings } from '../table/codebook.js';
import { compareNatural, isNumericLabel, rangeKey } from '../table/naturalOrder.js';
import { scaleOrder } from '../table/orderedScales.js';
import type { InputSummary } from './report.js';
import { TOOL_VERSION } from '../version.js';

/**
 * A first look at a file: what each column looks like, and what to do with
 * it before relating it to others. Pure: the single read is io/profileColumns.ts.
 */

export type ColumnKind = 'empty' | 'constant' | 'identifier' | 'free-text' | 'numeric' | 'ordered' | 'categorical';

export interface ProfileOptions {
  /** The level cap that pair and scan apply (--max-levels). */
  maxLevels: number;
  /** Values declared missing (--missing). */
  missing: readonly string[];
  /** Most frequent levels to show per column. */
  top: number;
  codebook: Codebook | null;
}

export const DEFAULT_PROFILE_OPTIONS: ProfileOptions = { maxLevels: 50, missing: [], top: 5, codebook: null };

export interface NumericSummary {
  integer: boolean;
  min: number;
  max: number;
  mean: number;
  /** Quartiles (order statistics at ⌈q·m⌉), exact; null when some values were only summarised. */
  quartiles: [number, number, number] | null;
}

export interface ColumnProfile {
  name: string;
  kind: ColumnKind;
  /** Why the column got its kind, in a few words. */
  why: string;
  question: string | null;
  /** Rows with a value (not empty, not missing-looking, not declared or coded missing). */
  present: number;
  /** Empty or whitespace-only fields. */
  empty: number;
  /** Missing-looking tokens found (docs: src/io/missingTokens.ts), not declared missing. */
  missingLooking: { token: string; rows: number }[];
  /** Values declared missing with --missing, by value. */
  declaredMissing: { token: string; rows: number }[];
  /** Codes the codebook calls missing, by code, with the reason. */
  codedMissing: { code: string; reason: string; rows: number }[];
  distinct: number;
  /** False when the column had more distinct values than the profile tracks (the count is then an estimate). */
  distinctExact: boolean;
  /** The most frequent values, with the codebook's label when it has one. */
  top: { value: string; label: string | null; rows: number }[];
  numeric: NumericSummary | null;
  /** The order the levels look to have (a scale, ranges, a run of whole numbers, the codebook); null when none. */
  order: string[] | null;
  suggestions: string[];
}

export interface ProfileReport {
  tool: { name: 'tabsight'; version: string };
  command: 'profile';
  input: InputSummary;
  rows: number;
  codebook: string | null;
  columns: ColumnProfile[];
  /** One line per column holding missing-looking values: the column, the values, the option. */
  notes: string[];
  warnings: CodebookWarning[];
}

/** A share of distinct values at which a column looks like an identifier (as scan's screening). */
export const IDENTIFIER_SHARE = 0.9;
/** More distinct numbers than the longest common rating scale (0–10) make a measurement, not codes. */
export const MOST_CODES = 11;

/** A number rounded to two significant digits: a cut point an analyst would write. */
export function roundCut(x: number): number {
  if (x === 0 || !Number.isFinite(x)) return x;
  const magnitude = 10 ** (Math.floor(Math.log10(Math.abs(x))) - 1);
  return Number((Math.round(x / magnitude) * magnitude).toPrecision(12));
}

interface Present {
  values: { value: string; rows: number }[];
  rows: number;
}

function orderStatistic(sorted: { x: number; rows: number }[], rank: number): number {
  let seen = 0;
  for (const entry of sorted) {
    seen += entry.rows;
    if (seen >= rank) return entry.x;
  }
  return sorted[sorted.length - 1].x;
}

function numericSummary(present: Present, tally: ColumnTally): NumericSummary | null {
  const overflow = tally.overflow;
  if (present.values.length === 0 || !present.values.every((v) => isNumericLabel(v.value))) return null;
  if (overflow && overflow.rows > overflow.tokenRows && !overflow.numeric) return null;
  const sorted = present.values.map((v) => ({ x: Number(v.value), rows: v.rows })).sort((a, b) => a.x - b.x);
  let min = sorted[0].x;
  let max = sorted[sorted.length - 1].x;
  // Σ x·n in a fixed order (ascending x), then the values beyond the limit.
  let sum = 0;
  let n = 0;
  for (const e of sorted) {
    sum += e.x * e.rows;
    n += e.rows;
  }
  let integer = present.values.every((v) => /^[+-]?\d+$/.test(v.value));
  let exact = true;
  if (overflow && overflow.rows > overflow.tokenRows) {
    exact = false;
    min = Math.min(min, overflow.min);
    max = Math.max(max, overflow.max);
    sum += overflow.sum;
    n += overflow.rows - overflow.tokenRows;
    integer = integer && overflow.integer;
  }
  const quartiles: [number, number, number] | null = exact ? [orderStatistic(sorted, Math.ceil(n / 4)), orderStatistic(sorted, Math.ceil(n / 2)), orderStatistic(sorted, Math.ceil((3 * n) / 4))] : null;
  return { integer, min, max, mean: sum / n, quartiles };
}

/** Interior equal-frequency edges (as --bins k would cut), rounded to two significant digits. */
export function suggestedCuts(present: Present, k = 5): number[] {
  const sorted = present.values.map((v) => ({ x: Number(v.value), rows: v.rows })).sort((a, b) => a.x - b.x);
  const m = sorted.reduce((s, e) => s + e.rows, 0);
  const min = sorted[0].x;
  const max = sorted[sorted.length - 1].x;
  const cuts: number[] = [];
  for (let i = 1; i < k; i++) {
    const edge = roundCut(orderStatistic(sorted, Math.ceil((i * m) / k) + 1));
    if (edge > min && edge <= max && (cuts.length === 0 || edge > cuts[cuts.length - 1])) cuts.push(edge);
  }
  return cuts;
}

function profileColumn(tally: ColumnTally, rows: number, options: ProfileOptions, warnings: CodebookWarning[], findings: MissingTokenFinding[]): ColumnProfile & { starter: CodebookColumn } {
  const declared = new Set(options.missing.map((m) => m.trim()));
  const entry = codebookColumn(options.codebook, tally.name);
  const overflow = tally.overflow;
  const seen = tally.labels.map((value, k) => ({ value, rows: tally.counts[k] })).filter((v) => v.rows > 0);
  // The codebook's meaning of each value, when it describes the column.
  const labelling = entry ? labelColumn(entry, seen.map((v) => v.value)) : null;
  if (entry && labelling) warnings.push(...labellingWarnings(entry, labelling, (options.codebook as Codebook).file));
  const missingLooking: { token: string; rows: number }[] = [];
  const declaredMissing: { token: string; rows: number }[] = [];
  const codedMissing = new Map<string, { code: string; reason: string; rows: number }>();
  const present: Present = { values: [], rows: 0 };
  seen.forEach((v, k) => {
    const meaning = labelling?.meanings[k];
    if (meaning?.kind === 'missing') {
      const known = codedMissing.get(meaning.code) ?? { code: meaning.code, reason: meaning.reason, rows: 0 };
      known.rows += v.rows;
      codedMissing.set(meaning.code, known);
    } else if (declared.has(v.value)) declaredMissing.push({ token: v.value, rows: v.rows });
    else if (isMissingLooking(v.value) && meaning?.kind !== 'level') missingLooking.push({ token: v.value, rows: v.rows });
    else {
      present.values.push(v);
      present.rows += v.rows;
    }
  });
  for (const [token, count] of overflow?.tokens ?? []) {
    const list = declared.has(token) ? declaredMissing : missingLooking;
    const known = list.find((t) => t.token === token);
    if (known) known.rows += count;
    else list.push({ token, rows: count });
  }
  for (const t of missingLooking) findings.push({ column: tally.name, token: t.token, rows: t.rows });
  const overflowValues = overflow ? overflow.rows - overflow.tokenRows : 0;
  const presentRows = present.rows + overflowValues;
  const distinct = present.values.length + (overflow && overflowValues > 0 ? overflow.distinctEstimate : 0);
  const distinctExact = overflowValues === 0;
  const numeric = numericSummary(present, tally);
  const labelOf = (value: string) => {
    if (!labelling) return null;
    const k = seen.findIndex((v) => v.value === value);
    const meaning = labelling.meanings[k];
    return meaning && meaning.kind === 'level' ? meaning.label : null;
  };
  const top = [...present.values]
    .sort((a, b) => b.rows - a.rows || compareNatural(a.value, b.value))
    .slice(0, options.top)
    .map((v) => ({ value: v.value, label: labelOf(v.value), rows: v.rows }));
  const name = tally.name;
  const word = shellWord(name);
  const suggestions: string[] = [];
  const allMissing = [...missingLooking.map((t) => t.token)];
  if (allMissing.length > 0) suggestions.push(`--missing ${shellWord(allMissing.join(','))} treats ${allMissing.map((t) => `"${t}"`).join(', ')} as missing`);

  let kind: ColumnKind;
  let why: string;
  let order: string[] | null = null;
  const valueList = present.values.map((v) => v.value);
  const averageLength = presentRows === 0 ? 0 : (present.values.reduce((s, v) => s + v.value.length * v.rows, 0) + (overflow ? overflow.length : 0)) / Math.max(1, presentRows + (overflow?.tokenRows ?? 0));
  const spaced = present.values.filter((v) => /\s/.test(v.value)).reduce((s, v) => s + v.rows, 0) + (overflow?.withSpaces ?? 0);
  const range = (x: number) => x.toLocaleString('en-US', { maximumFractionDigits: 6 });

  if (presentRows === 0) {
    kind = 'empty';
    why = rows === tally.empty ? 'every field is empty' : 'every value is empty or missing';
    suggestions.push(`no values to relate: --exclude ${word}`);
  } else if (distinct === 1) {
    kind = 'constant';
    why = `one value, "${present.values[0]?.value ?? ''}"`;
    suggestions.push(`nothing to relate: --exclude ${word}`);
  } else if (entry && (entry.values.length > 0 || entry.cuts !== null || entry.bins !== null)) {
    if (entry.values.length > 0) {
      kind = entry.ordered ? 'ordered' : 'categorical';
      why = `labelled by the codebook${entry.ordered ? ', ordered' : ''}`;
      order = labelling ? labelling.order : null;
    } else {
      kind = 'numeric';
      why = entry.cuts !== null ? `cut by the codebook at ${entry.cuts.join(', ')}` : `cut by the codebook into ${entry.bins} equal-frequency bins`;
    }
  } else if (!numeric && distinct > options.maxLevels && (averageLength >= 20 || spaced >= 0.5 * presentRows)) {
    kind = 'free-text';
    why = `${distinct.toLocaleString('en-US')}${distinctExact ? '' : ' (about)'} different texts${averageLength >= 20 ? `, ${Math.round(averageLength)} characters on average` : ', mostly several words'}`;
    suggestions.push(`free text: --exclude ${word}`);
  } else if (distinct >= IDENTIFIER_SHARE * presentRows && distinct > 10 && (!numeric || numeric.integer)) {
    kind = 'identifier';
    why = `${distinctExact ? '' : 'about '}${distinct.toLocaleString('en-US')} distinct values in ${presentRows.toLocaleString('en-US')} rows`;
    suggestions.push(`looks like an identifier: --exclude ${word}`);
  } else if (numeric) {
    const run = numeric.integer && distinctExact && distinct >= 3 && distinct <= options.maxLevels && (numeric.min === 0 || numeric.min === 1) && numeric.max - numeric.min + 1 === distinct;
    if (run) {
      kind = 'ordered';
      why = `whole numbers ${range(numeric.min)}–${range(numeric.max)}, none skipped: a rating scale or numeric codes`;
      order = [...valueList].sort(compareNatural);
      suggestions.push(`label the codes in a codebook and mark them ordered (--format codebook writes a starter), or use --ordinal`);
    } else if (distinct > MOST_CODES) {
      kind = 'numeric';
      why = `${distinctExact ? '' : 'about '}${distinct.toLocaleString('en-US')} different numbers from ${range(numeric.min)} to ${range(numeric.max)}`;
      const cuts = distinctExact ? suggestedCuts(present) : [];
      suggestions.push(`--bins 5 (equal-frequency)${cuts.length > 0 ? `, or fixed edges: --cuts ${shellWord(`${name}:${cuts.join(',')}`)}` : ''}`);
    } else {
      kind = 'categorical';
      why = `${distinct} numeric codes`;
      suggestions.push('numeric codes: label them in a codebook (--format codebook writes a starter)');
    }
  } else {
    const ranged = valueList.length >= 3 && valueList.every((v) => rangeKey(v) !== null);
    const scaled = ranged ? null : scaleOrder(valueList);
    if (ranged && distinctExact) {
      kind = 'ordered';
      why = 'range-like labels';
      order = [...valueList].sort(compareNatural);
      suggestions.push('ordered: --ordinal (the natural order already follows the ranges)');
    } else if (scaled && distinctExact) {
      kind = 'ordered';
      why = 'the answers of a known scale';
      order = scaled;
      suggestions.push(`ordered: --ordinal with --row-order ${shellWord(scaled.join(','))}`);
    } else {
      kind = 'categorical';
      why = `${distinctExact ? '' : 'about '}${distinct.toLocaleString('en-US')} level${distinct === 1 ? '' : 's'}`;
    }
  }
  if ((kind === 'categorical' || kind === 'ordered') && distinct > options.maxLevels) {
    suggestions.push(`${distinct.toLocaleString('en-US')} levels, more than --max-levels ${options.maxLevels}: --other 10 keeps the 10 most frequent`);
  }

  const starter = starterEntry(tally.name, kind, why, present, order, entry, missingLooking, distinctExact, options);
  return {
    name,
    kind,
    why,
    question: entry?.question ?? null,
    present: presentRows,
    empty: tally.empty,
    missingLooking,
    declaredMissing,
    codedMissing: [...codedMissing.values()],
    distinct,
    distinctExact,
    top,
    numeric,
    order,
    suggestions,
    starter,
  };
}

/** Most values a starter codebook lists for a column (beyond, the analyst should merge levels first). */
const STARTER_VALUES = 200;

/**
 * A column of the starter codebook: what the profile saw, for the analyst
 * to edit. A column the given codebook describes keeps its entry, and gets
 * only what the entry lacks (cuts for a numeric column, the codes of a
 * coded one, missing-looking values as missing codes).
 */
function starterEntry(
  name: string,
  kind: ColumnKind,
  why: string,
  present: Present,
  order: string[] | null,
  entry: CodebookColumn | undefined,
  missingLooking: { token: string; rows: number }[],
  distinctExact: boolean,
  options: ProfileOptions,
): CodebookColumn {
  const at = `${name} (profile)`;
  const column: CodebookColumn = entry
    ? { ...entry, values: [...entry.values], missing: [...entry.missing], nets: [...entry.nets] }
    : { name, question: null, ordered: false, values: [], missing: [], nets: [], cuts: null, bins: null, note: null, at };
  const described = column.values.length > 0 || column.cuts !== null || column.bins !== null;
  if (!described) {
    if (kind === 'numeric') {
      const cuts = distinctExact ? suggestedCuts(present) : [];
      if (cuts.length > 0) column.cuts = cuts;
      else column.bins = 5;
    } else if ((kind === 'categorical' || kind === 'ordered') && distinctExact && present.values.length <= Math.max(STARTER_VALUES, options.maxLevels)) {
      const values = order ?? present.values.map((v) => v.value).sort(compareNatural);
      column.values = values.map((value) => ({ code: value, label: value, at }));
      column.ordered = column.ordered || kind === 'ordered';
    } else if (column.note === null && kind !== 'categorical' && kind !== 'ordered') column.note = `looks like ${kind === 'free-text' ? 'free text' : kind === 'identifier' ? 'an identifier' : kind === 'constant' ? 'a constant' : 'an empty column'}: ${why}`;
    else if (column.note === null) column.note = `${why}: too many to list; merge levels first`;
  }
  const listed = new Set([...column.values, ...column.missing].map((v) => v.code));
  for (const t of missingLooking) if (!listed.has(t.token)) column.missing.push({ code: t.token, reason: `written as "${t.token}"`, label: null, at });
  return column;
}

/** Profiles every column of a file read once: the report, and the starter codebook of what it saw. */
export function profileFile(file: ProfiledFile, input: InputSummary, options: ProfileOptions = DEFAULT_PROFILE_OPTIONS): { report: ProfileReport; starter: Codebook } {
  const warnings: CodebookWarning[] = [];
  const findings: MissingTokenFinding[] = [];
  const rows = file.summary.records - file.summary.badRows;
  const profiled = file.columns.map((tally) => profileColumn(tally, rows, options, warnings, findings));
  const columns = profiled.map(({ starter: _starter, ...profile }) => profile);
  const starter: Codebook = {
    file: 'starter codebook',
    title: options.codebook?.title ?? `Starter codebook for ${input.file}, written by tabsight profile`,
    source: options.codebook?.source ?? null,
    columns: profiled.map((p) => p.starter),
  };
  const report: ProfileReport = {
    tool: { name: 'tabsight', version: TOOL_VERSION },
    command: 'profile',
    input,
    rows,
    codebook: options.codebook?.file ?? null,
    columns,
    // A numeric column is read as numeric past its missing-looking values: its note says so.
    notes: missingTokenNotes(findings, (name) => (columns.find((c) => c.name === name)?.kind === 'numeric' ? 'numeric' : 'level')),
    warnings,
  };
  return { report, starter };
}
