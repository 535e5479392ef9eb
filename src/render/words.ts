/**
 * The words and phrases every human-facing format uses for the record's
 * facts.
 */
import type { AnalysisRecord, Statement, Verdict } from '../analysis/analyzeTable.js';
import type { DesignSummary } from '../analysis/design.js';
import type { Adjustment } from '../stats/multipleTesting.js';
import type { ExcludedBy } from '../table/countedTable.js';
import { formatConfidence, formatCount, formatLevel, formatMeasure, formatP, formatRatio, formatSigned } from '../readableNumbers.js';
import { GLUE, glued, shownLabel } from './layout.js';

/**
 * The words every human-facing format uses for the record's facts: the
 * renderers arrange these, none decides anything. Numbers inside a phrase
 * are glued to their label (GLUE) so that wrapping never orphans them.
 */

export const CAUTION =
  'Association is not causation. Large samples make trivial effects significant, and many tests ' +
  'inflate false findings; weights and survey designs change what a p-value means. Review the data yourself, and seek ' +
  'qualified statistical review before decisions that affect people (health, hiring, lending).';

export const ADJUSTMENT_NAMES: Record<Adjustment, string> = {
  bh: 'Benjamini–Hochberg (false discovery rate)',
  holm: 'Holm (family-wise error)',
  bonferroni: 'Bonferroni (family-wise error)',
  none: 'no adjustment',
};

/** A level in a sentence: always quoted, so that "no" reads as a level, not a word. */
export function quoteLevel(level: string): string {
  return `"${shownLabel(level)}"`;
}

export function testName(test: Verdict['test'], record?: Pick<AnalysisRecord, 'rows' | 'cols'>): string {
  const twoByTwo = record ? record.rows.levels.length === 2 && record.cols.levels.length === 2 : false;
  switch (test) {
    case 'pearson':
      return 'chi-square test';
    case 'fisher':
      return twoByTwo ? "Fisher's exact test" : 'exact test (network algorithm)';
    case 'monteCarlo':
      return 'simulated exact test';
    case 'designF':
      return 'design-based F test (Rao–Scott)';
    case 'cmh':
      return 'Cochran–Mantel–Haenszel test';
  }
}

/** "p 0.0123" glued, or "adjusted p 0.0456" when the decision uses an adjusted value. */
export function pPhrase(p: number, adjusted = false): string {
  return adjusted ? glued('adjusted', 'p', formatP(p)) : glued('p', formatP(p));
}

export function alphaPhrase(alpha: number): string {
  return glued('α', formatLevel(alpha));
}

/** The comparison the decision rests on: "p 0.003 ≤ α 0.05" or "p 0.2 > α 0.05". */
export function comparison(p: number, alpha: number, passes: boolean, adjusted = false): string {
  return `${pPhrase(p, adjusted)}${GLUE}${passes ? '≤' : '>'}${GLUE}${alphaPhrase(alpha)}`;
}

export function evidenceWords(evidence: Verdict['evidence']): string {
  return { strong: 'strong evidence', clear: 'clear evidence', some: 'some evidence', none: 'no convincing evidence' }[evidence];
}

/** The headline: the decision in a few words. */
export function headline(verdict: Verdict, by = 'the variable held fixed'): string {
  if (verdict.test === 'cmh') return verdict.passes ? `Associated within levels of ${by} (${evidenceWords(verdict.evidence)})` : `Not shown to be associated within levels of ${by}`;
  return verdict.passes ? `Associated (${evidenceWords(verdict.evidence)})` : 'Not shown to be associated';
}

