import type { Codes } from './encodedColumn.js';
import { addCompensated } from '../numerics/compensatedSum.js';
import { PsuCellTotals, ReplicateCellTotals, SampleDesignIndex } from '../stats/designTally.js';
import { gridDesignCells, type DesignCells, type RowDesign } from './surveyDesign.js';

/**
 * Counting a banner: one question (a code per respondent, or an answer
 * pattern per respondent for a multiple-response question) against every
 * break variable at once, in one pass over the rows, with the weighted and
 * unweighted counts and the sums of squared weights that the column bases
 * and Kish's effective bases need.
 */

/** A break variable's codes per row (1-based level codes, 0 missing) and its number of levels. */
export interface BreakCodes {
  codes: Codes;
  levels: number;
}

/**
 * The counts of one question against one break variable, laid out as
 * [row × (levels + 1) + column], column 0 holding respondents whose break
 * value is missing (they still count in the Total).
 */
export interface CrossCounts {
  /** Break levels + 1 (the missing slot). */
  width: number;
  /**
   * Weighted counts (equal to `unweighted` without weights), carried as
   * hi + lo (numerics/compensatedSum.ts) so that they do not depend on row
   * order and equal the sums pair counts: the value is weighted + weightedLow.
   */
  weighted: Float64Array;
  weightedLow: Float64Array;
  unweighted: Float64Array;
  /** Σw² per cell (equal to `weighted` without weights), as hi + lo. */
  squares: Float64Array;
  squaresLow: Float64Array;
}

/** What one question's pass counts: a CrossCounts per break, the Total as a break of one level last. */
export interface QuestionCounts {
  /** One per break variable, then the Total (one level). */
  crosses: CrossCounts[];
}

function newCross(rows: number, width: number): CrossCounts {
  const size = rows * width;
  return { width, weighted: new Float64Array(size), weightedLow: new Float64Array(size), unweighted: new Float64Array(size), squares: new Float64Array(size), squaresLow: new Float64Array(size) };
}

/**
 * Counts a single-response question (codes 1..levels, 0 missing) against
 * every break: row index = the question's code − 1; respondents with a
 * missing answer are not counted (they are outside the question's base).
 */
export function countSingle(question: Codes, levels: number, breaks: readonly BreakCodes[], weights?: Float64Array): QuestionCounts {
  const crosses = [...breaks.map((b) => newCross(levels, b.levels + 1)), newCross(levels, 2)];
  const n = question.length;
  for (let b = 0; b < breaks.length; b++) {
    const codes = breaks[b].codes;
    const { width, weighted, weightedLow, unweighted, squares, squaresLow } = crosses[b];
    if (weights) {
      for (let r = 0; r < n; r++) {
        const q = question[r];
        if (q === 0) continue;
        const at = (q - 1) * width + codes[r];
        const w = weights[r];
        unweighted[at]++;
        addCompensated(weighted, weightedLow, at, w);
        addCompensated(squares, squaresLow, at, w * w);
      }
    } else {
      for (let r = 0; r < n; r++) {
        const q = question[r];
        if (q !== 0) unweighted[(q - 1) * width + codes[r]]++;
      }
    }
  }
  const total = crosses[breaks.length];
  if (weights) {
    for (let r = 0; r < n; r++) {
      const q = question[r];
      if (q === 0) continue;
      const at = (q - 1) * 2 + 1;
      const w = weights[r];
      total.unweighted[at]++;
      addCompensated(total.weighted, total.weightedLow, at, w);
      addCompensated(total.squares, total.squaresLow, at, w * w);
    }
  } else {
    for (let r = 0; r < n; r++) if (question[r] !== 0) total.unweighted[(question[r] - 1) * 2 + 1]++;
  }
  if (!weights) {
    for (const cross of crosses) {
      cross.weighted.set(cross.unweighted);
      cross.squares.set(cross.unweighted);
    }
  }
  return { crosses };
}

/**
 * A multiple-response question: per respondent, the answers chosen as a bit
 * pattern (bit j = answer j), or −1 for a respondent outside the question's
 * base (no answer at all).
 */
export interface PatternCounts extends QuestionCounts {
  /**
   * The first row of each cross counts the respondents in the base (the
   * column's base); rows 1.. count the respondents whose pattern meets the
   * row's mask (each respondent once per row, however many of the row's
   * answers they chose).
   */
  rowMasks: number[];
  /** Per break (and the Total last): respondents per (pattern, column) with their weights. */
  patterns: Map<number, { unweighted: number; weighted: number }>[];
}

/**
 * Counts a multiple-response question against every break: row 0 is the
 * base, row k + 1 the respondents choosing any answer of mask k (an answer,
 * or a net of answers, counted once per respondent).
 */
