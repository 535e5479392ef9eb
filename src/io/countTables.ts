import { dataError, usageError } from '../errors.js';
import { compareNatural } from '../table/naturalOrder.js';
import { dropEmptyLevels, rareLevelMerge, relabelTable, TableCounter, TwoWayTable } from '../table/twoWayTable.js';
import { resolveColumn } from './columns.js';
import { MISSING_ID } from './fieldInterner.js';
import { readRecords, ReaderOptions, ReadSummary } from './readRecords.js';
import { RecodedLabels, Recode, recodesByColumn, RowGate, WhereClause } from './rowRules.js';
import { InputSource } from './source.js';
import type { Weighting } from '../table/weighting.js';

/** The label a missing value gets with --keep-missing. */
export const MISSING_LEVEL = '(missing)';

export interface CountPlan {
  rows: string;
  cols: string;
  /** A layer: one table per level of this column. */
  by?: string;
  /** Sampling weights (any non-negative number) or frequencies (whole numbers). */
  weight?: { column: string; kind: 'weight' | 'freq' };
  decimalComma: boolean;
  where: WhereClause[];
  recodes: Recode[];
  keepMissing: boolean;
  other?: { k: number; label: string };
  maxLevels: number;
  rowOrder?: string[];
  colOrder?: string[];
  /** Accept a table with fewer than two levels on a side (for writing counts, not testing). */
  allowDegenerate?: boolean;
}

export type { Weighting };

export interface Stratum {
  level: string;
  table: TwoWayTable;
  weighting: Weighting;
}

export interface CountedTables {
  table: TwoWayTable;
  weighting: Weighting;
  strata: Stratum[] | null;
  byName: string | null;
  /** Rows left out for a missing value in a selected column. */
  excluded: number;
  /** Rows left out by --where. */
  filtered: number;
  /** Rows skipped for an unusable weight (with --skip-bad-rows). */
  badWeights: number;
  summary: ReadSummary;
  unknownRowLevels: string[];
  unknownColLevels: string[];
}

interface Accumulator {
  counter: TableCounter;
  sumWeights: number;
  sumSquaredWeights: number;
  rows: number;
}

function weighting(acc: Accumulator, kind: Weighting['kind']): Weighting {
  return { kind, sumWeights: acc.sumWeights, sumSquaredWeights: acc.sumSquaredWeights, unweightedN: acc.rows };
}

/**
 * Reads the source once and counts the table of two columns (and, with a
 * layer, one table per layer level): filters first, then weights, then the
 * missing-value rule. Every row left out is counted under its reason.
 */
