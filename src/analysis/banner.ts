/**
 * The banner report: every question against every break variable, with a
 * Total column first; per column the base, per cell the shares, the
 * column-proportion tests within each break variable (letter keys), the
 * Welch tests of means for numeric questions, the overall test per
 * question × break (the pair record's verdict, or the multiple-response
 * test), all decided here for every renderer to show.
 */
import { columnProportionTests, ProportionColumn } from '../stats/columnProportions.js';
import { groupMultipleResponseTest, GroupAnswerPattern } from '../stats/multipleResponse.js';
import { adjustPValues } from '../stats/multipleTesting.js';
import { welchTTest } from '../stats/welch.js';
import { CompensatedSum } from '../numerics/compensatedSum.js';
import type { Codes } from '../table/encodedColumn.js';
import { BreakCodes, countPatterns, countSingle, CrossCounts, PatternCounts, QuestionCounts } from '../table/bannerCounts.js';
import type { TwoWayTable } from '../table/twoWayTable.js';
import type { Weighting } from '../table/weighting.js';
import { AnalysisOptions, analyzeTable, Evidence, evidenceOf, Verdict, Warning } from './analyzeTable.js';
import type { InputSummary } from './report.js';
import type { ScanDesign, SkippedColumn } from './scan.js';
import { TOOL_VERSION } from '../version.js';
import { formatCount } from '../readableNumbers.js';
import { TabsightError } from '../errors.js';
import type { DesignEstimate } from '../stats/designCovariance.js';
import { domainDifferenceTest, DomainRatio, domainRatios } from '../stats/designDomainRatios.js';
import { countDesignCells, DesignBreak } from '../table/bannerCounts.js';
import type { DesignCells, RowDesign } from '../table/surveyDesign.js';
import { designEstimate } from './design.js';

/** What a banner cell shows in the human-facing formats (JSON, CSV/TSV and the spreadsheet's data carry all); 'se' the design-based standard error of the column %. */
export type BannerCellPart = 'col' | 'row' | 'count' | 'se';

export type ColumnAdjustment = 'none' | 'bonferroni' | 'holm';
export type MultipleResponseReferral = 'first-order' | 'second-order';

export interface BannerSettings {
  cells: BannerCellPart[];
  /** Confidence levels of the marks, highest first: the first marks with upper-case keys, the second with lower-case. */
  confidenceLevels: number[];
  adjustment: ColumnAdjustment;
  minimumBase: number;
  /** α of the overall test per question × break (as pair's --alpha). */
  alpha: number;
  multipleResponseReferral: MultipleResponseReferral;
  analysis: AnalysisOptions;
}

/** One input column of the banner (a break level, or the Total). */
export interface BannerColumn {
  /** The letter that marks it in other cells; null for the Total (never tested). */
  key: string | null;
  /** Its break variable; null for the Total. */
  break: string | null;
  level: string;
}

export interface BannerBreak {
  name: string;
  /** The question text of the break variable (codebook), or null. */
  title: string | null;
  /** Its columns: columns[first .. first + count − 1] of the report. */
  first: number;
  count: number;
}

export interface BannerBase {
  /** Respondents in the column who answered the question. */
  unweighted: number;
  /** Σw over them (equal to `unweighted` without weights). */
  weighted: number;
  /**
   * Kish's effective base (Σw)²/Σw² with sampling weights; the weighted base
   * otherwise; with a survey design, unweighted / designEffect (the size of a
   * simple random sample as precise) where the design effect is defined.
   */
  effective: number;
  /**
   * With a survey design: the column's design effect, the mean over the
   * question's levels (answers) of each column share's design effect
   * (its design variance over p(1 − p)/base); for a question shown by its
   * mean only, the mean's (its design variance over SD²/base). null without
   * a design or where no share lies strictly between 0 and 1.
   */
  designEffect: number | null;
  /** Below the minimum base: shown, not tested. */
  small: boolean;
}

export interface BannerMark {
  /** The column this one is higher than (index into `columns`) and its key. */
  column: number;
  key: string;
  /** The highest confidence level met. */
  confidence: number;
  /** The key as shown: upper case at the first confidence level, lower case at the second. */
  shown: string;
}

export interface BannerCell {
  /** Respondents (Σw with weights). */
  count: number;
  unweighted: number;
  /** Share of the column's base, 0–100; null for an empty base. */
  columnPercent: number | null;
  /** Share of the row across its break variable's columns (the Total: of all respondents in the row), 0–100. */
  rowPercent: number | null;
  /** With a survey design: the design-based standard error of columnPercent, in percentage points; null otherwise. */
  standardError: number | null;
  /** Columns of the same break variable this cell is significantly higher than. */
  higherThan: BannerMark[];
  /** The marks as shown, joined: e.g. "BDe". */
  marks: string;
}

/** One test between two columns of a break variable (indexes into `columns`, first < second). */
export interface BannerComparison {
  first: number;
  second: number;
  /**
   * First minus second: z of the pooled two-proportion test, or Welch's t;
   * with a survey design the design-based t of the difference of the two
   * domain estimates. null when not computable.
   */
  statistic: number | null;
  /** Welch's df (means), the design's df (with a design); null for the pooled z. */
  df: number | null;
  pValue: number | null;
  /** After --column-adjust over the row's comparisons within the break variable (equal to pValue without one). */
  adjustedPValue: number | null;
}

