/**
 * Counting a table (pair, compare, count) from either route: the rows of
 * the built-in reader, or the groups the engine counted (engine/groups.ts).
 * Both go through the same rules, in this order: --where filters, then the
 * weight or frequency, then the missing-value rule; every row left out is
 * counted under its reason. The level shaping (order, --other, layers) is
 * src/table's.
 */
import { dataError, usageError } from '../errors.js';
import { checkTableSize } from '../table/limits.js';
import { pairFromBuckets } from '../numerics/compensatedSum.js';
import { CountedTable, ExcludedBy, mergeRareLevels, Stratum } from '../table/countedTable.js';
import { DesignCells, DesignCounter, SurveyDesign } from '../table/surveyDesign.js';
import { compareNatural } from '../table/naturalOrder.js';
import { TableCounter } from '../table/tableCounter.js';
import { dropEmptyLevels, MISSING_LEVEL, relabelTable, TwoWayTable } from '../table/twoWayTable.js';
import type { Weighting } from '../table/weighting.js';
import { twoProduct } from '../numerics/errorFree.js';
import { resolveColumn } from './columns.js';
import type { CountedInput } from './counting.js';
import { EngineInput } from './engine/files.js';
import type { Engine } from './engine/module.js';
import type { EngineGroup } from './engine/groups.js';
import { DEFAULT_DISTINCT_LIMIT, readRecords, ReaderOptions, ReadSummary } from './readRecords.js';
import { FieldInterner, MISSING_ID } from './fieldInterner.js';
import { ColumnLevels, ColumnValues, parseWeightValue, Recode, recodesByColumn, RowGate, UnmatchedValue, unmatchedValueWords, unmatchedWhereValues, unusedRecodeRules, weightError, WhereClause } from './rowRules.js';
import { checkCodebookColumns } from './codebookFile.js';
import { detectMissingTokens, missingTokenNotes } from './missingTokens.js';
import { checkReplicateCount, DesignRowRule, resolveReplicateColumns } from './designRows.js';
import { Codebook, codebookColumn } from '../table/codebook.js';
import { binsOf, indexCodebook, levelOrder, levelOutcome, LevelRules, missingLevelLabels, missingReasonOrder } from '../table/levelRules.js';
import { isMissingLooking } from '../table/missingLooking.js';
import { EngineFallback } from './engine/query.js';
import { IdTally } from './idTally.js';
import { rangeCountableSize, tallyInParallel, threadsFor } from './parallelCount.js';
import { binNumericLevels, CutSpec } from '../table/bins.js';
import { InputSource } from './source.js';

/** The table to count from a source: its columns and the rules that shape rows and levels. */
export interface TableRequest {
  rows: string;
  cols: string;
  /** A layer: one table per level of this column. */
  by?: string;
  /** The option that named the layer, for messages: --by (pair, count), --period (compare, waves). */
  byOption?: string;
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
  /** --codebook: value labels, level order, missing codes (docs/codebook.md). */
  codebook?: Codebook | null;
  /** --cuts: cut points by column (a codebook's cuts count too). */
  cuts?: CutSpec[];
  /** --bins k: a numeric side with more than k numbers is cut into k equal-frequency bins, as scan cuts it (a codebook's bins for a column win). */
  bins?: number | null;
  /** Keep the rows left out for a missing value by their values (count writes them, so that a count file keeps them). */
  keepExcludedCells?: boolean;
  /**
   * A survey design (strata, clusters, fpc, or replicate weights): its totals
   * are counted beside the table (per layer level with --by, each level an
   * independent sample), and every row of the sample is registered with it,
   * rows outside the table's domain included.
   */
  design?: SurveyDesign;
}

/** The rules a column's values pass before counting (table/levelRules.ts). */
export function columnRules(request: TableRequest, name: string, recodes = recodesByColumn(request.recodes)): LevelRules {
  const entry = codebookColumn(request.codebook, name) ?? null;
  const cuts = [...(request.cuts ?? [])].reverse().find((c) => c.column === name)?.cuts ?? entry?.cuts ?? null;
  return { codebook: entry, recode: recodes.get(name) ?? null, keepMissing: request.keepMissing, cuts };
}

/** Raw values a relabelled column (recode, cuts, codebook labels) may hold while counting; the level cap applies to its labels. */
export const RELABELLED_READING_CAP = 65534;

function relabelled(request: TableRequest, name: string): boolean {
  const rules = columnRules(request, name);
  return rules.recode !== null || (rules.cuts ?? null) !== null || (rules.codebook?.values.length ?? 0) > 0 || binsOf(rules, request.bins ?? null) !== null || request.other !== undefined;
}