/** Why the leading p-value leads, in a sentence. */
export function reasonSentence(record: Pick<AnalysisRecord, 'verdict' | 'tests' | 'rows' | 'cols' | 'expectedCountRule' | 'findings' | 'design'>, by?: string): string {
  const v = record.verdict;
  const rule = record.expectedCountRule;
  const sparse = `${rule.cellsBelowFive} of ${rule.cells} expected counts are under 5, too few for the chi-square approximation`;
  switch (v.reason) {
    case 'expected-counts-large':
      return 'Every expected count is large enough for the chi-square approximation (Cochran 1954), so its p-value leads.';
    case 'exact-for-small-counts':
      return `${sparse}, so the exact p-value leads.`;
    case 'simulated-for-small-counts': {
      const mc = record.tests.monteCarlo;
      const draws = mc ? glued(formatCount(mc.simulations), 'random') + ' tables' : 'random tables';
      const how =
        v.stoppedBecause === 'clearly-passes' || v.stoppedBecause === 'clearly-fails'
          ? `, drawn until the decision was clear (Besag & Clifford 1991; stopped at ${draws})`
          : mc
            ? ` from ${draws} with the same margins (seed ${mc.seed}, standard error ${formatP(mc.standardError)})`
            : '';
      return `${sparse} and the exact test is beyond its work bound, so a simulated exact p-value leads${how}.`;
    }
    case 'small-counts-no-exact': {
      const cause = record.findings.primaryTest.exactUnavailable;
      const because =
        cause === 'weighted'
          ? 'sampling weights give no whole counts for an exact test'
          : cause === 'non-integer'
            ? 'the counts are not whole numbers'
            : cause === 'exact-never'
              ? '--exact never was given'
              : cause === 'no-simulations'
                ? '--simulations 0 was given'
                : cause === 'design'
                  ? 'exact tests are not defined under a survey design'
                  : 'none could be computed';
      return `${sparse}, but no exact p-value exists (${because}): the chi-square p-value leads, to be read with care.`;
    }
    case 'survey-design':
      return record.design ? designReason(record.design) : 'A survey design was given, so the design-based F test leads.';
    case 'held-fixed':
      return `--by holds ${by ?? 'a variable'} fixed: the Cochran–Mantel–Haenszel test asks whether the association holds within its levels, so its p-value leads.`;
  }
}

export function strengthWords(record: Pick<AnalysisRecord, 'verdict' | 'measures'>): string {
  const m = record.measures;
  const word = record.verdict.strength ?? 'not defined';
  return `${word}: bias-corrected V ${formatMeasure(m.biasCorrectedV)}`;
}

/** The strength line of a report: "moderate: bias-corrected V 0.312. Cramér's V …"; with --by it is the pooled table's, and says so. */
export function strengthPhrase(record: Pick<AnalysisRecord, 'verdict' | 'measures'>): string {
  const m = record.measures;
  if (m.biasCorrectedV === null) return 'not defined for this table';
  const pooled = record.verdict.test === 'cmh' ? ' in the pooled table' : '';
  return `${record.verdict.strength}: bias-corrected V ${glued(formatMeasure(m.biasCorrectedV))}${pooled}. ${vIntervalWords(record)}.`;
}

/** "Cramér's V 0.719; for the population 0.552, 95% interval 0.377 to 0.710." */
export function vIntervalWords(record: Pick<AnalysisRecord, 'measures'>): string {
  const m = record.measures;
  const vi = m.cramersVInterval;
  if (!vi) return glued("Cramér's", 'V', formatMeasure(m.cramersV));
  return `${glued("Cramér's", 'V', formatMeasure(m.cramersV))}; in the population ${glued(formatMeasure(vi.estimate))} (${glued(formatConfidence(vi.confidence), 'interval')} ${glued(formatMeasure(vi.lower), 'to', formatMeasure(vi.upper))})`;
}

export function intervalWords(lower: number, upper: number, confidence: number, format: (x: number) => string = formatRatio): string {
  return `${glued(formatConfidence(confidence), 'interval')} ${glued(format(lower), 'to', format(upper))}`;
}

export function cellWords(record: Pick<AnalysisRecord, 'rows' | 'cols'>, s: Extract<Statement, { kind: 'cell' }>): string {
  return `${record.rows.name} ${quoteLevel(s.row)} goes with ${record.cols.name} ${quoteLevel(s.col)} ${s.direction === 'more' ? 'more' : 'less'} often than independence predicts (adjusted residual ${glued(formatSigned(s.adjustedResidual, 1))})`;
}