export function countPatterns(pattern: Int32Array, masks: readonly number[], breaks: readonly BreakCodes[], weights?: Float64Array): PatternCounts {
  const rows = masks.length + 1;
  const crosses = [...breaks.map((b) => newCross(rows, b.levels + 1)), newCross(rows, 2)];
  const patterns = crosses.map(() => new Map<number, { unweighted: number; weighted: number }>());
  const n = pattern.length;
  const all = [...breaks, { codes: null, levels: 1 }];
  for (let r = 0; r < n; r++) {
    const p = pattern[r];
    if (p < 0) continue;
    const w = weights ? weights[r] : 1;
    for (let b = 0; b < all.length; b++) {
      const codes = all[b].codes;
      const column = codes === null ? 1 : codes[r];
      const cross = crosses[b];
      const width = cross.width;
      cross.unweighted[column]++;
      addCompensated(cross.weighted, cross.weightedLow, column, w);
      addCompensated(cross.squares, cross.squaresLow, column, w * w);
      for (let k = 0; k < masks.length; k++) {
        if ((p & masks[k]) === 0) continue;
        const at = (k + 1) * width + column;
        cross.unweighted[at]++;
        addCompensated(cross.weighted, cross.weightedLow, at, w);
        addCompensated(cross.squares, cross.squaresLow, at, w * w);
      }
      const key = p * width + column;
      const entry = patterns[b].get(key);
      if (entry) {
        entry.unweighted++;
        entry.weighted += w;
      } else patterns[b].set(key, { unweighted: 1, weighted: w });
    }
  }
  return { crosses, rowMasks: [...masks], patterns };
}

/** A column of the banner for design counting: a break's codes (1-based, 0 missing) and labels, or the Total (codes null). */
export interface DesignBreak {
  codes: Codes | null;
  labels: readonly string[];
}

/**
 * The design totals of one table row variable against every break (and the
 * Total), in one pass over the rows: per break a DesignCells of
 * rows × break levels (cells row-major, (i)·c + (j − 1)), per PSU (Taylor)
 * or per replicate. `rowOf(r)` is the row's level (0-based), or −1 for a
 * respondent outside the question's base, who stays in the design through
 * the design index (domain estimation) and adds nothing here. Memory:
 * units (PSUs, or strata when every row is its own PSU) × cells, or
 * (replicates + 1) × cells; the rows are read, not kept.
 */
export function countDesignCells(rowOf: (r: number) => number, rowLabels: readonly string[], breaks: readonly DesignBreak[], design: RowDesign, weights?: Float64Array): DesignCells[] {
  const n = design.units?.length ?? (design.replicateWeights ? design.replicateWeights.length / Math.max(1, design.replicateColumns.length) : 0);
  const R = design.replicateColumns.length;
  const taylor = design.index !== null && design.units !== null;
  const totals = breaks.map(() => (taylor ? new PsuCellTotals(design.index as SampleDesignIndex) : new ReplicateCellTotals(R)));
  const widths = breaks.map((b) => b.labels.length);
  const units = design.units;
  const replicateWeights = design.replicateWeights;
  for (let r = 0; r < n; r++) {
    const i = rowOf(r);
    if (i < 0) continue;
    const w = weights ? weights[r] : 1;
    const own = taylor ? null : (replicateWeights as Float64Array).subarray(r * R, (r + 1) * R);
    for (let b = 0; b < breaks.length; b++) {
      const codes = breaks[b].codes;
      const code = codes === null ? 1 : codes[r];
      if (code === 0) continue;
      const cell = i * widths[b] + code - 1;
      const t = totals[b];
      if (taylor) (t as PsuCellTotals).add((units as Int32Array)[r], cell, w);
      else (t as ReplicateCellTotals).add(cell, w, own as Float64Array);
    }
  }
  return breaks.map((b, k) => {
    const width = widths[k];
    const cells = rowLabels.length * width;
    const t = totals[k];
    // Every cell of the table has a place, seen or not, so that its layout is the identity.
    if (t instanceof PsuCellTotals) {
      if (t.cellCapacity < cells) {
        const counts = new Float64Array(cells);
        counts.set(t.counts.subarray(0, Math.min(t.counts.length, cells)));
        t.counts = counts;
        t.cellCapacity = cells;
      }
    } else if (t.cellCapacity < cells) {
      t.totals = t.totals.map((row) => {
        const grown = new Float64Array(cells);
        grown.set(row.subarray(0, Math.min(row.length, cells)));
        return grown;
      });
      const counts = new Float64Array(cells);
      counts.set(t.counts.subarray(0, Math.min(t.counts.length, cells)));
      t.counts = counts;
      t.cellCapacity = cells;
    }
    return gridDesignCells(design, t, rowLabels, b.labels);
  });
}