/** Usage errors of a request, before anything is read. */
function checkRequest(request: TableRequest): void {
  if (request.rows === request.cols) throw usageError(`--rows and --cols both name "${request.rows}"; choose two different columns`);
  if (request.by !== undefined && (request.by === request.rows || request.by === request.cols)) throw usageError(`${request.byOption ?? '--by'} "${request.by}" is already --rows or --cols; choose a third column`);
  if (request.weight && [request.rows, request.cols, request.by].includes(request.weight.column)) {
    throw usageError(`${weightOption(request)} "${request.weight.column}" is also a variable of the table; choose a numeric column of its own`);
  }
  const design = request.design;
  if (design?.kind === 'taylor') {
    const numeric = [design.fpc, request.weight?.column].filter((c): c is string => c !== undefined && c !== null);
    for (const [option, column] of [
      ['--strata', design.strata],
      ['--cluster', design.cluster],
    ] as const) {
      if (column !== null && numeric.includes(column)) throw usageError(`${option} "${column}" is also the ${column === design.fpc ? '--fpc' : '--weight'} column; a stratum or cluster column holds labels, not numbers`);
    }
    if (design.fpc !== null && [request.rows, request.cols, request.by, ...request.where.map((w) => w.column)].includes(design.fpc)) {
      throw usageError(`--fpc "${design.fpc}" is also a variable of the table or a filter; choose the column of population sizes or sampling fractions`);
    }
    if (design.fpc !== null && design.fpc === request.weight?.column) throw usageError(`--fpc "${design.fpc}" is also the --weight column`);
  }
}

function weightOption(request: TableRequest): string {
  return request.weight?.kind === 'freq' ? '--freq' : '--weight';
}

/** The columns a request reads, one slot each, in this order: rows, cols, by, weight, filter columns, summed weights. */
class Slots {
  readonly names: string[] = [];
  readonly row: number;
  readonly col: number;
  readonly by: number;
  readonly weight: number;
  readonly where: number[];
  readonly sum: number;
  readonly squares: number;
  readonly strata: number;
  readonly cluster: number;
  readonly fpc: number;
  /** Replicate weight slots, known once the header is read. */
  replicates: number[] = [];
  private readonly options: string[] = [];

  constructor(private readonly request: TableRequest) {
    this.row = this.slot(request.rows, '--rows');
    this.col = this.slot(request.cols, '--cols');
    this.by = request.by !== undefined ? this.slot(request.by, request.byOption ?? '--by') : -1;
    this.weight = request.weight ? this.slot(request.weight.column, weightOption(request)) : -1;
    this.where = request.where.map((w) => this.slot(w.column, '--where'));
    this.sum = request.summedWeights ? this.slot(request.summedWeights.sum, '--summed-weights') : -1;
    this.squares = request.summedWeights ? this.slot(request.summedWeights.squares, '--summed-weights') : -1;
    const design = request.design?.kind === 'taylor' ? request.design : null;
    this.strata = design?.strata ? this.slot(design.strata, '--strata') : -1;
    this.cluster = design?.cluster ? this.slot(design.cluster, '--cluster') : -1;
    this.fpc = design?.fpc ? this.slot(design.fpc, '--fpc') : -1;
  }

  /** Slots read as text (numbers parsed by the row rules), not as level ids. */
  textSlots(): Set<number> {
    return new Set([this.weight, this.sum, this.squares, this.fpc, ...this.replicates].filter((slot) => slot >= 0));
  }

  /** The replicate weight columns, in order (none without a replicate design). */
  replicateNames(): string[] {
    return this.replicates.map((slot) => this.names[slot]);
  }

  private slot(name: string, option: string): number {
    const known = this.names.indexOf(name);
    if (known >= 0) return known;
    this.names.push(name);
    this.options.push(option);
    return this.names.length - 1;
  }

  /** The header index of each slot's column; an unknown column (or a misspelt --recode) is a usage error. */
  select(header: string[], recodes: ReadonlyMap<string, unknown>, label: string, codebook?: Codebook | null): number[] {
    for (const column of recodes.keys()) resolveColumn(column, header, '--recode', label);
    if (codebook) checkCodebookColumns(codebook, header, label);
    const design = this.request.design;
    if (design?.kind === 'replicate') {
      const names = resolveReplicateColumns(design.replicateColumns, header, label, (name) => resolveColumn(name, header, '--replicate-weights', label));
      const used = [this.request.rows, this.request.cols, this.request.by, this.request.weight?.column, ...this.request.where.map((w) => w.column)];
      const clash = names.find((name) => used.includes(name));
      if (clash !== undefined) throw usageError(`--replicate-weights names "${clash}", which is also a variable of the table, a filter or the --weight column`);
      this.replicates = names.map((name) => this.slot(name, '--replicate-weights'));
      checkReplicateCount(design, names.length);
    }
    return this.names.map((name, slot) => resolveColumn(name, header, this.options[slot], label));
  }
}

/** Rows left out for a missing value, by slot and reason. */
class ReasonTally {
  private readonly bySlot = new Map<number, Map<string, number>>();

