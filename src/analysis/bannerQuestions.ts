/**
 * The banner's inputs from the columns read once: which columns a banner
 * reads (breaks, questions, multiple-response sets), and each column made
 * ready to count: --recode, codebook labels, missing codes and level order,
 * nets, rating-scale scores, multiple-response answer patterns.
 */
import { usageError, dataError } from '../errors.js';
import { shellWord } from '../escape/shell.js';
import { Codebook, codebookColumn, CodebookColumn, codeKey, labelColumn, labellingWarnings } from '../table/codebook.js';
import { Codes, EncodedColumn, recodeColumn, shapeColumn } from '../table/encodedColumn.js';
import { codebookFacts, LevelRules } from '../table/levelRules.js';
import { compareNatural, isNumericLabel } from '../table/naturalOrder.js';
import { orderColumn } from '../table/orderedColumn.js';
import { resolveColumn } from '../table/columnNames.js';
import type { Warning } from './analyzeTable.js';
import type { BreakInput, NetInput, QuestionInput } from './banner.js';
import { screenColumn, SkippedColumn } from './scan.js';

/** A multiple-response set given as columns (--multi name:pattern) or as one delimited column (--multi-split column:separator). */
export type MultipleSpec = { kind: 'columns'; name: string; patterns: string[] } | { kind: 'split'; column: string; separator: string };

export interface BannerSelection {
  breaks: string[];
  /** Named questions (with * patterns), or null: every column that qualifies. */
  questions: string[] | null;
  /** Columns summarised by their mean (numeric, many values). */
  means: string[];
  multiple: MultipleSpec[];
  /** Columns never taken as questions (the weight). */
  reserved: string[];
  /** The survey design's columns (strata, cluster, fpc): not questions by default, but a break or a named question may be one. */
  sampleColumns?: string[];
}

/** Most answers a multiple-response question may have (patterns are 31-bit masks). */
export const MAX_ANSWERS = 30;

/** Values of a multiple-response column that mean "chosen" and "not chosen" (case and spaces ignored). */
export const CHOSEN_VALUES = ['1', 'yes', 'y', 'true', 'x', 'checked', 'selected'];
export const NOT_CHOSEN_VALUES = ['0', 'no', 'n', 'false', 'unchecked', 'not selected'];

function globToRegExp(pattern: string): RegExp {
  return new RegExp(`^${pattern.split('*').map((part) => part.replace(/[.+?^${}()|[\]\\]/g, '\\$&')).join('.*')}$`);
}

/** Header columns matching a name or * pattern, in header order; a pattern matching nothing is an error. */
export function matchColumns(pattern: string, header: readonly string[], option: string, label: string): string[] {
  if (!pattern.includes('*')) {
    resolveColumn(pattern, header, option, label);
    return [pattern];
  }
  const re = globToRegExp(pattern);
  const found = header.filter((h) => re.test(h));
  if (found.length === 0) throw usageError(`${option} "${pattern}": no column of ${label} matches`);
  return found;
}

/** The columns a banner reads, resolved against the header: what `select` of the columns request returns. */
export function bannerColumnsOf(selection: BannerSelection, header: readonly string[], label: string): { names: string[]; sets: Map<string, string[]>; wide: Set<string> } {
  const breaks = selection.breaks.flatMap((b) => matchColumns(b, header, '--break', label));
  const sets = new Map<string, string[]>();
  for (const spec of selection.multiple) {
    if (spec.kind === 'columns') {
      const columns = [...new Set(spec.patterns.flatMap((p) => matchColumns(p, header, '--multi', label)))];
      if (columns.length > MAX_ANSWERS) throw usageError(`--multi "${spec.name}": ${columns.length} columns, more than the ${MAX_ANSWERS} answers a multiple-response question may have`);
      sets.set(spec.name, columns);
    } else matchColumns(spec.column, header, '--multi-split', label);
  }
  const inSets = new Set([...sets.values()].flat());
  const means = selection.means.flatMap((m) => matchColumns(m, header, '--means', label));
  const reserved = new Set([...breaks, ...selection.reserved, ...(selection.sampleColumns ?? [])]);
  const questions = selection.questions
    ? selection.questions.flatMap((q) => matchColumns(q, header, '--questions', label))
    : header.filter((h) => !reserved.has(h) && !inSets.has(h));
  const splits = selection.multiple.flatMap((s) => (s.kind === 'split' ? [s.column] : []));
  // Numeric questions and delimited answers may hold many distinct values.
  const wide = new Set([...means, ...splits]);
  return { names: [...new Set([...breaks, ...questions, ...means, ...splits, ...inSets])].filter((n) => !selection.reserved.includes(n)), sets, wide };
}