export interface BannerRow {
  label: string;
  /** 'level' of a single-response question, 'answer' of a multiple-response one, 'net' a named group counted once per respondent. */
  kind: 'level' | 'answer' | 'net';
  /** For a net: the levels or answers it groups. */
  members: string[] | null;
  cells: BannerCell[];
  /** Every comparison made for this row, break variable by break variable. */
  comparisons: BannerComparison[];
}

export interface BannerMeanCell {
  mean: number | null;
  /** Standard deviation (weighted: √(Σw(x − x̄)²/Σw · n_eff/(n_eff − 1))). */
  sd: number | null;
  /** Respondents with a score (unweighted), Σw, effective base. */
  unweighted: number;
  weighted: number;
  effective: number;
  /** With a survey design: the design-based standard error of the mean; null otherwise. */
  standardError: number | null;
  higherThan: BannerMark[];
  marks: string;
}

export interface BannerAssociation {
  /** 'pair': the pair record's verdict for question × break (the same numbers `tabsight pair` gives); 'multiple-response': Bilder & Loughin's test. */
  kind: 'pair' | 'multiple-response';
  /** The leading p-value and its decision at α. */
  pValue: number;
  passes: boolean;
  evidence: Evidence;
  /**
   * Pearson's X² (pair) or the summed X²_S (multiple-response), its nominal
   * df; with a survey design the design-based F (Rao–Scott, second order)
   * that leads, on df and denominatorDf.
   */
  statistic: number;
  df: number;
  /** The design-based F's denominator df; null without a design. */
  denominatorDf: number | null;
  /** pair: the record's verdict as `tabsight pair --format json` gives it. */
  verdict: Verdict | null;
  biasCorrectedV: number | null;
  /** multiple-response: the referral that leads, both referrals, and the respondents counted. */
  multipleResponse: {
    referral: MultipleResponseReferral;
    firstOrder: { statistic: number; df: number; pValue: number };
    secondOrder: { statistic: number; df: number; pValue: number };
    answersLeftOut: string[];
  } | null;
}

export interface BannerBreakTests {
  break: string;
  /** The overall test of question × break; null with the reason when none is possible. */
  association: BannerAssociation | null;
  reason: string | null;
  /** Keys of the columns below the minimum base (or empty), not tested. */
  untested: string[];
  /** Comparisons per row the adjustment is made over (tested columns c: c(c − 1)/2). */
  comparisonsPerRow: number;
}

export interface BannerQuestion {
  name: string;
  /** The question text (codebook), or null. */
  title: string | null;
  kind: 'single' | 'multiple' | 'numeric';
  /** Multiple-response: the columns of the set, or the delimited column and its separator. */
  source: { columns: string[]; separator: string | null } | null;
  bases: BannerBase[];
  /** Level (or answer) rows and nets; empty for a numeric question summarised by its mean only. */
  rows: BannerRow[];
  /** Numeric and rating questions: mean and SD per column with Welch tests. */
  means: BannerMeanCell[] | null;
  /** The Welch tests between the means (empty without means). */
  meanComparisons: BannerComparison[];
  tests: BannerBreakTests[];
}

export interface BannerReport {
  tool: { name: 'tabsight'; version: string };
  command: 'banner';
  input: InputSummary;
  /** Rows counted (past --where and usable weights). */
  respondents: number;
  weighting: Weighting['kind'];
  /** The survey design every test and standard error accounts for, or null. */
  design: BannerDesign | null;
  /**
   * What the design is, in one sentence every format shows: the design
   * and what is design-based; with sampling weights and no design, that the
   * tests do not account for clustering or stratification; null otherwise.
   */
  designNote: string | null;
  settings: {
    cells: BannerCellPart[];
    confidenceLevels: number[];
    adjustment: ColumnAdjustment;
    minimumBase: number;
    alpha: number;
    /** 'design-t' with a survey design: the design-based t of the difference of two domain shares. */
    columnTest: 'pooled-z' | 'design-t';
    meanTest: 'welch' | 'design-t';
    multipleResponseReferral: MultipleResponseReferral;
    /** With sampling weights the column tests use Kish's effective bases. */
    effectiveBases: boolean;
    exact: string;
    simulations: number;
    seed: number;
  };
  columns: BannerColumn[];
  breaks: BannerBreak[];
  questions: BannerQuestion[];
  skipped: SkippedColumn[];
  warnings: Warning[];
}

/** The survey design of a banner (each question's own design effects are on its bases). */
export type BannerDesign = ScanDesign;

/** A break variable ready to count: ordered labels, codes per row. */
export interface BreakInput {
  name: string;
  title: string | null;
  labels: string[];
  codes: Codes;
}

export interface NetInput {
  name: string;
  /** Level indexes (single) or answer indexes (multiple) it groups. */
  members: number[];
}

export type QuestionInput =
  | {
      kind: 'single';
      name: string;
      title: string | null;
      labels: string[];
      codes: Codes;
      nets: NetInput[];
      /** The score of each level for the mean (rating scales, --means); null for a categorical question. */
      scores: (number | null)[] | null;
      /** False for a numeric question shown by its mean only (many values). */
      showLevels: boolean;
    }
  | {
      kind: 'multiple';
      name: string;
      title: string | null;
      answers: string[];
      /** Per row: bit j set when answer j is chosen; −1 outside the base (no answer given). */
      pattern: Int32Array;
      nets: NetInput[];
      source: { columns: string[]; separator: string | null };
    };

export interface BannerInputs {
  input: InputSummary;
  respondents: number;
  weights?: { values: Float64Array; kind: 'weight' | 'freq' };
  /** The survey design as read (each kept row's unit or replicate weights), or null. */
  design?: RowDesign | null;
  breaks: BreakInput[];
  questions: QuestionInput[];
  skipped: SkippedColumn[];
  warnings: Warning[];
}

