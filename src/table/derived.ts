/**
 * Whether one column of a table is a recoding of the other: each level of
 * one side occurs with exactly one level of the other (educ × educGroup).
 * Such a pair is associated by construction: with every level non-empty,
 * a level can only map to one level of a side with no more levels, and
 * then Cramér's V is 1 (Cramér 1946, Mathematical Methods of Statistics:
 * V reaches 1 exactly when each level of the larger side occurs with a
 * single level of the other). A scan reports such a pair apart instead of
 * ranking it as a finding.
 *
 * `colsFromRows`: every row level has one non-empty cell, so the column
 * value follows from the row value; `rowsFromCols` the other way round.
 * Levels with no rows are ignored. A table with a single row or column is
 * not called derived (there is nothing to relate).
 */
export interface Derivation {
  colsFromRows: boolean;
  rowsFromCols: boolean;
}

export function derivation(counts: readonly (readonly number[])[]): Derivation | null {
  const rows = counts.filter((row) => row.some((v) => v > 0));
  const width = counts[0]?.length ?? 0;
  const cols = Array.from({ length: width }, (_v, j) => j).filter((j) => counts.some((row) => row[j] > 0));
  if (rows.length < 2 || cols.length < 2) return null;
  const colsFromRows = rows.every((row) => row.filter((v) => v > 0).length === 1);
  const rowsFromCols = cols.every((j) => counts.filter((row) => row[j] > 0).length === 1);
  return colsFromRows || rowsFromCols ? { colsFromRows, rowsFromCols } : null;
}