  add(slot: number, reason: string, rows: number): void {
    let byReason = this.bySlot.get(slot);
    if (byReason === undefined) this.bySlot.set(slot, (byReason = new Map()));
    byReason.set(reason, (byReason.get(reason) ?? 0) + rows);
  }

  /** In slot order (rows, cols, layer), each column's reasons in the order its rules give (levelRules.ts: missingReasonOrder). */
  list(names: readonly string[], reasonOrder: (slot: number) => readonly string[]): ExcludedBy[] {
    return [...this.bySlot.entries()]
      .sort((a, b) => a[0] - b[0])
      .flatMap(([slot, byReason]) => {
        const order = reasonOrder(slot);
        const rank = (reason: string) => (order.includes(reason) ? order.indexOf(reason) : order.length);
        return [...byReason.entries()].sort((x, y) => rank(x[0]) - rank(y[0])).map(([reason, rows]) => ({ column: names[slot], reason, rows }));
      });
  }

  /** Adds another tally's rows (layer levels recoded alike). */
  merge(other: ReasonTally): void {
    for (const [slot, byReason] of other.bySlot) for (const [reason, rows] of byReason) this.add(slot, reason, rows);
  }
}

/**
 * The counters of one request: the pooled table, one per layer level, and
 * the rows left out for a missing value; with a survey design, its totals
 * beside the pooled table (or beside each layer's, each level its own
 * sample, when there is a layer).
 */
class LayeredCounter {
  readonly pooled: TableCounter;
  readonly strata = new Map<string, TableCounter>();
  private stratumOfId: (TableCounter | undefined)[] = [];
  /** Design totals of the pooled table (no layer), or by layer level. */
  pooledDesign: DesignCounter | null = null;
  readonly layerDesigns = new Map<TableCounter, DesignCounter>();
  excluded = 0;
  /** Rows left out, by slot and reason. */
  readonly reasons = new ReasonTally();
  /** Rows left out for a missing value of the table, by the value id of their (present) layer level: how many, and by slot and reason. */
  readonly excludedByLayer = new Map<number, number>();
  readonly reasonsByLayer = new Map<number, ReasonTally>();
  /** For count: the rows left out, by their combination of values as written (a JSON array of strings). */
  excludedCells: Map<string, number> | null = null;
  /** The value an id stands for, as read (for excludedCells). */
  raw: (slot: number, id: number) => string = () => '';
  /** With bins: rows per value id of the row and the column variable, over every row the filters keep (as scan bins them). */
  marginals: [Float64Array, Float64Array] | null = null;

  constructor(
    private readonly request: TableRequest,
    private readonly slots: Slots,
    private readonly label: (slot: number, id: number) => string,
    private readonly missingReason: (slot: number, id: number) => string | null,
  ) {
    this.pooled = this.tableCounter();
  }


  private tableCounter(): TableCounter {
    const cap = (name: string) => (relabelled(this.request, name) ? Math.max(RELABELLED_READING_CAP, this.request.maxLevels) : this.request.maxLevels);
    // --other merges levels before the cap applies (finishTables checks the merged table).
    return new TableCounter(this.request.rows, this.request.cols, this.request.maxLevels, this.request.weight !== undefined, { rows: cap(this.request.rows), cols: cap(this.request.cols) }, this.request.other === undefined);
  }

  /** The design counter a row belongs to (its layer's with a layer), or null when its layer value is missing. */
  designOf(ids: Int32Array): DesignCounter | null {
    const design = this.request.design as SurveyDesign;
    const { by } = this.slots;
    if (by < 0) return (this.pooledDesign ??= new DesignCounter(design, this.slots.replicates.length));
    const b = ids[by];
    if (this.missingReason(by, b) !== null) return null;
    const layer = this.stratum(b);
    let counter = this.layerDesigns.get(layer);
    if (counter === undefined) this.layerDesigns.set(layer, (counter = new DesignCounter(design, this.slots.replicates.length)));
    return counter;
  }