/** The columns of the banner: Total first, then each break's levels with their keys A, B, … in order. */
function bannerColumns(breaks: readonly BreakInput[]): { columns: BannerColumn[]; layout: BannerBreak[] } {
  const columns: BannerColumn[] = [{ key: null, break: null, level: 'Total' }];
  const layout: BannerBreak[] = [];
  let key = 0;
  for (const b of breaks) {
    layout.push({ name: b.name, title: b.title, first: columns.length, count: b.labels.length });
    for (const level of b.labels) columns.push({ key: columnKey(key++), break: b.name, level });
  }
  return { columns, layout };
}

/** Column keys: A, B, …, Z, then AA, AB, … (upper case; the marks of the second confidence level show them in lower case). */
export function columnKey(index: number): string {
  let k = index;
  let key = '';
  do {
    key = String.fromCharCode(65 + (k % 26)) + key;
    k = Math.floor(k / 26) - 1;
  } while (k >= 0);
  return key;
}

const shownKey = (key: string, confidence: number, levels: readonly number[]) => (confidence === levels[0] ? key.toUpperCase() : key.toLowerCase());

/** The report's cells from one cross (rows × (levels + 1)) of a question: the break's columns, from slot 1 on. */
function crossColumn(cross: CrossCounts, row: number, column: number) {
  const at = row * cross.width + column;
  return { weighted: cross.weighted[at] + cross.weightedLow[at], unweighted: cross.unweighted[at], squares: cross.squares[at] + cross.squaresLow[at], weightedHi: cross.weighted[at], weightedLo: cross.weightedLow[at], squaresHi: cross.squares[at], squaresLo: cross.squaresLow[at] };
}

/** Kish's effective base of Σw and Σw² (frequencies and unweighted: Σw). */
function effectiveBase(weighted: number, squares: number, kind: Weighting['kind']): number {
  if (kind !== 'weight') return weighted;
  return squares > 0 ? weighted * (weighted / squares) : 0;
}

/** Builds the banner report from prepared inputs: counts each question in one pass, then tests. */
export function bannerReport(inputs: BannerInputs, settings: BannerSettings): BannerReport {
  const kind: Weighting['kind'] = inputs.weights?.kind ?? 'none';
  const weights = inputs.weights?.values;
  const { columns, layout } = bannerColumns(inputs.breaks);
  const breakCodes: BreakCodes[] = inputs.breaks.map((b) => ({ codes: b.codes, levels: b.labels.length }));
  const levels = [...settings.confidenceLevels].sort((a, b) => b - a);
  const design = inputs.design ?? null;
  const designBreaks: DesignBreak[] = [...inputs.breaks.map((b) => ({ codes: b.codes, labels: b.labels })), { codes: null, labels: ['Total'] }];
  // With a design the tests are design-based; the overall tests need no percentages of their own (the banner gives the column shares).
  const analysis = design ? { ...settings.analysis, designPercentages: false } : settings.analysis;
  const context: Context = { settings: { ...settings, confidenceLevels: levels, analysis }, kind, columns, layout, breaks: inputs.breaks, design, designBreaks, weights, designSummary: null };
  const questions = inputs.questions.map((q) => {
    if (q.kind === 'single') return singleQuestion(q, countSingle(q.codes, q.labels.length, breakCodes, weights), context);
    const masks = [...q.answers.map((_a, j) => 2 ** j), ...q.nets.map((n) => n.members.reduce((m, j) => m | (2 ** j), 0))];
    return multipleQuestion(q, countPatterns(q.pattern, masks, breakCodes, weights), masks, context);
  });
  const a = settings.analysis;
  return {
    tool: { name: 'tabsight', version: TOOL_VERSION },
    command: 'banner',
    input: inputs.input,
    respondents: inputs.respondents,
    weighting: kind,
    design: context.designSummary,
    designNote: designNoteOf(context.designSummary, kind),
    settings: {
      cells: settings.cells,
      confidenceLevels: levels,
      adjustment: settings.adjustment,
      minimumBase: settings.minimumBase,
      alpha: a.alpha,
      columnTest: design ? 'design-t' : 'pooled-z',
      meanTest: design ? 'design-t' : 'welch',
      multipleResponseReferral: settings.multipleResponseReferral,
      effectiveBases: kind === 'weight' && !design,
      exact: a.exact,
      simulations: a.simulations,
      seed: a.seed,
    },
    columns,
    breaks: layout,
    questions,
    skipped: inputs.skipped,
    warnings: inputs.warnings,
  };
}

interface Context {
  settings: BannerSettings;
  kind: Weighting['kind'];
  columns: BannerColumn[];
  layout: BannerBreak[];
  breaks: readonly BreakInput[];
  design: RowDesign | null;
  /** The break variables, then the Total, as the design counting takes them. */
  designBreaks: DesignBreak[];
  weights: Float64Array | undefined;
  /** The design as the report gives it, from the first design estimate made. */
  designSummary: BannerDesign | null;
}

/**
 * The design side of one row variable of a question (its levels, or an
 * answer chosen or not): the design totals and estimate of the row variable
 * against each break and the Total (last), and which rows make the ratio
 * (designDomainRatios.ts): a share num = [row in the set], den = 1; a mean
 * num = score, den = [scored].
 */
interface DesignSide {
  cells: DesignCells[];
  /** null where the table has no weight (no estimate). */
  estimates: (DesignEstimate | null)[];
  rows: number;
}