/** Each statement of the record in words, in the record's order. */
export function statementWords(record: Pick<AnalysisRecord, 'rows' | 'cols' | 'verdict' | 'findings'>, s: Statement): string {
  const { rows, cols } = record;
  const alpha = record.verdict.alpha;
  switch (s.kind) {
    case 'held-fixed': {
      const or = s.commonOddsRatio !== null ? `; common odds ratio ${glued(formatRatio(s.commonOddsRatio))}` : '';
      if (s.passes) return `Holding ${s.by} fixed, ${rows.name} and ${cols.name} are associated within its levels: ${evidenceWords(s.evidence)} (Cochran–Mantel–Haenszel ${comparison(s.pValue, alpha, true)}${or}).`;
      const explained = s.pooledPasses ? ` The association of the pooled table is accounted for by ${s.by}.` : '';
      return `Holding ${s.by} fixed, there is no convincing evidence that ${rows.name} and ${cols.name} are associated within its levels (Cochran–Mantel–Haenszel ${comparison(s.pValue, alpha, false)}${or}).${explained}`;
    }
    case 'association': {
      const scope = s.scope === 'pooled' ? 'In the pooled table, there is' : 'There is';
      const p = s.adjusted ? `${pPhrase(s.pValue)}, ${comparison(s.decidingPValue, alpha, s.passes, true)}` : comparison(s.pValue, alpha, s.passes);
      const strength = s.strength === null ? '' : s.passes ? `; its strength is ${s.strength} (bias-corrected V ${glued(formatMeasure(s.biasCorrectedV))})` : `; in this sample its strength is ${s.strength} (bias-corrected V ${glued(formatMeasure(s.biasCorrectedV))})`;
      return `${scope} ${evidenceWords(s.evidence)} of an association between ${rows.name} and ${cols.name} (${p})${strength}.`;
    }
    case 'diagonal': {
      const pair = (x: [string, string]) => `${quoteLevel(x[0])} with ${quoteLevel(x[1])}`;
      const corrected = s.corrected ? ', with 0.5 added to every cell' : '';
      if (s.earned) return `The ${s.which} diagonal dominates: ${pair(s.first)} and ${pair(s.second)} occur together more than independence predicts (Yule's Q ${glued(formatSigned(s.yulesQ))}${corrected}).`;
      const held = heldFixedExplains(record);
      if (held) return `In the pooled table the ${s.which} diagonal holds more than its share (${pair(s.first)}, ${pair(s.second)}; Yule's Q ${glued(formatSigned(s.yulesQ))}${corrected}), but holding ${held} fixed the data do not show it within its levels.`;
      return `In this sample the ${s.which} diagonal holds more than its share (${pair(s.first)}, ${pair(s.second)}; Yule's Q ${glued(formatSigned(s.yulesQ))}${corrected}), but the data do not show that this is more than chance.`;
    }
    case 'cell':
      return cellWords(record, s) + '.';
    case 'more-cells':
      return `And ${s.count} more ${s.count === 1 ? 'cell' : 'cells'} beyond ±${glued(trimZeros(record.findings.cellThreshold.adjusted.toFixed(2)))} (all are in --format json).`;
    case 'no-cell-stands-out':
      if (s.because === 'not-significant') {
        const held = heldFixedExplains(record);
        if (held) return `No cell stands out reliably: the cells of the pooled table depart from independence, but holding ${held} fixed there is no evidence of an association within its levels.`;
        return 'No cell stands out reliably: without evidence of an association, the departures of single cells are what chance alone produces.';
      }
      return `No single cell passes ±${glued(trimZeros(s.critical.toFixed(2)))} (the critical value for ${record.findings.cellThreshold.cells} cells at ${alphaPhrase(alpha)}); the association is spread thinly over the table.`;
    case 'mirror-cells':
      return `With two ${rows.levels.length === 2 ? 'rows' : 'columns'}, each cell below expectation mirrors one above it; the ${s.removed} mirrored ${s.removed === 1 ? 'cell is' : 'cells are'} not repeated.`;
  }
}

/** With --by: the variable held fixed when the pooled table passes but the layered test does not (the layer accounts for the association), else null. */
function heldFixedExplains(record: Pick<AnalysisRecord, 'findings'>): string | null {
  const held = record.findings.statements.find((x): x is Extract<Statement, { kind: 'held-fixed' }> => x.kind === 'held-fixed');
  return held && !held.passes && held.pooledPasses ? held.by : null;
}

export function trimZeros(text: string): string {
  return text.includes('.') ? text.replace(/0+$/, '').replace(/\.$/, '') : text;
}

/** The thresholds of the residual marks, in words (the same in text marks and pictures). */
export function markLegend(record: Pick<AnalysisRecord, 'findings'>): string {
  const t = record.findings.cellThreshold;
  if (t.cells === 1) return `▲▲ ▼▼ beyond ±${trimZeros(t.adjusted.toFixed(2))} (${alphaPhrase(t.alpha)}; the four cells of a 2×2 table carry one departure)`;
  return `▲▲ ▼▼ beyond ±${trimZeros(t.adjusted.toFixed(2))} (critical value for ${t.cells} ${t.cells === 1 ? 'cell' : 'cells'}, Bonferroni at ${alphaPhrase(t.alpha)}); ▲ ▼ beyond ±${trimZeros(t.single.toFixed(2))} (one cell on its own)`;
}