  /**
   * Counts `rows` rows of one combination of value ids, of total weight w
   * (+ wLow) and Σw² q (+ qLow); with a design, a row's unit (Taylor) or
   * replicate weights go to its design counter.
   */
  add(ids: Int32Array, rows: number, w: number, wLow: number, q: number, qLow: number, design: DesignCounter | null = null, unit = -1, replicates: Float64Array | null = null): void {
    const { row, col, by } = this.slots;
    const r = ids[row];
    const c = ids[col];
    const b = by >= 0 ? ids[by] : 1;
    if (this.marginals) {
      for (const [slot, id] of [
        [row, r],
        [col, c],
      ]) {
        if (id <= 0) continue;
        let tally = this.marginals[slot === row ? 0 : 1];
        if (id >= tally.length) {
          const grown = new Float64Array(Math.max(tally.length * 2, id + 1));
          grown.set(tally);
          tally = this.marginals[slot === row ? 0 : 1] = grown;
        }
        tally[id] += rows;
      }
    }
    const rowReason = this.missingReason(row, r);
    const colReason = this.missingReason(col, c);
    const byReason = by >= 0 ? this.missingReason(by, b) : null;
    if (rowReason !== null || colReason !== null || byReason !== null) {
      // With --freq a line stands for as many rows as its frequency says.
      if (this.request.weight?.kind === 'freq') rows = w + wLow;
      this.excluded += rows;
      if (this.excludedCells) {
        // As the value was written: empty, or the missing code itself, so that a count file read back leaves it out for the same reason.
        const value = (slot: number, id: number, reason: string | null) => (reason === null ? this.label(slot, id) : id <= 0 ? '' : this.raw(slot, id));
        const key = JSON.stringify([...(by >= 0 ? [value(by, b, byReason)] : []), value(row, r, rowReason), value(col, c, colReason)]);
        this.excludedCells.set(key, (this.excludedCells.get(key) ?? 0) + rows);
      }
      if (rowReason !== null) this.reasons.add(row, rowReason, rows);
      if (colReason !== null) this.reasons.add(col, colReason, rows);
      if (byReason !== null) this.reasons.add(by, byReason, rows);
      else if (by >= 0) {
        this.excludedByLayer.set(b, (this.excludedByLayer.get(b) ?? 0) + rows);
        let layer = this.reasonsByLayer.get(b);
        if (layer === undefined) this.reasonsByLayer.set(b, (layer = new ReasonTally()));
        if (rowReason !== null) layer.add(row, rowReason, rows);
        if (colReason !== null) layer.add(col, colReason, rows);
      }
      return;
    }
    this.pooled.add(r, c, rows, w, wLow, q, qLow);
    if (by >= 0) this.stratum(b).add(r, c, rows, w, wLow, q, qLow);
    if (design !== null) design.add(r, c, unit, w + wLow, replicates);
  }

  private stratum(b: number): TableCounter {
    let stratum = b >= 0 ? this.stratumOfId[b] : undefined;
    if (stratum === undefined) {
      const level = b < 0 ? '(beyond the level limit)' : this.label(this.slots.by, b);
      stratum = this.strata.get(level);
      if (stratum === undefined) {
        if (this.strata.size >= this.request.maxLevels) throw dataError(`${this.request.byOption ?? '--by'} "${this.request.by}" has more than --max-levels ${this.request.maxLevels} levels; raise --max-levels or merge levels`);
        stratum = this.tableCounter();
        this.strata.set(level, stratum);
      }
      if (b >= 0) this.stratumOfId[b] = stratum;
    }
    return stratum;
  }
}

/** Distinct combinations tallied before they are handed to the counter. */
const TALLY_FLUSH = 1 << 18;

/** Counts `rows` unweighted rows of one combination of ids: through the filters, then into the counter. */
function countGroup(ids: Int32Array, rows: number, gate: RowGate, counter: LayeredCounter): void {
  if (!gate.passesFilters(ids)) {
    gate.filtered += rows;
    return;
  }
  counter.add(ids, rows, rows, 0, rows, 0);
}

/** Reads the built-in reader's rows into the counter; returns what was read. */
async function countRows(
  source: InputSource,
  reader: ReaderOptions,
  request: TableRequest,
  slots: Slots,
  gate: RowGate,
  counter: LayeredCounter,
  onLabels: (labels: (readonly string[])[]) => void,
  designRule: () => DesignRowRule | null,
): Promise<ReadSummary> {
  const recodes = recodesByColumn(request.recodes);
  let labelsKnown = false;
  // Unweighted rows are tallied by their combination of ids, and each
  // combination goes through the filters and the counter once, as the
  // engine's groups do; the tally is emptied into the counter whenever it
  // grows large, so that its memory stays bounded.
  const tally = slots.weight < 0 && slots.sum < 0 && !request.design ? new IdTally(slots.names.length) : null;
  const flush = () => {
    tally?.forEach((ids, rows) => countGroup(ids, rows, gate, counter));
    tally?.clear();
  };
  const textSlots = new Set<number>();
  const select = (header: string[]) => {
    const selected = slots.select(header, recodes, source.label, request.codebook);
    for (const slot of slots.textSlots()) textSlots.add(slot);
    return selected;
  };
  if (tally !== null) {
    const threads = await threadsFor(source, reader);
    // In a series of files (reader.rangePool), every plain file is counted by the pool's threads.
    const pooled = reader.rangePool !== undefined && (threads > 1 || (await rangeCountableSize(source, reader)) !== null);
    const counted = pooled || threads > 1 ? await tallyInParallel(source, reader, select, threads, { run: reader.rangePool }) : null;
    if (counted !== null) {
      onLabels(counted.labels);
      counted.forEach((ids, rows) => countGroup(ids, rows, gate, counter));
      return counted.summary;
    }
  }
  const read = await readRecords(
    source,
    reader,
    select,
    (ids, line, texts, interners) => {
      if (!labelsKnown) {
        onLabels(interners.map((i) => i.labels));
        labelsKnown = true;
      }
      if (tally !== null) {
        tally.add(ids);
        if (tally.size >= TALLY_FLUSH) flush();
        return;
      }
      const rule = designRule();
      if (rule !== null) {
        // Every row of the sample belongs to the design, in the domain or not.
        let unit = -1;
        let design: DesignCounter | null = null;
        if (rule.isTaylor) {
          if (!rule.read(ids, texts, line, interners)) return;
          design = counter.designOf(ids);
          if (design !== null) unit = design.locate(rule.stratum, rule.cluster, rule.fpc, line);
        }
        const w = gate.admit(ids, texts, line);
        if (w < 0) return;
        if (!rule.isTaylor) {
          if (!rule.replicates(texts, line)) return;
          design = counter.designOf(ids);
        }
        counter.add(ids, 1, w, 0, w * w, 0, design, unit, rule.isTaylor ? null : rule.replicateWeights);
        return;
      }
      const w = gate.admit(ids, texts, line);
      if (w < 0) return;
      if (slots.sum < 0) {
        counter.add(ids, 1, w, 0, w * w, 0);
        return;
      }
      // A cell counted elsewhere: w rows, with Σw and Σw² as given.
      const sums = [slots.sum, slots.squares].map((slot) => {
        const value = parseWeightValue(texts[slot], 'weight', request.decimalComma);
        if (typeof value === 'string') throw weightError(source.label, line, '--summed-weights', slots.names[slot], value);
        return value;
      });
      counter.add(ids, w, sums[0], 0, sums[1], 0);
    },
    undefined,
    textSlots,
  );
  flush();
  if (!labelsKnown) onLabels(read.interners.map((i) => i.labels));
  const { interners: _interners, ...summary } = read;
  return summary;
}

