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
  const width = colColumn.labels.length;
  const cells = new Float64Array(rowColumn.labels.length * width);
  let excluded = 0;
  const rows = a.length;
  for (let k = 0; k < rows; k++) {
    const x = a[k];
    const y = b[k];
    if (x === 0 || y === 0) {
      excluded++;
      continue;
    }
    cells[(x - 1) * width + (y - 1)]++;
  }
  const rowKeep: number[] = [];
  const colKeep: number[] = [];
  for (let i = 0; i < rowColumn.labels.length; i++) {
    let s = 0;
    for (let j = 0; j < width; j++) s += cells[i * width + j];
    if (s > 0) rowKeep.push(i);
  }
  for (let j = 0; j < width; j++) {
    let s = 0;
    for (let i = 0; i < rowColumn.labels.length; i++) s += cells[i * width + j];
    if (s > 0) colKeep.push(j);
  }
  return {
    table: {
      rowName: rowColumn.name,
      colName: colColumn.name,
      rowLevels: rowKeep.map((i) => rowColumn.labels[i]),
      colLevels: colKeep.map((j) => colColumn.labels[j]),
      counts: rowKeep.map((i) => colKeep.map((j) => cells[i * width + j])),
    },
    excluded,
  };
}
