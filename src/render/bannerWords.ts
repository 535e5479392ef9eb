/**
 * The words of a banner report, shared by every format: what a cell shows,
 * the overall test of a question × break variable in a phrase, the legend
 * of the marks and the notes on method (tests, confidence levels, bases,
 * weighting).
 */
import type { BannerAssociation, BannerBreakTests, BannerCell, BannerCellPart, BannerMeanCell, BannerReport } from '../analysis/banner.js';
import { formatConfidence, formatCount, formatP, formatPercent, formatRatio, formatStatistic, UNDEFINED } from '../readableNumbers.js';
import { ADJUSTMENT_NAMES, comparison, evidenceWords, testName } from './words.js';

/** Marks a base below the minimum in the human-facing formats. */
export const SMALL_BASE_MARK = '!';

/** One part of a cell as text: column %, row % or count. */
export function cellPart(cell: BannerCell, part: BannerCellPart): string {
  if (part === 'col') return cell.columnPercent === null ? UNDEFINED : formatPercent(cell.columnPercent, 0);
  if (part === 'row') return cell.rowPercent === null ? UNDEFINED : formatPercent(cell.rowPercent, 0);
  if (part === 'se') return cell.standardError === null ? UNDEFINED : `±${formatPercent(cell.standardError, 1)}`;
  return formatCount(cell.count === Math.round(cell.count) ? cell.count : Math.round(cell.count * 10) / 10);
}

/** A mean as shown: two decimals (or the em dash). */
export function meanText(cell: BannerMeanCell, which: 'mean' | 'sd' | 'se'): string {
  const x = which === 'mean' ? cell.mean : which === 'sd' ? cell.sd : cell.standardError;
  return x === null ? UNDEFINED : formatStatistic(x, 2);
}

/** The design effect of a base as shown (or the em dash). */
export function designEffectText(value: number | null): string {
  return value === null ? UNDEFINED : formatRatio(value);
}

/** Whether the weighted base is shown: with sampling weights, or with a survey design. */
export function showsWeightedBase(report: BannerReport): boolean {
  return report.weighting === 'weight' || report.design !== null;
}

/** The overall test of one question × break variable in a phrase. */
export function associationWords(tests: BannerBreakTests, alpha: number): string {
  const a = tests.association;
  if (a === null) return `${tests.break}: no overall test (${tests.reason ?? 'not possible'})`;
  // An exact or simulated p-value has no statistic of its own: the chi-square beside it would not be the one that decides.
  const exact = a.verdict !== null && (a.verdict.test === 'fisher' || a.verdict.test === 'monteCarlo');
  const statistic = exact ? '' : `, ${formatStatistic(a.statistic)} on ${trimDf(a)} df`;
  return `${tests.break}: ${associationTest(a)}${statistic}, ${comparison(a.pValue, alpha, a.passes)}: ${a.passes ? evidenceWords(a.evidence) : 'not shown to differ'}`;
}

function trimDf(a: BannerAssociation): string {
  const df = a.multipleResponse ? (a.multipleResponse.referral === 'first-order' ? a.multipleResponse.firstOrder.df : a.multipleResponse.secondOrder.df) : a.df;
  const shown = (x: number) => (Number.isInteger(x) ? String(x) : x.toFixed(2));
  return a.denominatorDf === null ? shown(df) : `${shown(df)} and ${shown(a.denominatorDf)}`;
}

/** The name of the test that leads an association. */
export function associationTest(a: BannerAssociation): string {
  if (a.kind === 'multiple-response') return `multiple-response test (Bilder & Loughin, ${a.multipleResponse!.referral} Rao–Scott correction)`;
  return testName(a.verdict!.test);
}

/** The short verdict of an association for a table cell: "p 0.0123 ✓" (✓ where the record says it passes). */
export function associationShort(a: BannerAssociation | null): string {
  if (a === null) return UNDEFINED;
  return `p ${formatP(a.pValue)}${a.passes ? ' ✓' : ''}`;
}