/** A column with its codes in place: labels in report order (codebook order, else natural), 0 missing. */
interface LabelledColumn {
  name: string;
  title: string | null;
  labels: string[];
  codes: Codes;
  /** For each label, the codebook codes behind it (empty without a codebook). */
  codesOf: string[][];
  entry: CodebookColumn | undefined;
}

/**
 * The column's level rules applied as pair and scan apply them
 * (table/levelRules.ts: codebook labels and missing codes, cuts, --recode,
 * --keep-missing) and its levels in report order.
 */
function labelled(column: EncodedColumn, rules: LevelRules, codebook: Codebook | null, warnings: Warning[]): LabelledColumn | null {
  const plain = !rules.codebook && !rules.cuts && !rules.recode;
  const shaped = plain ? { column: recodeColumn(column, undefined, rules.keepMissing), order: [] as string[] } : shapeColumn(column, rules);
  if (shaped.column.codes === null) return null;
  const ordered = orderColumn(shaped.column, shaped.order);
  const entry = rules.codebook ?? undefined;
  if (entry && codebook) {
    for (const w of labellingWarnings(entry, labelColumn(entry, column.labels), codebook.file)) if (!warnings.some((x) => x.message === w.message)) warnings.push({ code: w.code, message: w.message });
  }
  const facts = codebookFacts(rules, ordered.labels);
  return { name: column.name, title: facts?.question ?? null, labels: ordered.labels, codes: ordered.codes, codesOf: facts?.codes ?? ordered.labels.map(() => []), entry };
}

/** The nets of a codebook entry as level indexes of the labelled column. */
function netsOf(column: LabelledColumn): NetInput[] {
  if (!column.entry) return [];
  const labelOfCode = new Map(column.entry.values.map((v) => [codeKey(v.code), v.label]));
  return column.entry.nets
    .map((net) => ({ name: net.name, members: [...new Set(net.codes.map((c) => column.labels.indexOf(labelOfCode.get(codeKey(c)) ?? '')).filter((i) => i >= 0))].sort((a, b) => a - b) }))
    .filter((net) => net.members.length > 0);
}

/**
 * The scores of a rating scale: a codebook column marked ordered whose
 * labelled codes are all numbers; each level scores its code (levels whose
 * codes differ score nothing, and so do missing levels). null otherwise.
 */
function ratingScores(column: LabelledColumn): (number | null)[] | null {
  const entry = column.entry;
  if (!entry || !entry.ordered || entry.values.length === 0 || !entry.values.every((v) => isNumericLabel(v.code))) return null;
  return column.codesOf.map((codes) => {
    const values = [...new Set(codes.map(Number))];
    return values.length === 1 ? values[0] : null;
  });
}

export interface PreparedBanner {
  breaks: BreakInput[];
  questions: QuestionInput[];
  skipped: SkippedColumn[];
  warnings: Warning[];
}

export interface PrepareOptions {
  selection: BannerSelection;
  sets: Map<string, string[]>;
  /** The level rules of a column (codebook, cuts, --recode, --keep-missing), as pair and scan apply them. */
  rules: (name: string) => LevelRules;
  maxLevels: number;
  codebook: Codebook | null;
  /** The input's label, for messages. */
  label: string;
}