/** Counts and estimates the design tables of a row variable in one pass over the rows. */
function designSide(rowOf: (r: number) => number, rowLabels: readonly string[], context: Context): DesignSide {
  const design = context.design as RowDesign;
  const cells = countDesignCells(rowOf, rowLabels, context.designBreaks, design, context.weights);
  const estimates = cells.map((c, x) => {
    try {
      return designEstimate({ cells: c, other: null }, { rowLevels: [...rowLabels], colLevels: [...context.designBreaks[x].labels] });
    } catch (error) {
      if (error instanceof TabsightError && /sum to zero/.test(error.message)) return null;
      throw error;
    }
  });
  if (context.designSummary === null) {
    const first = estimates.find((e) => e !== null);
    if (first) context.designSummary = designSummaryOf(first, cells[0]);
  }
  return { cells, estimates, rows: rowLabels.length };
}

/** BannerReport.designNote. */
export function designNoteOf(d: BannerDesign | null, kind: Weighting['kind']): string | null {
  if (d === null) return kind === 'weight' ? "Counts are sums of sampling weights; the tests use each column's effective base, which does not account for clustering or stratification." : null;
  const count = (n: number, one: string, many: string) => `${formatCount(n)} ${n === 1 ? one : many}`;
  const df = count(d.degreesOfFreedom, 'degree of freedom', 'degrees of freedom');
  const weight = d.columns.weight !== null ? `--weight ${d.columns.weight}` : 'equal weights';
  const what =
    d.kind === 'replicate'
      ? `${count(d.replicates ?? 0, 'replicate weight', 'replicate weights')}, ${df} (--replicate-method ${d.method}${d.rho !== null ? `, ρ ${d.rho}` : ''}${d.centre === 'full-sample' ? ', centred at the full-sample estimate' : ''}, ${weight})`
      : `${count(d.strata ?? 1, 'stratum', 'strata')}, ${count(d.clusters ?? 0, 'PSU', 'PSUs')}, ${df} (${[d.columns.strata !== null ? `--strata ${d.columns.strata}` : '', d.columns.cluster !== null ? `--cluster ${d.columns.cluster}` : 'each row its own PSU', d.columns.fpc !== null ? `--fpc ${d.columns.fpc}` : '', weight].filter((x) => x !== '').join(', ')})`;
  return `Survey design: ${what}; standard errors, design effects and the tests between columns are design-based (t on ${formatCount(d.degreesOfFreedom)} df), the overall test of each question and break variable is the design-based F (Rao–Scott, second order).`;
}

function designSummaryOf(e: DesignEstimate, cells: DesignCells): BannerDesign {
  const d = cells.design;
  return {
    kind: e.kind,
    strata: e.strata,
    clusters: e.psus,
    degreesOfFreedom: e.degreesOfFreedom,
    replicates: e.replicates,
    method: e.method,
    lonelyPsu: e.lonelyPsu,
    columns: {
      strata: d.kind === 'taylor' ? d.strata : null,
      cluster: d.kind === 'taylor' ? d.cluster : null,
      fpc: d.kind === 'taylor' ? d.fpc : null,
      weight: cells.weightColumn,
      replicates: cells.replicateColumns,
    },
    rho: d.kind === 'replicate' && d.method === 'fay' ? d.rho : null,
    centre: e.centre,
    lonelyStrata: e.lonelyStrata,
  };
}

/** The ratios (shares or means) of every column of a break (x), or of the Total (the last), from a design side. */
function sideRatios(side: DesignSide, x: number, num: ArrayLike<number>, den: ArrayLike<number>): DomainRatio[] | null {
  const estimate = side.estimates[x];
  if (!estimate) return null;
  return domainRatios(estimate, side.rows, side.cells[x].cellCount / side.rows, num, den);
}

/**
 * The pairwise tests of one break's columns and the marks they give: every
 * pair of tested columns, the p-values adjusted over the row's comparisons,
 * a column marked higher than another at the highest confidence level met.
 */
function marksFromTests(tests: { a: number; b: number; statistic: number; df: number | null; p: number }[], cells: { higherThan: BannerMark[]; marks: string }[], b: BannerBreak, context: Context): BannerComparison[] {
  const levels = context.settings.confidenceLevels;
  const adjusted = adjustPValues(tests.map((t) => t.p), context.settings.adjustment);
  const comparisons: BannerComparison[] = [];
  tests.forEach((pair, k) => {
    comparisons.push({ first: b.first + pair.a, second: b.first + pair.b, statistic: pair.statistic, df: pair.df, pValue: pair.p, adjustedPValue: adjusted[k] });
    const level = levels.find((l) => adjusted[k] < 1 - l);
    if (level === undefined || pair.statistic === 0) return;
    const [high, low] = pair.statistic > 0 ? [pair.a, pair.b] : [pair.b, pair.a];
    const key = context.columns[b.first + low].key as string;
    cells[high].higherThan.push({ column: b.first + low, key, confidence: level, shown: shownKey(key, level, levels) });
  });
  for (const cell of cells) {
    cell.higherThan.sort((m, n) => m.column - n.column);
    cell.marks = joinMarks(cell.higherThan);
  }
  return comparisons;
}

/** The design-based t tests between the tested columns of a break (designDomainRatios.ts). */
function designTests(estimate: DesignEstimate, ratios: DomainRatio[], tested: boolean[]): { a: number; b: number; statistic: number; df: number; p: number }[] {
  const out: { a: number; b: number; statistic: number; df: number; p: number }[] = [];
  for (let a = 0; a < ratios.length; a++)
    for (let c = a + 1; c < ratios.length; c++) {
      if (!tested[a] || !tested[c]) continue;
      const test = domainDifferenceTest(estimate, ratios[a], ratios[c]);
      if (test) out.push({ a, b: c, statistic: test.statistic, df: test.df, p: test.pValue });
    }
  return out;
}