/**
 * Reads the engine's groups into the counter: each group's values are interned
 * and filtered like a row's, and its weight sums (exact, from the engine) or
 * its unusable weight (judged by the reader's rule) are counted.
 */
async function countGroups(engine: EngineRoute, input: EngineInput, source: InputSource, reader: ReaderOptions, request: TableRequest, slots: Slots, gate: RowGate, counter: LayeredCounter, onLabels: (labels: (readonly string[])[]) => void): Promise<ReadSummary> {
  const recodes = recodesByColumn(request.recodes);
  const missing = new Set(reader.missing.map((m) => m.trim()));
  const interners = slots.names.map(() => new FieldInterner(missing, DEFAULT_DISTINCT_LIMIT));
  onLabels(interners.map((i) => i.labels));
  const ids = new Int32Array(slots.names.length);
  const weight = request.weight;
  // The engine's modules are loaded only on its route.
  const { engineGroups } = await import('./engine/groups.js');
  // Groups the engine already counted for this file (in one pass over several files) are handed on as they are.
  const groupsOf: typeof engineGroups = engine.replay
    ? async (_engine, _input, _reader, select, _weight, onGroup) => {
        select(engine.replay!.summary.header);
        for (const group of engine.replay!.groups) onGroup(group);
        return { ...engine.replay!.summary, byFile: null };
      }
    : engineGroups;
  const { byFile: _byFile, ...summary } = await groupsOf(
    engine.engine,
    input,
    reader,
    (header) => slots.select(header, recodes, source.label, request.codebook),
    weight ? { slot: slots.weight, kind: weight.kind, decimalComma: request.decimalComma } : null,
    (group) => {
      group.values.forEach((value, slot) => {
        if (slot !== slots.weight) ids[slot] = interners[slot].internString(value ?? '');
      });
      if (!gate.passesFilters(ids)) {
        gate.filtered += group.rows;
        return;
      }
      if (weight === undefined) {
        counter.add(ids, group.rows, group.rows, 0, group.rows, 0);
        return;
      }
      if (group.badWeight !== null) {
        // The reader's rule has the last word (the engine's pattern is only a first sieve).
        const parsed = parseWeightValue(group.badWeight, weight.kind, request.decimalComma);
        if (typeof parsed === 'string') {
          if (reader.skipBadRows) {
            gate.badWeights += group.rows;
            return;
          }
          if (!input.glob && input.format === 'csv') throw new EngineFallback('a weight to be named by its line');
          throw dataError(`${source.label}: ${weightOption(request)} column "${weight.column}" ${parsed} in ${group.rows.toLocaleString('en-US')} row${group.rows === 1 ? '' : 's'}; fix them or pass --skip-bad-rows to count and skip such rows`);
        }
        const [w, wLow] = twoProduct(group.rows, parsed);
        const [q, qLow] = twoProduct(group.rows, parsed * parsed);
        counter.add(ids, group.rows, w, wLow, q, qLow);
        return;
      }
      const [w, wLow] = pairFromBuckets(group.weightBuckets ?? []);
      const [q, qLow] = pairFromBuckets(group.squareBuckets ?? []);
      counter.add(ids, group.rows, w, wLow, q, qLow);
    },
  );
  return summary;
}

