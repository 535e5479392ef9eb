import { TwoWayTable } from './twoWayTable.js';

export interface CodedColumn {
  name: string;
  /** Labels in report order. */
  labels: string[];
  /** Per row: 1-based index into labels, 0 for missing. */
  codes: ArrayLike<number>;
}

/**
 * Counts the table of two coded columns over their complete rows, one pass
 * of integer increments, then drops levels that occur only beside a missing
 * value in the other column.
 */
export function crossCount(rowColumn: CodedColumn, colColumn: CodedColumn): { table: TwoWayTable; excluded: number } {
  const a = rowColumn.codes;
  const b = colColumn.codes;
  // Code 0 (missing) gets row 0 / column 0 of a padded grid, so the loop has
  // no branch; the padding is the excluded count.
  const width = colColumn.labels.length + 1;
  const height = rowColumn.labels.length + 1;
  const grid = new Float64Array(height * width);
  const rows = a.length;
  for (let k = 0; k < rows; k++) grid[a[k] * width + b[k]]++;
  let excluded = 0;
  for (let j = 0; j < width; j++) excluded += grid[j];
  for (let i = 1; i < height; i++) excluded += grid[i * width];
  const rowKeep: number[] = [];
  const colKeep: number[] = [];
  for (let i = 1; i < height; i++) {
    let s = 0;
    for (let j = 1; j < width; j++) s += grid[i * width + j];
    if (s > 0) rowKeep.push(i);
  }
  for (let j = 1; j < width; j++) {
    let s = 0;
    for (let i = 1; i < height; i++) s += grid[i * width + j];
    if (s > 0) colKeep.push(j);
  }
  return {
    table: {
      rowName: rowColumn.name,
      colName: colColumn.name,
      rowLevels: rowKeep.map((i) => rowColumn.labels[i - 1]),
      colLevels: colKeep.map((j) => colColumn.labels[j - 1]),
      counts: rowKeep.map((i) => colKeep.map((j) => grid[i * width + j])),
    },
    excluded,
  };
}