/** Whether each column of a break is tested: a base at or above the minimum, with weight. */
function testedColumns(bases: BannerBase[], b: BannerBreak, context: Context): boolean[] {
  return bases.slice(b.first, b.first + b.count).map((base) => !base.small && base.weighted > 0);
}

/**
 * The design effect of each column's base (BannerBase.designEffect) from
 * the shares of the question's level (or answer) rows, or from the mean
 * when the question is shown by its mean only; the effective base follows.
 */
function fillDesignEffects(bases: BannerBase[], rows: BannerRow[], means: BannerMeanCell[] | null): void {
  bases.forEach((base, j) => {
    const effects: number[] = [];
    for (const row of rows) {
      if (row.kind === 'net') continue;
      const cell = row.cells[j];
      if (cell.standardError === null || cell.columnPercent === null) continue;
      const P = cell.columnPercent / 100;
      if (P > 0 && P < 1 && base.unweighted > 0) effects.push(((cell.standardError / 100) ** 2 * base.unweighted) / (P * (1 - P)));
    }
    if (effects.length === 0 && means) {
      const m = means[j];
      if (m.standardError !== null && m.sd !== null && m.sd > 0 && m.unweighted > 0) effects.push((m.standardError ** 2 * m.unweighted) / (m.sd * m.sd));
    }
    if (effects.length === 0) return;
    base.designEffect = effects.reduce((x, y) => x + y, 0) / effects.length;
    if (base.designEffect > 0) base.effective = base.unweighted / base.designEffect;
  });
}

/** Bases per report column from each cross's column totals over `rows` rows (or its base row). */
function basesOf(counts: QuestionCounts, rowsOf: (cross: CrossCounts) => number[], context: Context): BannerBase[] {
  const crosses = counts.crosses;
  const base = (cross: CrossCounts, column: number): BannerBase => {
    let weighted = 0;
    let unweighted = 0;
    let squares = 0;
    for (const row of rowsOf(cross)) {
      const cell = crossColumn(cross, row, column);
      weighted += cell.weighted;
      unweighted += cell.unweighted;
      squares += cell.squares;
    }
    return { unweighted, weighted, effective: effectiveBase(weighted, squares, context.kind), designEffect: null, small: unweighted < context.settings.minimumBase };
  };
  const out = [base(crosses[crosses.length - 1], 1)];
  context.layout.forEach((b, x) => {
    for (let j = 1; j <= b.count; j++) out.push(base(crosses[x], j));
  });
  return out;
}

/** Marks of the columns of each break variable from a test's `higherThan` (indexes within the break). */
function marksWithin(higher: { column: number; level: number }[][], first: number, context: Context): BannerMark[][] {
  const levels = context.settings.confidenceLevels;
  return higher.map((list) =>
    list.map((h) => {
      const column = first + h.column;
      const key = context.columns[column].key as string;
      return { column, key, confidence: h.level, shown: shownKey(key, h.level, levels) };
    }),
  );
}

const joinMarks = (marks: readonly BannerMark[]) => marks.map((m) => m.shown).join('');

/**
 * One row's cells over all report columns, with the column-proportion tests
 * within each break variable. `value(cross, column)` gives the row's count in
 * a cross's column.
 */
function rowCells(
  counts: QuestionCounts,
  value: (cross: CrossCounts, column: number) => { weighted: number; unweighted: number },
  bases: BannerBase[],
  context: Context,
  design: { side: DesignSide; num: ArrayLike<number>; den: ArrayLike<number> } | null = null,
): { cells: BannerCell[]; comparisons: BannerComparison[] } {
  const crosses = counts.crosses;
  const total = value(crosses[crosses.length - 1], 1);
  const comparisons: BannerComparison[] = [];
  const standardError = (ratios: DomainRatio[] | null, k: number) => {
    const v = ratios?.[k]?.variance;
    return v === null || v === undefined ? null : 100 * Math.sqrt(v);
  };
  const totalRatios = design ? sideRatios(design.side, context.layout.length, design.num, design.den) : null;
  const cells: BannerCell[] = [
    { count: total.weighted, unweighted: total.unweighted, columnPercent: share(total.weighted, bases[0].weighted), rowPercent: total.weighted > 0 ? 100 : null, standardError: standardError(totalRatios, 0), higherThan: [], marks: '' },
  ];
  context.layout.forEach((b, x) => {
    const cross = crosses[x];
    const within: { weighted: number; unweighted: number }[] = [];
    for (let j = 1; j <= b.count; j++) within.push(value(cross, j));
    const rowTotal = within.reduce((s, c) => s + c.weighted, 0);
    if (design) {
      // The design-based t of the difference of two domain shares, with their covariance (designDomainRatios.ts).
      const ratios = sideRatios(design.side, x, design.num, design.den);
      const own: BannerCell[] = within.map((c, k) => ({
        count: c.weighted,
        unweighted: c.unweighted,
        columnPercent: share(c.weighted, bases[b.first + k].weighted),
        rowPercent: share(c.weighted, rowTotal),
        standardError: standardError(ratios, k),
        higherThan: [],
        marks: '',
      }));
      const tests = ratios ? designTests(design.side.estimates[x] as DesignEstimate, ratios, testedColumns(bases, b, context)) : [];
      comparisons.push(...marksFromTests(tests, own, b, context));
      cells.push(...own);
      return;
    }
    const columnsOfTest: ProportionColumn[] = within.map((c, k) => {
      const base = bases[b.first + k];
      return { count: c.weighted, base: base.weighted, effectiveBase: base.effective, unweightedBase: base.unweighted };
    });
    const test = columnProportionTests(columnsOfTest, { confidenceLevels: context.settings.confidenceLevels, adjustment: context.settings.adjustment, minimumBase: context.settings.minimumBase });
    const marks = marksWithin(test.higherThan, b.first, context);
    for (const c of test.comparisons) comparisons.push({ first: b.first + c.first, second: b.first + c.second, statistic: c.z, df: null, pValue: c.pValue, adjustedPValue: c.adjustedPValue });
    within.forEach((c, k) =>
      cells.push({
        count: c.weighted,
        unweighted: c.unweighted,
        columnPercent: share(c.weighted, bases[b.first + k].weighted),
        rowPercent: share(c.weighted, rowTotal),
        standardError: null,
        higherThan: marks[k],
        marks: joinMarks(marks[k]),
      }),
    );
  });
  return { cells, comparisons };
}