/**
 * The counted tables in report order: empty levels dropped, --other
 * applied, each layer laid out on the pooled table's levels; a side with
 * fewer than two levels is refused (unless the request allows it).
 */
function finishTables(
  request: TableRequest,
  counter: LayeredCounter,
  label: (slot: number, id: number) => string,
  slots: Slots,
  filtered: number,
  kind: Weighting['kind'],
  orderOf: (slot: number, levels: readonly string[]) => string[],
  reasonOrder: (slot: number) => readonly string[],
  unmatched: readonly UnmatchedValue[],
): { counted: CountedTable; unknownRowLevels: string[]; unknownColLevels: string[] } {
  const rowLabel = (id: number) => label(slots.row, id);
  const colLabel = (id: number) => label(slots.col, id);
  const finished = counter.pooled.finish(rowLabel, colLabel, request.rowOrder, request.colOrder);
  // Exclusions by layer level (ids recoded alike add up under their label).
  const excludedOfLevel = new Map<string, number>();
  for (const [id, rows] of counter.excludedByLayer) {
    const level = id < 0 ? '(beyond the level limit)' : label(slots.by, id);
    excludedOfLevel.set(level, (excludedOfLevel.get(level) ?? 0) + rows);
  }
  const reasonsOfLevel = new Map<string, ReasonTally>();
  for (const [id, tally] of counter.reasonsByLayer) {
    const level = id < 0 ? '(beyond the level limit)' : label(slots.by, id);
    let merged = reasonsOfLevel.get(level);
    if (merged === undefined) reasonsOfLevel.set(level, (merged = new ReasonTally()));
    merged.merge(tally);
  }
  let table = dropEmptyLevels(finished.table);
  if (slots.by >= 0) checkTableSize(request.rows, table.rowLevels.length, request.cols, table.colLevels.length, { name: request.by ?? '', levels: counter.strata.size });
  // Without an order option, a side takes the order of its codebook and recodes (natural order otherwise).
  const rowLevels = request.rowOrder ? table.rowLevels : orderOf(slots.row, table.rowLevels);
  const colLevels = request.colOrder ? table.colLevels : orderOf(slots.col, table.colLevels);
  table = relabelTable(table, rowLevels, colLevels);
  const designCells = (design: DesignCounter | null | undefined): DesignCells | null => {
    if (!request.design) return null;
    return (design ?? new DesignCounter(request.design, slots.replicates.length)).finish(request.weight?.column ?? null, slots.replicateNames(), rowLabel, colLabel);
  };
  // Layers in the order of their column's codebook and recodes (natural order otherwise), as the sides.
  const layerRank = new Map((slots.by >= 0 ? orderOf(slots.by, [...counter.strata.keys()]) : []).map((level, k) => [level, k]));
  const rankOf = (level: string) => layerRank.get(level) ?? Infinity;
  const own: Stratum[] | null =
    slots.by >= 0
      ? [...counter.strata.entries()]
          .sort((x, y) => rankOf(x[0]) - rankOf(y[0]) || compareNatural(x[0], y[0]))
          .map(([level, layer]) => ({
            level,
            table: layer.finish(rowLabel, colLabel).table,
            weighting: layer.weighting(kind),
            excluded: excludedOfLevel.get(level) ?? 0,
            ...(request.design ? { design: designCells(counter.layerDesigns.get(layer)) } : {}),
          }))
      : null;
  for (const s of own ?? []) s.excludedBy = reasonsOfLevel.get(s.level)?.list(slots.names, reasonOrder) ?? [];
  let strata = own?.map((s) => ({ ...s, table: relabelTable(s.table, table.rowLevels, table.colLevels) })) ?? null;
  if (request.other) {
    ({ table, strata } = mergeRareLevels(table, own, request.other.k, request.other.label));
    for (const [name, levels] of [
      [request.rows, table.rowLevels],
      [request.cols, table.colLevels],
    ] as const) {
      if (levels.length > request.maxLevels) throw dataError(`column "${name}" has ${levels.length.toLocaleString('en-US')} levels after --other ${request.other.k}, more than --max-levels ${request.maxLevels}; lower --other or raise --max-levels`);
    }
  }
  checkTestable(request, table, counter.excluded, filtered, unmatched);
  const design = request.design && slots.by < 0 ? { design: designCells(counter.pooledDesign) } : {};
  return { counted: { table, weighting: counter.pooled.weighting(kind), strata, excluded: counter.excluded, ...design }, unknownRowLevels: finished.unknownRowLevels, unknownColLevels: finished.unknownColLevels };
}