/** The options that describe the design: "--strata SDMVSTRA, --cluster SDMVPSU" or "--replicate-method fay, ρ 0.3". */
export function designOptionWords(d: DesignSummary): string {
  if (d.kind === 'replicate') {
    const rho = d.rho !== null ? `, ${glued('ρ', String(d.rho))}` : '';
    return `--replicate-method ${d.method}${rho}${d.centre === 'full-sample' ? ', centred at the full-sample estimate' : ''}`;
  }
  return [d.columns.strata !== null ? `--strata ${d.columns.strata}` : '', d.columns.cluster !== null ? `--cluster ${d.columns.cluster}` : 'each row its own PSU', d.columns.fpc !== null ? `--fpc ${d.columns.fpc}` : '']
    .filter((x) => x !== '')
    .join(', ');
}

/** The design in a few words: "15 strata, 31 PSUs, 16 degrees of freedom (--strata SDMVSTRA, --cluster SDMVPSU)". */
export function designWords(d: DesignSummary): string {
  const plural = (n: number, word: string, words = `${word}s`) => glued(formatCount(n), n === 1 ? word : words);
  const df = plural(d.degreesOfFreedom, 'degree of freedom', 'degrees of freedom');
  if (d.kind === 'replicate') return `${plural(d.replicates ?? 0, 'replicate weight')}, ${df} (${designOptionWords(d)})`;
  return `${plural(d.strata ?? 1, 'stratum', 'strata')}, ${plural(d.clusters ?? 0, 'PSU')}, ${df} (${designOptionWords(d)})`;
}

/** Why the design-based F test leads, in a sentence. */
export function designReason(d: DesignSummary): string {
  const carried = d.kind === 'replicate' ? 'the replicate weights carry the design into its p-value' : 'it carries the strata, clusters and weights into its p-value, assuming PSUs drawn with replacement and many of them';
  return `A survey design was given: ${designWords(d)}. The second-order Rao–Scott F test leads; ${carried}.`;
}

/** The mean design effect and what it does to the evidence, in words. */
export function designEffectWords(d: DesignSummary): string {
  const e = d.designEffects;
  const range = e.min !== null && e.max !== null && e.min !== e.max ? ` (from ${glued(formatRatio(e.min), 'to', formatRatio(e.max))})` : '';
  const change = e.mean >= 1 ? 'worth about as much as' : 'worth more: as much as';
  return `mean design effect ${glued(formatRatio(e.mean))}${range}: the ${glued(formatCount(d.n), 'rows')} in the table are ${change} ${glued(formatCount(Math.round(d.effectiveSampleSize)))} from a simple random sample (a mean design effect of 2 halves the evidence)`;
}

/** What the design-scaled V says. */
export function designVWords(v: { value: number; effectiveSampleSize: number }): string {
  return `${glued("Cramér's", 'V', formatMeasure(v.value))} of the design-scaled statistic: the strength of the association in the population the design represents; the design changes how sure one can be of it, not how strong it is`;
}

/** Which interval the design-based percentages carry. */
export function designIntervalWords(confidence: number, df: number): string {
  return `${glued(formatConfidence(confidence), 'intervals')}: logit, with t on ${glued(formatCount(df), 'df')}; Korn–Graubard (marked *) where a share is 0 or 1 or its rarer outcome has fewer than 10 design-effective cases`;
}

/** The rows left out, one phrase per column: "PID: 8 refused, 4 empty" (reasons in the record's order; numbers glued to their reason unless `plain`, for CSV cells). */
export function excludedByWords(excludedBy: readonly ExcludedBy[], plain = false): string[] {
  const columns = [...new Set(excludedBy.map((e) => e.column))];
  const phrase = (e: ExcludedBy) => (plain ? `${e.rows} ${e.reason}` : glued(formatCount(e.rows), e.reason));
  return columns.map((column) => `${column}: ${excludedBy.filter((e) => e.column === column).map(phrase).join(', ')}`);
}

/** "12 left out for a missing value (PID: 8 refused, 4 empty; vote: 3 empty)"; the reasons where the record has them. */
export function leftOutWords(excluded: number, excludedBy?: readonly ExcludedBy[]): string {
  const reasons = excludedBy && excludedBy.length > 0 ? ` (${excludedByWords(excludedBy).join('; ')})` : '';
  return `${glued(formatCount(excluded))} left out for a missing value${reasons}`;
}