/** Every column made ready to count, in the order: breaks, then questions in header order of their first column. */
export function prepareBanner(columns: EncodedColumn[], rows: number, options: PrepareOptions): PreparedBanner {
  const byName = new Map(columns.map((c) => [c.name, c]));
  const warnings: Warning[] = [];
  const skipped: SkippedColumn[] = [];
  const { selection, codebook, rules } = options;
  const breakNames = selection.breaks.flatMap((b) => matchColumns(b, columns.map((c) => c.name), '--break', options.label));
  const breaks: BreakInput[] = breakNames.map((name) => {
    const column = byName.get(name)!;
    const ready = labelled(column, rules(name), codebook, warnings);
    if (ready === null || ready.labels.length > options.maxLevels) {
      throw dataError(`--break "${name}" has ${column.distinctCapped ? 'more than ' : ''}${column.distinct.toLocaleString('en-US')} distinct values, more than --max-levels ${options.maxLevels}; a break variable needs few levels (cut it with --recode or a codebook)`);
    }
    if (ready.labels.length === 0) throw dataError(`--break "${name}": every value is missing in the rows counted`);
    return { name, title: ready.title, labels: ready.labels, codes: ready.codes };
  });
  const reserved = new Set([...breakNames, ...selection.reserved, ...(selection.sampleColumns ?? [])]);
  const sets = options.sets;
  const inSets = new Set([...sets.values()].flat());
  const splitColumns = new Map(selection.multiple.flatMap((s) => (s.kind === 'split' ? [[s.column, s.separator] as const] : [])));
  const means = new Set(selection.means.flatMap((m) => matchColumns(m, columns.map((c) => c.name), '--means', options.label)));
  const explicit = selection.questions === null ? null : new Set(selection.questions.flatMap((q) => matchColumns(q, columns.map((c) => c.name), '--questions', options.label)));

  const questions: QuestionInput[] = [];
  const setsDone = new Set<string>();
  for (const column of columns) {
    const name = column.name;
    if (inSets.has(name)) {
      for (const [setName, members] of sets) {
        if (!members.includes(name) || setsDone.has(setName)) continue;
        setsDone.add(setName);
        questions.push(columnSet(setName, members.map((m) => byName.get(m)!), codebook, options.label));
      }
      // A column of a set is also a question of its own only when --questions names it.
      if (!explicit?.has(name)) continue;
    }
    const separator = inSets.has(name) ? undefined : splitColumns.get(name);
    if (separator !== undefined) {
      questions.push(splitQuestion(column, separator, rules(name), codebook, options));
      continue;
    }
    if (means.has(name)) {
      questions.push(meanQuestion(column, rules(name), warnings, options));
      continue;
    }
    if (explicit ? !explicit.has(name) : reserved.has(name)) continue;
    // A break variable's codes are already laid out as a break (renumbered in place): it is not also a question.
    if (breakNames.includes(name)) {
      skipped.push({ column: name, code: 'break-variable', reason: 'a break variable (the columns of the banner)' });
      continue;
    }
    const columnRules = rules(name);
    const relabels = Boolean(columnRules.codebook || columnRules.cuts || columnRules.recode);
    let screened = column;
    if (column.codes !== null && column.labels.length > options.maxLevels && !relabels) screened = { ...column, codes: null };
    const reason = screenColumn(screened, rows, { maxLevels: options.maxLevels });
    if (reason) {
      skipped.push(reason.code === 'numeric' ? { ...reason, reason: `numeric with ${column.distinct.toLocaleString('en-US')} distinct values; --means ${shellWord(name)} shows its mean per column` } : reason);
      continue;
    }
    const ready = labelled(column, columnRules, codebook, warnings);
    if (ready === null || ready.labels.length > options.maxLevels) {
      skipped.push({ column: name, code: 'too-many-levels', reason: `more than --max-levels ${options.maxLevels} levels` });
      continue;
    }
    if (ready.labels.length === 0) {
      skipped.push({ column: name, code: 'no-values', reason: 'every value is missing or a missing code' });
      continue;
    }
    const scores = ratingScores(ready);
    questions.push({ kind: 'single', name, title: ready.title, labels: ready.labels, codes: ready.codes, nets: netsOf(ready), scores, showLevels: true });
  }
  return { breaks, questions, skipped, warnings };
}

/** A numeric column summarised by its mean per column (--means): its values are the scores (codebook missing codes and --recode apply); levels are not shown. */
function meanQuestion(column: EncodedColumn, rules: LevelRules, warnings: Warning[], options: PrepareOptions): QuestionInput {
  if (column.codes === null) {
    throw dataError(`--means "${column.name}" has more than ${column.distinct.toLocaleString('en-US')} distinct values, more than a banner reads for one column`);
  }
  // Missing codes of a codebook leave the base; labels and cuts would turn the values into levels, so only missing codes and recodes apply.
  const numericRules: LevelRules = { ...rules, cuts: null, codebook: rules.codebook ? { ...rules.codebook, values: [] } : null };
  const ready = labelled(column, numericRules, null, warnings);
  if (ready === null) throw dataError(`--means "${column.name}": cannot be read as numbers`);
  const bad = ready.labels.find((l) => !isNumericLabel(l));
  if (bad !== undefined) throw dataError(`${options.label}: --means "${column.name}" holds "${bad}", which is not a number (give it as a missing value with --missing, or leave the column out of --means)`);
  return { kind: 'single', name: column.name, title: rules.codebook?.question ?? null, labels: ready.labels, codes: ready.codes, nets: [], scores: ready.labels.map(Number), showLevels: false };
}

function normalised(value: string): string {
  return value.trim().toLowerCase().replace(/\s+/g, ' ');
}