function share(part: number, whole: number): number | null {
  return whole > 0 ? (100 * part) / whole : null;
}

function testsInfo(bases: BannerBase[], context: Context, b: BannerBreak): { untested: string[]; comparisonsPerRow: number } {
  const slice = bases.slice(b.first, b.first + b.count);
  const untested = slice.map((base, k) => (base.small || !(base.weighted > 0) ? (context.columns[b.first + k].key as string) : null)).filter((k): k is string => k !== null);
  const tested = b.count - untested.length;
  return { untested, comparisonsPerRow: (tested * (tested - 1)) / 2 };
}

function singleQuestion(q: Extract<QuestionInput, { kind: 'single' }>, counts: QuestionCounts, context: Context): BannerQuestion {
  const levelRows = q.labels.map((_l, i) => i);
  const bases = basesOf(counts, () => levelRows, context);
  const rows: BannerRow[] = [];
  const codes = q.codes;
  const side = context.design ? designSide((r) => codes[r] - 1, q.labels, context) : null;
  const ones = q.labels.map(() => 1);
  const setOf = (members: number[]) => q.labels.map((_l, i) => (members.includes(i) ? 1 : 0));
  const shareOf = (members: number[]) => (side ? { side, num: setOf(members), den: ones } : null);
  if (q.showLevels) {
    q.labels.forEach((label, i) => rows.push({ label, kind: 'level', members: null, ...rowCells(counts, (cross, j) => crossColumn(cross, i, j), bases, context, shareOf([i])) }));
    for (const net of q.nets) {
      // Levels are disjoint: a respondent holds one level, so the net's count is the sum over its levels and counts each respondent once.
      const value = (cross: CrossCounts, j: number) => {
        let weighted = 0;
        let unweighted = 0;
        for (const i of net.members) {
          const cell = crossColumn(cross, i, j);
          weighted += cell.weighted;
          unweighted += cell.unweighted;
        }
        return { weighted, unweighted };
      };
      rows.push({ label: net.name, kind: 'net', members: net.members.map((i) => q.labels[i]), ...rowCells(counts, value, bases, context, shareOf(net.members)) });
    }
  }
  const summary = q.scores ? meanCells(q.scores, counts, bases, context, side) : null;
  const tests = context.layout.map((b, x): BannerBreakTests => {
    const info = testsInfo(bases, context, b);
    if (!q.showLevels) return { break: b.name, association: null, reason: `a numeric question shown by its mean: the ${side ? 'design-based t tests' : 'Welch tests'} compare the columns`, ...info };
    const overall = pairAssociation(q.name, q.labels, b, counts.crosses[x], context, side?.cells[x] ?? null);
    return { break: b.name, ...overall, ...info };
  });
  if (side) fillDesignEffects(bases, rows, summary?.cells ?? null);
  return { name: q.name, title: q.title, kind: q.scores ? 'numeric' : 'single', source: null, bases, rows, means: summary?.cells ?? null, meanComparisons: summary?.comparisons ?? [], tests };
}

/**
 * The overall test of question × break: the table of levels × break levels
 * (empty rows and columns dropped, respondents missing either left out)
 * analysed exactly as `tabsight pair` analyses it, its verdict kept.
 */
