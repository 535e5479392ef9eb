/**
 * How large a table may grow, checked before it is counted or allocated, so
 * that time and memory stay bounded however many levels --max-levels lets
 * in: a two-way table (with its layers) of at most TABLE_CELL_LIMIT cells,
 * and a scan whose pairs hold at most SCAN_CELL_LIMIT cells together. Each
 * refusal is one line naming the columns and their levels (README,
 * "Failures and what the tool guarantees").
 */
import { dataError } from '../errors.js';

/** Cells of one table, layers included: about 7 s and 600 MB for pair on the machine of the README's Speed section. */
export const TABLE_CELL_LIMIT = 1_000_000;

/** Cells of all pairs of a scan together: the default --max-columns 300 with --max-levels 50 stays below it (112 million). */
export const SCAN_CELL_LIMIT = 200_000_000;

const count = (n: number) => n.toLocaleString('en-US');

/** Refuses a table of rows × cols (× layers) past TABLE_CELL_LIMIT. */
export function checkTableSize(rowName: string, rows: number, colName: string, cols: number, layer?: { name: string; levels: number }): void {
  const cells = rows * cols * (layer ? layer.levels : 1);
  if (cells <= TABLE_CELL_LIMIT) return;
  const shape = `${count(rows)} × ${count(cols)}${layer ? ` × ${count(layer.levels)} layers of "${layer.name}"` : ''}`;
  throw dataError(
    `the table of "${rowName}" by "${colName}" would have ${shape} = ${count(cells)} cells, more than the limit of ${count(TABLE_CELL_LIMIT)}; merge levels (--recode, --other, --cuts) or lower --max-levels`,
  );
}

/** Refuses a scan with a pair past TABLE_CELL_LIMIT or pairs past SCAN_CELL_LIMIT together, before any pair is counted. */
export function checkScanSize(columns: readonly { name: string; levels: number }[], layerLevels = 1): void {
  if (columns.length < 2) return;
  const [first, second] = [...columns].sort((x, y) => y.levels - x.levels);
  checkTableSize(first.name, first.levels, second.name, second.levels, layerLevels > 1 ? { name: 'the layer', levels: layerLevels } : undefined);
  // Σ_{a<b} r_a r_b = ((Σ r)² − Σ r²) / 2
  const sum = columns.reduce((s, c) => s + c.levels, 0);
  const squares = columns.reduce((s, c) => s + c.levels * c.levels, 0);
  const cells = ((sum * sum - squares) / 2) * layerLevels;
  if (cells <= SCAN_CELL_LIMIT) return;
  throw dataError(
    `the ${count((columns.length * (columns.length - 1)) / 2)} pairs of ${count(columns.length)} columns would have ${count(cells)} cells together, more than the scan's limit of ${count(SCAN_CELL_LIMIT)}; lower --max-levels, or choose columns with --columns or --exclude`,
  );
}
