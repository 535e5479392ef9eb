import { dataError, usageError } from '../errors.js';
import { compareNatural } from '../table/naturalOrder.js';
import { dropEmptyLevels, rareLevelMerge, relabelTable, TableCounter, TwoWayTable } from '../table/twoWayTable.js';
import { resolveColumn } from './columns.js';
import { MISSING_ID } from './fieldInterner.js';
import { DEFAULT_DISTINCT_LIMIT, readRecords, ReaderOptions, ReadSummary } from './readRecords.js';
import { parseWeightValue, weightError, RecodedLabels, Recode, recodesByColumn, RowGate, WhereClause } from './rowRules.js';
import { chooseEngine, EngineFallback, EngineInput, engineGroups, engineInput, EngineName } from './engine.js';
import { FieldInterner } from './fieldInterner.js';
import { CompensatedSum, pairFromBuckets } from '../table/compensatedSum.js';
import { twoProduct } from '../stats/exactArithmetic.js';
import { InputSource } from './source.js';
import type { Weighting } from '../table/weighting.js';

/** The label a missing value gets with --keep-missing. */
export const MISSING_LEVEL = '(missing)';

/** The table to count from a source: its columns and the rules that shape rows and levels. */
export interface TableRequest {
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
  /** With a --freq row count: columns holding each line's Σw and Σw² (cells counted elsewhere). */
  summedWeights?: { sum: string; squares: string };
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
  summary: CountSummary;
  unknownRowLevels: string[];
  unknownColLevels: string[];
}

interface Accumulator {
  counter: TableCounter;
  sumWeights: CompensatedSum;
  sumSquaredWeights: CompensatedSum;
  rows: number;
}

function accumulator(plan: TableRequest): Accumulator {
  return { counter: new TableCounter(plan.rows, plan.cols, plan.maxLevels, plan.weight !== undefined), sumWeights: new CompensatedSum(), sumSquaredWeights: new CompensatedSum(), rows: 0 };
}

function weighting(acc: Accumulator, kind: Weighting['kind']): Weighting {
  return { kind, sumWeights: acc.sumWeights.value, sumSquaredWeights: acc.sumSquaredWeights.value, unweightedN: acc.rows };
}

/** The reader's summary of what it read, whichever engine counted. */
export interface CountSummary extends Omit<ReadSummary, 'delimiter'> {
  delimiter: string | null;
  engine: EngineName;
  format: 'csv' | 'parquet';
  files: number;
}

/**
 * Reads the source once and counts the table of two columns (and, with a
 * layer, one table per layer level): filters first, then weights, then the
 * missing-value rule. Every row left out is counted under its reason. With
 * the engine, the rows arrive grouped (io/engine.ts) and go through the
 * same rules, a group at a time.
 */
export async function countTables(source: InputSource, reader: ReaderOptions, plan: TableRequest): Promise<CountedTables> {
  // Cells counted elsewhere are small files: the built-in reader reads them.
  const chosen = plan.summedWeights ? 'builtin' : await chooseEngine(reader.engine ?? 'builtin', source);
  if (chosen === 'duckdb') {
    const input = await engineInput(source);
    try {
      return await countOnce(source, reader, plan, input);
    } catch (error) {
      if (!(error instanceof EngineFallback)) throw error;
      // The note is worth saying only when the built-in reader succeeds; its error says the rest.
      const counted = await countOnce(source, reader, plan, null);
      reader.onNote?.(`the engine cannot read ${source.label} the way the built-in reader does (${error.message}); counted with the built-in reader`);
      return counted;
    }
  }
  return countOnce(source, reader, plan, null);
}