function checkTestable(request: TableRequest, table: TwoWayTable, excluded: number, filtered: number, unmatched: readonly UnmatchedValue[]): void {
  if (request.allowDegenerate) return;
  // A filter or recode that matched nothing is the likely cause: said in the same line.
  const hint = unmatched.length > 0 ? `; ${unmatchedValueWords(unmatched[0])}` : '';
  const leftOut = [excluded > 0 ? `${excluded.toLocaleString('en-US')} left out for a missing value` : '', filtered > 0 ? `${filtered.toLocaleString('en-US')} filtered out by --where` : '']
    .filter((s) => s !== '')
    .join(', ');
  for (const [name, levels] of [
    [request.rows, table.rowLevels],
    [request.cols, table.colLevels],
  ] as const) {
    if (levels.length === 0) throw dataError(`column "${name}" has no value in the counted rows${leftOut ? ` (${leftOut})` : ''}${hint}`);
    if (levels.length === 1) throw dataError(`column "${name}" has a single level ("${levels[0]}") in the counted rows; an association needs at least two${hint}`);
  }
}

/**
 * The --where values and --recode rules that no value of their column takes
 * (rowRules.ts), from the values each column read (every row, filtered ones
 * too); a column past the reader's distinct-value limit is not judged.
 */
function unmatchedValues(request: TableRequest, slots: Slots, labels: readonly ColumnLevels[], labelsOf: (readonly string[])[], missing: readonly string[]): UnmatchedValue[] {
  const values: ColumnValues = (column, stage) => {
    const slot = slots.names.indexOf(column);
    if (slot < 0) return null;
    const raw = labelsOf[slot] ?? [];
    if (raw.length >= DEFAULT_DISTINCT_LIMIT) return null;
    if (stage === 'filter') {
      const byRaw = new Map(raw.map((r, i) => [r, labels[slot].of(i + 1)]));
      return { raw, labelOf: (r) => byRaw.get(r) ?? r };
    }
    const rules: LevelRules = { ...labels[slot].rules, recode: null };
    const index = indexCodebook(rules.codebook);
    return {
      raw,
      labelOf: (r) => {
        const outcome = levelOutcome(rules, r, index);
        return outcome.kind === 'level' ? outcome.label : r;
      },
    };
  };
  return [...unmatchedWhereValues(request.where, values, missing), ...unusedRecodeRules(request.recodes, values)];
}

/**
 * Reads the source once and counts the table of two columns (and, with a
 * layer, one table per layer level), from the built-in reader's rows or,
 * with `engine`, from the engine's groups.
 */