function pairAssociation(name: string, labels: readonly string[], b: BannerBreak, cross: CrossCounts, context: Context, designCells: DesignCells | null): { association: BannerAssociation | null; reason: string | null } {
  const rowsKept = labels.map((_l, i) => i).filter((i) => [...Array(b.count).keys()].some((k) => cross.unweighted[i * cross.width + k + 1] > 0));
  const colsKept = [...Array(b.count).keys()].filter((k) => rowsKept.some((i) => cross.unweighted[i * cross.width + k + 1] > 0));
  if (rowsKept.length < 2 || colsKept.length < 2) {
    return { association: null, reason: `needs two levels on each side; ${rowsKept.length < 2 ? `${name} has ${rowsKept.length}` : `${b.name} has ${colsKept.length}`} among the respondents counted` };
  }
  const sumWeights = new CompensatedSum();
  const sumSquares = new CompensatedSum();
  let unweightedN = 0;
  const counts = rowsKept.map((i) =>
    colsKept.map((k) => {
      const cell = crossColumn(cross, i, k + 1);
      sumWeights.addPair(cell.weightedHi, cell.weightedLo);
      sumSquares.addPair(cell.squaresHi, cell.squaresLo);
      unweightedN += cell.unweighted;
      return cell.weighted;
    }),
  );
  let excluded = 0;
  for (let i = 0; i < labels.length; i++) excluded += cross.unweighted[i * cross.width];
  const breakLabels = context.breaks.find((x) => x.name === b.name)!.labels;
  const table: TwoWayTable = { rowName: name, colName: b.name, rowLevels: rowsKept.map((i) => labels[i]), colLevels: colsKept.map((k) => breakLabels[k]), counts };
  const weighting: Weighting = { kind: context.kind, sumWeights: sumWeights.value, sumSquaredWeights: context.kind === 'none' ? sumWeights.value : sumSquares.value, unweightedN };
  let record;
  try {
    // With a design: the same totals per PSU (or replicate) pair counts, so the same design-based F leads.
    record = analyzeTable(table, excluded, context.settings.analysis, weighting, designCells ? { cells: designCells, other: null } : null);
  } catch (error) {
    // A design that gives this table no variance or no degrees of freedom: the table is reported, not the banner stopped (as in scan).
    if (!(designCells && error instanceof TabsightError)) throw error;
    return { association: null, reason: error.message.replace(/^the table of .*? by .*?: /, '') };
  }
  const v = record.verdict;
  return {
    association: {
      kind: 'pair',
      pValue: v.pValue,
      passes: v.passes,
      evidence: v.evidence,
      statistic: record.tests.designF ? record.tests.designF.statistic : record.tests.pearson.statistic,
      df: record.tests.designF ? record.tests.designF.numDf : record.tests.pearson.df,
      denominatorDf: record.tests.designF ? record.tests.designF.denDf : null,
      verdict: v,
      biasCorrectedV: record.measures.biasCorrectedV,
      multipleResponse: null,
    },
    reason: null,
  };
}

/**
 * Mean and SD of the scores per column (weighted: x̄ = Σw x/Σw and
 * SD = √(Σw(x − x̄)²/Σw · n_eff/(n_eff − 1)), n_eff Kish's base; unweighted:
 * the usual n − 1 SD) and Welch t tests between the columns of each break
 * variable, adjusted within the break as the proportions are.
 */
function meanCells(scores: readonly (number | null)[], counts: QuestionCounts, bases: BannerBase[], context: Context, side: DesignSide | null): { cells: BannerMeanCell[]; comparisons: BannerComparison[] } {
  const summary = (cross: CrossCounts, column: number) => {
    let weighted = 0;
    let unweighted = 0;
    let squares = 0;
    let sum = 0;
    scores.forEach((x, i) => {
      if (x === null) return;
      const cell = crossColumn(cross, i, column);
      weighted += cell.weighted;
      unweighted += cell.unweighted;
      squares += cell.squares;
      sum += cell.weighted * x;
    });
    const effective = effectiveBase(weighted, squares, context.kind);
    const mean = weighted > 0 ? sum / weighted : null;
    let sd: number | null = null;
    if (mean !== null && effective > 1) {
      let deviation = 0;
      scores.forEach((x, i) => {
        if (x !== null) deviation += crossColumn(cross, i, column).weighted * (x - mean) ** 2;
      });
      sd = Math.sqrt((deviation / weighted) * (effective / (effective - 1)));
    }
    return { mean, sd, unweighted, weighted, effective, standardError: null as number | null, higherThan: [] as BannerMark[], marks: '' };
  };
  const crosses = counts.crosses;
  // With a design: the domain mean of the scores as a ratio of the cell proportions (num = score, den = [scored]).
  const num = scores.map((x) => x ?? 0);
  const den = scores.map((x) => (x === null ? 0 : 1));
  const errorOf = (ratios: DomainRatio[] | null, k: number) => {
    const v = ratios?.[k]?.variance;
    return v === null || v === undefined ? null : Math.sqrt(v);
  };
  const totalCell = summary(crosses[crosses.length - 1], 1);
  if (side) totalCell.standardError = errorOf(sideRatios(side, context.layout.length, num, den), 0);
  const out: BannerMeanCell[] = [totalCell];
  const comparisons: BannerComparison[] = [];
  const levels = context.settings.confidenceLevels;
  context.layout.forEach((b, x) => {
    const cells: BannerMeanCell[] = [];
    for (let j = 1; j <= b.count; j++) cells.push(summary(crosses[x], j));
    if (side) {
      // The design-based t of the difference of two domain means, with their covariance (designDomainRatios.ts).
      const ratios = sideRatios(side, x, num, den);
      cells.forEach((cell, k) => (cell.standardError = errorOf(ratios, k)));
      const tested = cells.map((c) => c.unweighted >= context.settings.minimumBase && c.mean !== null);
      const tests = ratios ? designTests(side.estimates[x] as DesignEstimate, ratios, tested) : [];
      comparisons.push(...marksFromTests(tests, cells, b, context));
      out.push(...cells);
      return;
    }
    const tested = cells.map((c) => c.unweighted >= context.settings.minimumBase && c.sd !== null);
    const pairs: { a: number; b: number; t: number; df: number; p: number }[] = [];
    for (let a = 0; a < cells.length; a++)
      for (let c = a + 1; c < cells.length; c++) {
        if (!tested[a] || !tested[c]) continue;
        const test = welchTTest({ mean: cells[a].mean as number, sd: cells[a].sd as number, n: cells[a].effective }, { mean: cells[c].mean as number, sd: cells[c].sd as number, n: cells[c].effective });
        if (test) pairs.push({ a, b: c, t: test.t, df: test.df, p: test.pValue });
      }
    const adjusted = adjustPValues(pairs.map((p) => p.p), context.settings.adjustment);
    pairs.forEach((pair, k) => {
      comparisons.push({ first: b.first + pair.a, second: b.first + pair.b, statistic: pair.t, df: pair.df, pValue: pair.p, adjustedPValue: adjusted[k] });
      const level = levels.find((l) => adjusted[k] < 1 - l);
      if (level === undefined || pair.t === 0) return;
      const [high, low] = pair.t > 0 ? [pair.a, pair.b] : [pair.b, pair.a];
      const key = context.columns[b.first + low].key as string;
      cells[high].higherThan.push({ column: b.first + low, key, confidence: level, shown: shownKey(key, level, levels) });
    });
    for (const cell of cells) {
      cell.higherThan.sort((m, n) => m.column - n.column);
      cell.marks = joinMarks(cell.higherThan);
      out.push(cell);
    }
  });
  return { cells: out, comparisons };
}