export async function countTables(source: InputSource, reader: ReaderOptions, plan: CountPlan): Promise<CountedTables> {
  if (plan.rows === plan.cols) throw usageError(`--rows and --cols both name "${plan.rows}"; choose two different columns`);
  if (plan.by !== undefined && (plan.by === plan.rows || plan.by === plan.cols)) throw usageError(`--by "${plan.by}" is already --rows or --cols; choose a third column`);
  const weightOption = plan.weight?.kind === 'freq' ? '--freq' : '--weight';
  if (plan.weight && [plan.rows, plan.cols, plan.by].includes(plan.weight.column)) {
    throw usageError(`${weightOption} "${plan.weight.column}" is also a variable of the table; choose a numeric column of its own`);
  }
  const recodes = recodesByColumn(plan.recodes);
  // Slots: one per distinct column, in this order: rows, cols, by, weight, filter columns.
  const names: string[] = [];
  const slotOf = (name: string) => {
    const known = names.indexOf(name);
    if (known >= 0) return known;
    names.push(name);
    return names.length - 1;
  };
  const rowSlot = slotOf(plan.rows);
  const colSlot = slotOf(plan.cols);
  const bySlot = plan.by !== undefined ? slotOf(plan.by) : -1;
  const weightSlot = plan.weight ? slotOf(plan.weight.column) : -1;
  const whereSlots = plan.where.map((w) => slotOf(w.column));

  const pooled: Accumulator = { counter: new TableCounter(plan.rows, plan.cols, plan.maxLevels), sumWeights: 0, sumSquaredWeights: 0, rows: 0 };
  const strata = new Map<string, Accumulator>();
  let stratumOfId: (Accumulator | undefined)[] = [];
  let excluded = 0;
  let labelsOf: (readonly string[])[] = [];
  const labels = names.map((name, slot) => new RecodedLabels(() => labelsOf[slot], recodes.get(name), MISSING_LEVEL));
  const label = (slot: number, id: number) => labels[slot].of(id);
  const gate = new RowGate(
    plan.where.map((clause, k) => ({ clause, slot: whereSlots[k], labels: labels[whereSlots[k]] })),
    plan.weight ? { slot: weightSlot, kind: plan.weight.kind, column: plan.weight.column, decimalComma: plan.decimalComma } : null,
    reader.skipBadRows,
    source.label,
  );
  const keepMissing = plan.keepMissing;
  const kind: Weighting['kind'] = plan.weight ? plan.weight.kind : 'none';

  const summary = await readRecords(
    source,
    reader,
    (header) => {
      // A recode of a column this analysis does not use is harmless, but a misspelt one is not.
      for (const column of recodes.keys()) resolveColumn(column, header, '--recode', source.label);
      return names.map((name, slot) => {
        const option = slot === rowSlot ? '--rows' : slot === colSlot ? '--cols' : slot === bySlot ? '--by' : slot === weightSlot ? weightOption : '--where';
        return resolveColumn(name, header, option, source.label);
      });
    },
    (ids, line, texts, interners) => {
      if (labelsOf.length === 0) labelsOf = interners.map((i) => i.labels);
      const w = gate.admit(ids, texts, line);
      if (w < 0) return;
      const r = ids[rowSlot];
      const c = ids[colSlot];
      const b = bySlot >= 0 ? ids[bySlot] : 1;
      if (!keepMissing && (r === MISSING_ID || c === MISSING_ID || b === MISSING_ID)) {
        excluded++;
        return;
      }
      pooled.counter.add(r, c, w);
      pooled.sumWeights += w;
      pooled.sumSquaredWeights += w * w;
      pooled.rows++;
      if (bySlot >= 0) {
        let stratum = b >= 0 ? stratumOfId[b] : undefined;
        if (stratum === undefined) {
          const level = b < 0 ? '(beyond the level limit)' : label(bySlot, b);
          stratum = strata.get(level);
          if (stratum === undefined) {
            if (strata.size >= plan.maxLevels) throw dataError(`--by "${plan.by}" has more than --max-levels ${plan.maxLevels} levels; raise --max-levels or merge levels`);
            stratum = { counter: new TableCounter(plan.rows, plan.cols, plan.maxLevels), sumWeights: 0, sumSquaredWeights: 0, rows: 0 };
            strata.set(level, stratum);
          }
          if (b >= 0) stratumOfId[b] = stratum;
        }
        stratum.counter.add(r, c, w);
        stratum.sumWeights += w;
        stratum.sumSquaredWeights += w * w;
        stratum.rows++;
      }
    },
    undefined,
    weightSlot >= 0 ? new Set([weightSlot]) : new Set(),
  );
  if (summary.records === 0) throw dataError(`${source.label}: the header has no data rows under it`);
  if (labelsOf.length === 0) labelsOf = summary.interners.map((i) => i.labels);

  const finished = pooled.counter.finish((id) => label(rowSlot, id), (id) => label(colSlot, id), plan.rowOrder, plan.colOrder);
  let table = dropEmptyLevels(finished.table);
  let rowMap = (l: string) => l;
  let colMap = (l: string) => l;
  if (plan.other) {
    const merge = rareLevelMerge(table, plan.other.k, plan.other.label);
    table = relabelTable(table, merge.rowLevels, merge.colLevels, merge.rowMap, merge.colMap);
    rowMap = merge.rowMap;
    colMap = merge.colMap;
  }
  const leftOut = [
    excluded > 0 ? `${excluded.toLocaleString('en-US')} left out for a missing value` : '',
    gate.filtered > 0 ? `${gate.filtered.toLocaleString('en-US')} filtered out by --where` : '',
  ].filter((s) => s !== '').join(', ');
  for (const [name, levels] of [
    [plan.rows, table.rowLevels],
    [plan.cols, table.colLevels],
  ] as const) {
    if (levels.length === 0 && !plan.allowDegenerate) throw dataError(`column "${name}" has no value in the counted rows${leftOut ? ` (${leftOut})` : ''}`);
    if (levels.length === 1 && !plan.allowDegenerate) throw dataError(`column "${name}" has a single level ("${levels[0]}") in the counted rows; an association needs at least two`);
  }
  let strataOut: Stratum[] | null = null;
  if (bySlot >= 0) {
    strataOut = [...strata.entries()]
      .sort((x, y) => compareNatural(x[0], y[0]))
      .map(([level, acc]) => {
        const own = acc.counter.finish((id) => label(rowSlot, id), (id) => label(colSlot, id)).table;
        return { level, table: relabelTable(own, table.rowLevels, table.colLevels, rowMap, colMap), weighting: weighting(acc, kind) };
      });
  }
  return {
    table,
    weighting: weighting(pooled, kind),
    strata: strataOut,
    byName: plan.by ?? null,
    excluded,
    filtered: gate.filtered,
    badWeights: gate.badWeights,
    summary,
    unknownRowLevels: finished.unknownRowLevels,
    unknownColLevels: finished.unknownColLevels,
  };
}
