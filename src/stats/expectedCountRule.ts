/** Cochran's expected-count rule for the chi-square approximation. */
import { CountMatrix, isTwoByTwo } from './contingency.js';

export interface ExpectedCountCheck {
  passes: boolean;
  cells: number;
  cellsBelowFive: number;
  cellsBelowOne: number;
  smallestExpected: number;
  /** Share of cells with expected count below 5. */
  shareBelowFive: number;
}

/**
 * Cochran's rule for the chi-square approximation (Cochran 1954,
 * Biometrics 10, 417–451): no expected count below 1 and at most 20% of
 * cells below 5; for a 2×2 table, no expected count below 5 (common practice,
 * following the same paper's advice for 2×2 tables).
 *
 * @example
 * // Fisher's tea-tasting table (Fisher 1935, §2): every expected count is 2
 * expectedCountRule([[2, 2], [2, 2]]) // { passes: false, cellsBelowFive: 4, … }
 */
export function expectedCountRule(expected: CountMatrix): ExpectedCountCheck {
  let cells = 0;
  let cellsBelowFive = 0;
  let cellsBelowOne = 0;
  let smallestExpected = Infinity;
  for (const row of expected) {
    for (const e of row) {
      cells++;
      if (e < 5) cellsBelowFive++;
      if (e < 1) cellsBelowOne++;
      if (e < smallestExpected) smallestExpected = e;
    }
  }
  const shareBelowFive = cells === 0 ? 0 : cellsBelowFive / cells;
  const passes = isTwoByTwo(expected) ? cellsBelowFive === 0 : cellsBelowOne === 0 && shareBelowFive <= 0.2;
  return { passes, cells, cellsBelowFive, cellsBelowOne, smallestExpected, shareBelowFive };
}