export async function countTableWith(source: InputSource, reader: ReaderOptions, request: TableRequest, engine: ({ input: EngineInput } & EngineRoute) | null): Promise<CountedInput> {
  checkRequest(request);
  const recodes = recodesByColumn(request.recodes);
  const slots = new Slots(request);
  let labelsOf: (readonly string[])[] = [];
  const labels = slots.names.map(
    (name, slot) => new ColumnLevels(() => labelsOf[slot], columnRules(request, name, recodes)),
  );
  const label = (slot: number, id: number) => labels[slot].of(id);
  const gate = new RowGate(
    request.where.map((clause, k) => ({ clause, slot: slots.where[k], labels: labels[slots.where[k]] })),
    request.weight ? { slot: slots.weight, kind: request.weight.kind, column: request.weight.column, decimalComma: request.decimalComma } : null,
    reader.skipBadRows,
    source.label,
  );
  const counter = new LayeredCounter(request, slots, label, (slot, id) => labels[slot].missingReason(id));
  // Equal-frequency bins per side (--bins, or the codebook's bins), decided once the values are read.
  const binsOfSide = [slots.row, slots.col].map((slot) => binsOf(labels[slot].rules, request.bins ?? null));
  if (binsOfSide.some((k) => k !== null)) counter.marginals = [new Float64Array(64), new Float64Array(64)];
  if (request.keepExcludedCells) {
    counter.excludedCells = new Map();
    counter.raw = (slot, id) => labelsOf[slot]?.[id - 1] ?? '';
  }
  const onLabels = (known: (readonly string[])[]) => (labelsOf = known);
  // The design rule needs the replicate slots, which the header decides: made on the first row.
  let designRule: DesignRowRule | null = null;
  const ruleOfRows = (): DesignRowRule | null => {
    if (!request.design) return null;
    return (designRule ??= new DesignRowRule(request.design, { strata: slots.strata, cluster: slots.cluster, fpc: slots.fpc, replicates: slots.replicates }, (slot) => slots.names[slot], source.label, reader.skipBadRows, request.decimalComma));
  };
  if (engine !== null && request.design) throw new Error('countTableWith: a survey design is counted by the built-in reader (io/counting.ts routes it)');
  const summary =
    engine === null
      ? await countRows(source, reader, request, slots, gate, counter, onLabels, ruleOfRows)
      : await countGroups(engine, engine.input, source, reader, request, slots, gate, counter, onLabels);
  if (summary.records === 0) throw dataError(`${source.label}: the header has no data rows under it`);
  // Filter and recode values no row holds (before bins relabel a side).
  const unmatched = unmatchedValues(request, slots, labels, labelsOf, reader.missing);
  // The bins of a numeric side: from its levels as counting sees them (missing values have no rows here), the rule of scan --bins (table/bins.ts).
  const binOrder = new Map<number, string[]>();
  if (counter.marginals) {
    [slots.row, slots.col].forEach((slot, side) => {
      const k = binsOfSide[side];
      if (k === null) return;
      const rules = labels[slot].rules;
      const values = labelsOf[slot] ?? [];
      const tally = counter.marginals![side];
      const levels = values.map((_v, i) => labels[slot].of(i + 1));
      const rows = values.map((_v, i) => (labels[slot].missingReason(i + 1) === null ? (tally[i + 1] ?? 0) : 0));
      const missingLevels = missingLevelLabels(rules);
      const binning = binNumericLevels(levels, rows, k, (level) => isMissingLooking(level) || (rules.keepMissing && missingLevels.has(level)));
      if (binning === null) return;
      labels[slot].useBins(['', ...binning.labelOf]);
      binOrder.set(slot, binning.order);
    });
  }
  const orderOf = (slot: number, levels: readonly string[]): string[] => {
    const bins = binOrder.get(slot);
    if (bins === undefined) return levelOrder(labels[slot].rules, levels);
    // Bins lowest first, then the levels kept beside them; anything else (the empty fields kept by --keep-missing) in the rules' order.
    return [...bins.filter((l) => levels.includes(l)), ...levelOrder(labels[slot].rules, levels.filter((l) => !bins.includes(l)))];
  };
  const kind: Weighting['kind'] = request.summedWeights ? 'weight' : request.weight ? request.weight.kind : 'none';
  const reasonOrder = (slot: number) => missingReasonOrder(labels[slot].rules);
  const { counted, unknownRowLevels, unknownColLevels } = finishTables(request, counter, label, slots, gate.filtered, kind, orderOf, reasonOrder, unmatched);
  // Values that commonly mean missing but are counted as levels: one note per column (io/missingTokens.ts).
  const declared = new Set([...reader.missing.map((m) => m.trim()), ...[slots.row, slots.col].flatMap((slot) => labels[slot].rules.codebook?.missing.map((m) => m.code) ?? [])]);
  const findings = detectMissingTokens(
    [slots.row, slots.col, ...(slots.by >= 0 ? [slots.by] : [])].map((slot) => ({ name: slots.names[slot], labels: labelsOf[slot] ?? [] })),
    declared,
  );
  const binnedNames = new Set([...binOrder.keys()].map((slot) => slots.names[slot]));
  const notes = missingTokenNotes(findings, (column) => (binnedNames.has(column) ? 'binned' : 'level'));
  return { ...counted, by: request.by ?? null, filtered: gate.filtered, badWeights: gate.badWeights, summary, unknownRowLevels, unknownColLevels, badDesign: (designRule as DesignRowRule | null)?.skipped ?? 0, excludedBy: counter.reasons.list(slots.names, reasonOrder), missingTokenNotes: notes, unmatched, rawValues: { rows: labelsOf[slots.row] ?? [], cols: labelsOf[slots.col] ?? [] }, excludedCells: counter.excludedCells ? [...counter.excludedCells].map(([key, rows]) => [JSON.parse(key) as string[], rows]) : [] };
}

/** The engine, and (one file of several counted in one pass) the groups it counted for that file with what it read of it. */
export interface EngineRoute {
  engine: Engine;
  replay?: { groups: EngineGroup[]; summary: ReadSummary };
}

/**
 * Counts the same table in each file of the input in one pass of the
 * engine, the file of each row being one more key of its groups; each
 * file's groups then go through countTableWith as that file's own, so that
 * each file is counted exactly as it would be alone (its summary, rows left
 * out and notes its own).
 */
export async function countFilesWith(engine: Engine, input: EngineInput, reader: ReaderOptions, request: TableRequest): Promise<CountedInput[]> {
  checkRequest(request);
  const { engineGroups } = await import('./engine/groups.js');
  const recodes = recodesByColumn(request.recodes);
  const slots = new Slots(request);
  const groups: EngineGroup[][] = input.files.map(() => []);
  const { byFile, ...summary } = await engineGroups(
    engine,
    input,
    reader,
    (header) => slots.select(header, recodes, input.label, request.codebook),
    request.weight ? { slot: slots.weight, kind: request.weight.kind, decimalComma: request.decimalComma } : null,
    (group) => groups[group.file].push(group),
    true,
  );
  const counted: CountedInput[] = [];
  for (const [k, file] of input.files.entries()) {
    const own: ReadSummary = { ...summary, records: byFile![k].records, blankLines: byFile![k].blankLines, files: 1 };
    counted.push(await countTableWith({ path: file, label: file }, reader, request, { engine, input, replay: { groups: groups[k], summary: own } }));
  }
  return counted;
}