/** The legend of the letters, in one sentence. */
export function markLegendWords(report: BannerReport): string {
  const s = report.settings;
  const [high, low] = s.confidenceLevels;
  const levels = low === undefined ? `at ${formatConfidence(high)} confidence` : `upper case at ${formatConfidence(high)} confidence, lower case at ${formatConfidence(low)}`;
  return `A letter beside a value: significantly higher than the column with that letter, within the same break variable (${levels}).`;
}

/** The notes on method, one sentence each (the text's foot, the spreadsheet's notes sheet). */
export function methodNotes(report: BannerReport): string[] {
  const s = report.settings;
  const notes: string[] = [];
  notes.push(markLegendWords(report));
  if (report.design) {
    notes.push(
      `Percentages: design-based t-test of the difference between two columns' shares of each break variable, its variance from the design covariance of the two domain shares (the covariance included: columns share PSUs), on ${formatCount(report.design.degreesOfFreedom)} df (Korn & Graubard 1999, §5.2); means: the same test on the domain means. The letters come from these tests.`,
    );
    notes.push('Design effect (base line): the mean over the question\'s levels of each column share\'s design variance over p(1 − p)/base (of the mean\'s over SD²/base for a question shown by its mean); the effective base is the base over it.');
  } else {
    notes.push(
      `Percentages: pooled two-proportion z-test between the columns of each break variable${s.effectiveBases ? ", on Kish's effective bases (weights ignore any clustering or strata of the design)" : ''}; means: Welch's t-test${s.effectiveBases ? ' (weighted means and SDs, effective bases)' : ''}.`,
    );
  }
  notes.push(`Multiple comparisons: ${s.adjustment === 'none' ? 'no adjustment (common practice: every pair of columns is tested at the level shown)' : `${ADJUSTMENT_NAMES[s.adjustment]} over the comparisons within each row of a break variable`}.`);
  notes.push(`Bases: respondents who answered the question; columns with fewer than ${s.minimumBase} (unweighted) are marked ${SMALL_BASE_MARK}, shown and not tested. The Total is not tested against its own columns.`);
  if (report.design) notes.push(`Overall test per question and break variable: the record of tabsight pair with the same design (the design-based F, Rao–Scott second order) at α ${s.alpha}; multiple-response questions have no design-based overall test, only the design-based column tests of each answer.`);
  else notes.push(`Overall test per question and break variable: the record of tabsight pair (chi-square, or an exact or simulated test for small counts) at α ${s.alpha}; for multiple-response questions Bilder & Loughin's test of multiple marginal independence with the ${s.multipleResponseReferral} Rao–Scott-type correction.`);
  if (report.weighting === 'weight') notes.push('Counts and percentages are weighted (sums of the sampling weights); bases are shown unweighted and weighted.');
  if (report.weighting === 'freq') notes.push('Rows are weighted by their frequencies.');
  notes.push('Multiple-response questions: percentages of respondents (the base), so answers may add to more than 100%; a net counts each respondent once.');
  notes.push('Many tests are made in a banner: some differences will be marked by chance alone.');
  return notes;
}

/** The input line: file, respondents, weighting. */
export function bannerInputLine(report: BannerReport): string {
  const i = report.input;
  const parts = [`${i.file}: ${formatCount(report.respondents)} respondents`];
  if (i.filtered > 0) parts.push(`${formatCount(i.filtered)} rows left out by --where`);
  if (i.badRowsSkipped > 0) parts.push(`${formatCount(i.badRowsSkipped)} bad rows skipped`);
  if (i.badWeightsSkipped > 0) parts.push(`${formatCount(i.badWeightsSkipped)} rows with an unusable weight skipped`);
  if (report.weighting !== 'none') parts.push(report.weighting === 'weight' ? 'weighted' : 'frequency-weighted');
  return parts.join('; ');
}

/** A question's heading: its name and, from the codebook, its text. */
export function questionHeading(q: { name: string; title: string | null }): string {
  return q.title ? `${q.name} · ${q.title}` : q.name;
}