function multipleQuestion(q: Extract<QuestionInput, { kind: 'multiple' }>, counts: PatternCounts, masks: readonly number[], context: Context): BannerQuestion {
  const bases = basesOf(counts, () => [0], context);
  const rows: BannerRow[] = [];
  // With a design, each answer (and net) is its own row variable, chosen or not among the respondents in the base.
  const pattern = q.pattern;
  const chosenOf = (k: number) => {
    if (!context.design) return null;
    const mask = masks[k];
    return { side: designSide((r) => (pattern[r] < 0 ? -1 : (pattern[r] & mask) !== 0 ? 0 : 1), ['chosen', 'not chosen'], context), num: [1, 0], den: [1, 1] };
  };
  q.answers.forEach((label, j) => rows.push({ label, kind: 'answer', members: null, ...rowCells(counts, (cross, c) => crossColumn(cross, j + 1, c), bases, context, chosenOf(j)) }));
  q.nets.forEach((net, k) => {
    const row = q.answers.length + k + 1;
    rows.push({ label: net.name, kind: 'net', members: net.members.map((j) => q.answers[j]), ...rowCells(counts, (cross, c) => crossColumn(cross, row, c), bases, context, chosenOf(q.answers.length + k)) });
  });
  if (context.design) fillDesignEffects(bases, rows, null);
  const tests = context.layout.map((b, x): BannerBreakTests => {
    const info = testsInfo(bases, context, b);
    return { break: b.name, ...multipleAssociation(q, b, counts, x, context), ...info };
  });
  return { name: q.name, title: q.title, kind: 'multiple', source: q.source, bases, rows, means: null, meanComparisons: [], tests };
}

/**
 * The test of a multiple-response question × break (multiple marginal
 * independence, Bilder, Loughin & Nettleton 2000) from the respondents'
 * answer patterns per column. With sampling weights the patterns' weighted
 * counts are rescaled to the break's Kish effective base (as pair rescales a
 * weighted table); the chosen Rao–Scott-type referral leads.
 */
function multipleAssociation(q: Extract<QuestionInput, { kind: 'multiple' }>, b: BannerBreak, counts: PatternCounts, x: number, context: Context): { association: BannerAssociation | null; reason: string | null } {
  if (context.design) return { association: null, reason: 'no design-based test of multiple marginal independence: with a survey design only the column tests of each answer (design-based) are made' };
  const cross = counts.crosses[x];
  let sumWeights = 0;
  let sumSquares = 0;
  for (let k = 1; k <= b.count; k++) {
    const cell = crossColumn(cross, 0, k);
    sumWeights += cell.weighted;
    sumSquares += cell.squares;
  }
  const scale = context.kind === 'weight' && sumWeights > 0 ? effectiveBase(sumWeights, sumSquares, 'weight') / sumWeights : 1;
  const patterns: GroupAnswerPattern[] = [];
  for (const [key, entry] of counts.patterns[x]) {
    const column = key % cross.width;
    if (column === 0) continue;
    const pattern = (key - column) / cross.width;
    patterns.push({ group: column - 1, answers: q.answers.map((_a, j) => (Math.floor(pattern / 2 ** j) % 2 === 1 ? 1 : 0)), count: context.kind === 'none' ? entry.unweighted : entry.weighted * scale });
  }
  patterns.sort((p, r) => p.group - r.group || p.answers.join('').localeCompare(r.answers.join('')));
  const test = groupMultipleResponseTest(patterns);
  if (test === null) return { association: null, reason: `needs two columns of ${b.name} with respondents and an answer chosen by some but not all` };
  const referral = context.settings.multipleResponseReferral;
  const lead = referral === 'first-order' ? test.firstOrder : test.secondOrder;
  const alpha = context.settings.analysis.alpha;
  return {
    association: {
      kind: 'multiple-response',
      pValue: lead.pValue,
      passes: lead.pValue <= alpha,
      evidence: evidenceOf(lead.pValue, alpha),
      statistic: test.statistic,
      df: test.df,
      denominatorDf: null,
      verdict: null,
      biasCorrectedV: null,
      multipleResponse: {
        referral,
        firstOrder: { statistic: test.firstOrder.statistic, df: test.firstOrder.df, pValue: test.firstOrder.pValue },
        secondOrder: { statistic: test.secondOrder.statistic, df: test.secondOrder.df, pValue: test.secondOrder.pValue },
        answersLeftOut: test.answersLeftOut.map((j) => q.answers[j]),
      },
    },
    reason: null,
  };
}