/**
 * A multiple-response set of columns, one per answer: a respondent chose an
 * answer when its column holds 1/yes/true/x/checked/selected, not when it
 * holds 0/no/false/unchecked; a respondent whose columns are all missing is
 * outside the base. An answer is named by its codebook question, else its column.
 */
function columnSet(name: string, members: EncodedColumn[], codebook: Codebook | null, label: string): QuestionInput {
  const rows = members[0].codes?.length ?? 0;
  const pattern = new Int32Array(rows).fill(-1);
  members.forEach((column, j) => {
    if (column.codes === null) throw dataError(`--multi "${name}": column "${column.name}" has ${column.distinct.toLocaleString('en-US')} distinct values; a multiple-response column holds 1/0 or yes/no`);
    const meaning = column.labels.map((value) => {
      const v = normalised(value);
      if (CHOSEN_VALUES.includes(v)) return 1;
      if (NOT_CHOSEN_VALUES.includes(v)) return 0;
      throw dataError(`${label}: --multi "${name}": column "${column.name}" holds "${value}"; a multiple-response column holds ${CHOSEN_VALUES.slice(0, 3).join('/')}… for chosen and ${NOT_CHOSEN_VALUES.slice(0, 3).join('/')}… for not chosen (other values: --missing, or --recode)`);
    });
    const bit = 2 ** j;
    const codes = column.codes;
    for (let r = 0; r < rows; r++) {
      const code = codes[r];
      if (code === 0) continue;
      const chosen = meaning[code - 1];
      pattern[r] = (pattern[r] < 0 ? 0 : pattern[r]) | (chosen ? bit : 0);
    }
  });
  const answers = members.map((c) => codebookColumn(codebook, c.name)?.question ?? c.name);
  return { kind: 'multiple', name, title: null, answers, pattern, nets: [], source: { columns: members.map((c) => c.name), separator: null } };
}

/**
 * One column of delimited answers (--multi-split column:separator): the
 * answers are the pieces between separators (trimmed; empty pieces
 * dropped), labelled and ordered by the column's codebook entry when there
 * is one (its nets group answers), else in natural order. An empty value is
 * missing: outside the base.
 */
function splitQuestion(column: EncodedColumn, separator: string, rules: LevelRules, codebook: Codebook | null, options: PrepareOptions): QuestionInput {
  const recode = rules.recode;
  if (column.codes === null) throw dataError(`--multi-split "${column.name}" has more than ${column.distinct.toLocaleString('en-US')} distinct values; a banner reads at most 65,534 distinct combinations of answers`);
  const pieces = column.labels.map((value) => value.split(separator).map((p) => p.trim()).filter((p) => p !== '').map((p) => recode?.get(p) ?? p));
  const entry = codebookColumn(codebook, column.name);
  const labelOf = (piece: string) => entry?.values.find((v) => codeKey(v.code) === codeKey(piece))?.label ?? piece;
  const missingCodes = new Set(entry?.missing.map((m) => codeKey(m.code)) ?? []);
  const seen = new Set<string>();
  for (const list of pieces) for (const p of list) if (!missingCodes.has(codeKey(p))) seen.add(labelOf(p));
  const listed = entry ? [...new Set(entry.values.map((v) => v.label))].filter((l) => seen.has(l)) : [];
  const answers = [...listed, ...[...seen].filter((l) => !listed.includes(l)).sort(compareNatural)];
  if (answers.length > MAX_ANSWERS) throw dataError(`--multi-split "${column.name}": ${answers.length} different answers, more than the ${MAX_ANSWERS} a multiple-response question may have`);
  const index = new Map(answers.map((a, j) => [a, j]));
  const maskOf = pieces.map((list) => {
    if (list.length > 0 && list.every((p) => missingCodes.has(codeKey(p)))) return -1;
    return list.reduce((m, p) => (missingCodes.has(codeKey(p)) ? m : m | (2 ** (index.get(labelOf(p)) as number))), 0);
  });
  const codes = column.codes;
  const pattern = new Int32Array(codes.length);
  for (let r = 0; r < codes.length; r++) pattern[r] = codes[r] === 0 ? -1 : maskOf[codes[r] - 1];
  const nets: NetInput[] = (entry?.nets ?? [])
    .map((net) => ({ name: net.name, members: [...new Set(net.codes.map((c) => index.get(labelOf(c))).filter((j): j is number => j !== undefined))].sort((a, b) => a - b) }))
    .filter((net) => net.members.length > 0);
  void options;
  return { kind: 'multiple', name: column.name, title: entry?.question ?? null, answers, pattern, nets, source: { columns: [column.name], separator } };
}