async function countOnce(source: InputSource, reader: ReaderOptions, plan: TableRequest, input: EngineInput | null): Promise<CountedTables> {
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
  const sumSlot = plan.summedWeights ? slotOf(plan.summedWeights.sum) : -1;
  const squaresSlot = plan.summedWeights ? slotOf(plan.summedWeights.squares) : -1;

  const pooled = accumulator(plan);
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
  const kind: Weighting['kind'] = plan.summedWeights ? 'weight' : plan.weight ? plan.weight.kind : 'none';
  const select = (header: string[]) => {
    // A recode of a column this analysis does not use is harmless, but a misspelt one is not.
    for (const column of recodes.keys()) resolveColumn(column, header, '--recode', source.label);
    return names.map((name, slot) => {
      const option = slot === rowSlot ? '--rows' : slot === colSlot ? '--cols' : slot === bySlot ? '--by' : slot === weightSlot ? weightOption : slot === sumSlot || slot === squaresSlot ? '--summed-weights' : '--where';
      return resolveColumn(name, header, option, source.label);
    });
  };

  /** Counts `rows` rows of one combination, of total weight w (+ wLow) and Σw² q (+ qLow). */
  const tally = (ids: Int32Array, rows: number, w: number, wLow: number, q: number, qLow: number) => {
    const r = ids[rowSlot];
    const c = ids[colSlot];
    const b = bySlot >= 0 ? ids[bySlot] : 1;
    if (!keepMissing && (r === MISSING_ID || c === MISSING_ID || b === MISSING_ID)) {
      excluded += rows;
      return;
    }
    pooled.counter.add(r, c, w, wLow);
    pooled.sumWeights.addPair(w, wLow);
    pooled.sumSquaredWeights.addPair(q, qLow);
    pooled.rows += rows;
    if (bySlot >= 0) {
      let stratum = b >= 0 ? stratumOfId[b] : undefined;
      if (stratum === undefined) {
        const level = b < 0 ? '(beyond the level limit)' : label(bySlot, b);
        stratum = strata.get(level);
        if (stratum === undefined) {
          if (strata.size >= plan.maxLevels) throw dataError(`--by "${plan.by}" has more than --max-levels ${plan.maxLevels} levels; raise --max-levels or merge levels`);
          stratum = accumulator(plan);
          strata.set(level, stratum);
        }
        if (b >= 0) stratumOfId[b] = stratum;
      }
      stratum.counter.add(r, c, w, wLow);
      stratum.sumWeights.addPair(w, wLow);
      stratum.sumSquaredWeights.addPair(q, qLow);
      stratum.rows += rows;
    }
  };

  let summary: CountSummary;
  if (input === null) {
    const read = await readRecords(
      source,
      reader,
      select,
      (ids, line, texts, interners) => {
        if (labelsOf.length === 0) labelsOf = interners.map((i) => i.labels);
        const w = gate.admit(ids, texts, line);
        if (w < 0) return;
        if (sumSlot < 0) {
          tally(ids, 1, w, 0, w * w, 0);
          return;
        }
        // A cell counted elsewhere: w rows, with Σw and Σw² as given.
        const sums = [sumSlot, squaresSlot].map((slot) => {
          const value = parseWeightValue(texts[slot], 'weight', plan.decimalComma);
          if (typeof value === 'string') throw weightError(source.label, line, '--summed-weights', names[slot], value);
          return value;
        });
        tally(ids, w, sums[0], 0, sums[1], 0);
      },
      undefined,
      new Set([weightSlot, sumSlot, squaresSlot].filter((slot) => slot >= 0)),
    );
    if (labelsOf.length === 0) labelsOf = read.interners.map((i) => i.labels);
    summary = { ...read, engine: 'builtin', format: 'csv', files: 1 };
  } else {
    const missing = new Set(reader.missing.map((m) => m.trim()));
    const interners = names.map(() => new FieldInterner(missing, DEFAULT_DISTINCT_LIMIT));
    labelsOf = interners.map((i) => i.labels);
    const ids = new Int32Array(names.length);
    const read = await engineGroups(
      input,
      reader,
      select,
      plan.weight ? { slot: weightSlot, kind: plan.weight.kind, decimalComma: plan.decimalComma } : null,
      (group) => {
        group.values.forEach((value, slot) => {
          if (slot !== weightSlot) ids[slot] = interners[slot].internString(value ?? '');
        });
        if (!gate.passesFilters(ids)) {
          gate.filtered += group.rows;
          return;
        }
        if (plan.weight === undefined) {
          tally(ids, group.rows, group.rows, 0, group.rows, 0);
          return;
        }
        if (group.badWeight !== null) {
          // The reader's rule has the last word (the engine's pattern is only a first sieve).
          const parsed = parseWeightValue(group.badWeight, plan.weight.kind, plan.decimalComma);
          if (typeof parsed === 'string') {
            if (reader.skipBadRows) {
              gate.badWeights += group.rows;
              return;
            }
            if (!input.glob && input.format === 'csv') throw new EngineFallback('a weight to be named by its line');
            throw dataError(`${source.label}: ${weightOption} column "${plan.weight.column}" ${parsed} in ${group.rows.toLocaleString('en-US')} row${group.rows === 1 ? '' : 's'}; fix them or pass --skip-bad-rows to count and skip such rows`);
          }
          const [w, wLow] = twoProduct(group.rows, parsed);
          const [q, qLow] = twoProduct(group.rows, parsed * parsed);
          tally(ids, group.rows, w, wLow, q, qLow);
          return;
        }
        const [w, wLow] = pairFromBuckets(group.weightBuckets ?? []);
        const [q, qLow] = pairFromBuckets(group.squareBuckets ?? []);
        tally(ids, group.rows, w, wLow, q, qLow);
      },
    );
    summary = { ...read, engine: 'duckdb' };
  }
  if (summary.records === 0) throw dataError(`${source.label}: the header has no data rows under it`);

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
