/**
 * The built-in reader's scan: one read of the file, every candidate column
 * dictionary-encoded into a code per row (1 byte a cell while a column has
 * at most 255 levels, 2 up to 65,535), so that every pair's table is counted from the codes in
 * memory (table/countPair.ts) without reading again.
 */
import { statSync } from 'node:fs';
import { dataError } from '../errors.js';
import { countPair } from '../table/countPair.js';
import { Codes, GrowingCodes } from '../table/codes.js';
import { EncodedColumn, remapCodes } from '../table/encodedColumn.js';
import { isMissingLooking, numericIgnoringTokens } from '../table/missingLooking.js';
import { isNumericLabel } from '../table/naturalOrder.js';
import { ColumnsRequest, DISTINCT_TRACKING_LIMIT, RECODED_READING_CAP, scanSelection } from './columns.js';
import type { EncodedInput } from './counting.js';
import { MISSING_ID } from './fieldInterner.js';
import { readRecords, ReaderOptions, RecordSplit, SplitUnsettled } from './readRecords.js';
import { rangeCountableSize, RangeReaders, rangeReaders, SCAN_PARALLEL_MIN_BYTES, startsWithUtf8Mark, threadsFor } from './parallelCount.js';
import { RecodedLabels, RowGate } from './rowRules.js';
import { DesignRowRule } from './designRows.js';
import { SampleDesignIndex } from '../stats/designTally.js';
import type { RowDesign } from '../table/surveyDesign.js';
import { InputSource, isGzipFile } from './source.js';
import { countGridsOnTwoThreads } from './pairWorkers.js';
import type { OrderedColumn } from '../table/orderedColumn.js';

/** Rows read before the number of rows is estimated from the file's size (and the arrays sized for it). */
const ESTIMATE_AT = 1 << 14;
/** Growth of the arrays past the estimate (or without one: standard input, gzip). */
const GROWTH = 1.25;

/** Per-row numbers (`width` to a row: weights, a design's units or replicate weights), grown like the codes. */
class GrowingWeights<T extends Float64Array | Int32Array = Float64Array> {
  values: T;
  constructor(
    private readonly make: (length: number) => T = (length) => new Float64Array(length) as T,
    private readonly width = 1,
  ) {
    this.values = make(ESTIMATE_AT * width);
  }
  set(row: number, w: number): void {
    if (row >= this.values.length) this.reserve(Math.max(row + 1, Math.ceil(this.values.length * GROWTH)));
    this.values[row] = w;
  }
  /** A row's `width` numbers at once. */
  setRow(row: number, values: ArrayLike<number>): void {
    const end = (row + 1) * this.width;
    if (end > this.values.length) this.reserve(Math.max(row + 1, Math.ceil((this.values.length / this.width) * GROWTH)));
    this.values.set(values, row * this.width);
  }
  reserve(rows: number): void {
    if (rows * this.width <= this.values.length) return;
    const next = this.make(rows * this.width);
    next.set(this.values);
    this.values = next;
  }
  take(rows: number): T {
    this.reserve(rows);
    return this.values.subarray(0, rows * this.width) as T;
  }
}

interface ColumnState {
  name: string;
  /** Raw levels the column may hold while reading. */
  cap: number;
  /** Codes past this cannot be kept (the column is past its cap for good), unless the column may be binned. */
  dropAbove: number;
  codes: GrowingCodes | null;
  /** With binning asked for: the values checked so far are all numbers or missing-looking tokens (ids up to `checked`). */
  mayBeNumeric: boolean;
  checked: number;
  missing: number;
}

/**
 * Whether a column may still be binned: every value read so far (ids 1 up
 * to `id`) is a number or a missing-looking token. Checked once per new
 * value, from where the last check stopped.
 */
function stillNumeric(state: ColumnState, labels: readonly string[], id: number): boolean {
  for (; state.mayBeNumeric && state.checked < id && state.checked < labels.length; state.checked++) {
    const label = labels[state.checked];
    if (!isNumericLabel(label) && !isMissingLooking(label)) state.mayBeNumeric = false;
  }
  return state.mayBeNumeric;
}

/**
 * Reads the file once and dictionary-encodes every candidate column (and the
 * layer); the reader's ids are the codes: 0 missing, 1.. in order of first
 * appearance. Weights are kept per row for the pair counts.
 *
 * A large plain file is read in ranges on every core (io/readRecords.ts,
 * RecordSplit): the same rows, ids and messages as one thread gives; when
 * the ranges do not settle (an error of the file, a quote-state guess that
 * failed), the file is read again by one thread.
 */
export async function encodeWithReader(source: InputSource, reader: ReaderOptions, request: ColumnsRequest): Promise<EncodedInput> {
  const split = await rangesOf(source, reader);
  if (split !== null) {
    try {
      return await encodeOnce(source, reader, request, split);
    } catch (error) {
      if (!(error instanceof SplitUnsettled)) throw error;
    } finally {
      split.close();
    }
  }
  return encodeOnce(source, reader, request, null);
}

type Ranges = Omit<RecordSplit, 'overflowSafe'> & Pick<RangeReaders, 'keep' | 'close'>;

/** How a scan's file is cut into ranges (RecordSplit, without its overflow rule), or null for one thread: by size, under --threads auto. */
async function rangesOf(source: InputSource, reader: ReaderOptions): Promise<Ranges | null> {
  const given = reader.scanRanges;
  const size = await rangeCountableSize(source, reader);
  if (size === null) return null;
  const ranges = given?.cuts ? given.cuts.length + 1 : await threadsFor(source, reader, SCAN_PARALLEL_MIN_BYTES);
  if (ranges < 2) return null;
  const bom = await startsWithUtf8Mark(source.path);
  if (given?.read) return { size, bom, ranges, cuts: given.cuts, read: given.read, keep: () => null, close: () => undefined };
  // The workers start now, while this thread reads the header.
  const readers = await rangeReaders(ranges - 1);
  return { size, bom, ranges, cuts: given?.cuts, read: readers.read, keep: readers.keep, close: readers.close };
}

async function encodeOnce(source: InputSource, reader: ReaderOptions, request: ColumnsRequest, ranges: Ranges | null): Promise<EncodedInput> {
  const states: ColumnState[] = [];
  const wide = request.maxLevels >= 65535;
  // Codes are kept while they fit their array; the level cap is applied
  // after reading, to the values of the rows that were kept.
  const readingCap = wide ? DISTINCT_TRACKING_LIMIT : 65535;
  // Without filters, bad rows or weights no row is left out, so a code past
  // the cap already rules the column out: it is dropped at once.
  const rowsMayBeLeftOut = (request.where?.length ?? 0) > 0 || reader.skipBadRows || request.weight !== undefined;
  // The arrays are sized once from the file's size and the bytes of the first rows.
  const fileSize = await plainFileSize(source);
  let rows = 0;
  let layerSlot = -1;
  let layerState: ColumnState | null = null;
  let weightSlot = -1;
  let gate: RowGate | null = null;
  let internerLabels: (readonly string[])[] = [];
  let whereSlotsRead: number[] = [];
  const textSlots = new Set<number>();
  const weights = request.weight ? new GrowingWeights() : null;
  // A survey design: every row of the sample is registered with the index
  // (filtered rows too: their PSUs count); kept rows keep their unit or
  // their replicate weights.
  const design = request.design ?? null;
  const index = design?.kind === 'taylor' ? new SampleDesignIndex({ clustered: design.cluster !== null }) : null;
  const units = index !== null ? new GrowingWeights((length) => new Int32Array(length)) : null;
  let replicateWeights: GrowingWeights | null = null;
  let replicateColumns: string[] = [];
  let designRule: DesignRowRule | null = null;
  // Slots whose every id counts (filters, the layer, a design's units), and
  // whether a candidate column's may count too (see overflowSafe below).
  const exactSlots = new Set<number>();
  let candidateCount = 0;
  // A range refuses, past the distinct limit, values the ranges before it
  // hold. In a candidate column that only matters where binning may keep a
  // column past the cap while rows are left out: elsewhere the column is
  // past the limit in the whole file, and its codes are dropped either way.
  const split: RecordSplit | null =
    ranges === null ? null : { ...ranges, overflowSafe: (slot) => slot < candidateCount && !exactSlots.has(slot) && !(request.keepNumeric && rowsMayBeLeftOut) };
  const summary = await readRecords(
    source,
    reader,
    (header) => {
      const selection = scanSelection(header, request, source.label);
      const chosen = selection.candidates;
      const slots = [...chosen];
      candidateCount = chosen.length;
      const slotOf = (index: number) => {
        const at = slots.indexOf(index);
        if (at >= 0) return at;
        slots.push(index);
        return slots.length - 1;
      };
      for (const i of chosen) {
        const cap = request.recodes?.has(header[i]) || request.wide?.has(header[i]) ? Math.max(RECODED_READING_CAP, request.maxLevels) : (request.readingCap ?? request.maxLevels);
        states.push({
          name: header[i],
          codes: new GrowingCodes(ESTIMATE_AT),
          mayBeNumeric: request.keepNumeric,
          checked: 0,
          missing: 0,
          cap,
          dropAbove: rowsMayBeLeftOut ? readingCap : Math.min(cap, readingCap),
        });
      }
      if (selection.layer !== null) {
        const index = selection.layer;
        layerSlot = slotOf(index);
        exactSlots.add(layerSlot);
        layerState = { name: header[index], codes: new GrowingCodes(ESTIMATE_AT), mayBeNumeric: false, checked: 0, missing: 0, cap: RECODED_READING_CAP, dropAbove: RECODED_READING_CAP };
      }
      if (selection.weight !== null) weightSlot = slotOf(selection.weight);
      const whereSlots = selection.where.map((index) => slotOf(index));
      whereSlotsRead = whereSlots;
      for (const slot of whereSlots) exactSlots.add(slot);
      gate = new RowGate(
        (request.where ?? []).map((clause, k) => ({
          clause,
          slot: whereSlots[k],
          labels: new RecodedLabels(() => internerLabels[whereSlots[k]], request.recodes?.get(header[slots[whereSlots[k]]]), ''),
        })),
        request.weight && weightSlot >= 0 ? { slot: weightSlot, kind: request.weight.kind, column: request.weight.column, decimalComma: request.weight.decimalComma } : null,
        reader.skipBadRows,
        source.label,
      );
      if (weightSlot >= 0) textSlots.add(weightSlot);
      if (design !== null && selection.design !== null) {
        const d = selection.design;
        const designSlots = {
          strata: d.strata !== null ? slotOf(d.strata) : -1,
          cluster: d.cluster !== null ? slotOf(d.cluster) : -1,
          fpc: d.fpc !== null ? slotOf(d.fpc) : -1,
          replicates: d.replicates.map(slotOf),
        };
        for (const slot of [designSlots.strata, designSlots.cluster]) if (slot >= 0) exactSlots.add(slot);
        if (designSlots.fpc >= 0) textSlots.add(designSlots.fpc);
        for (const slot of designSlots.replicates) textSlots.add(slot);
        replicateColumns = d.replicates.map((i) => header[i]);
        if (replicateColumns.length > 0) replicateWeights = new GrowingWeights(undefined, replicateColumns.length);
        designRule = new DesignRowRule(design, designSlots, (slot) => header[slots[slot]], source.label, reader.skipBadRows, request.decimalComma === true);
      }
      return slots;
    },
    (ids, line, texts, interners, position) => {
      if (internerLabels.length === 0) internerLabels = interners.map((i) => i.labels);
      let unit = -1;
      const rule = designRule as DesignRowRule | null;
      if (rule !== null && index !== null) {
        if (!rule.read(ids, texts, line, interners)) return;
        unit = index.locate(rule.stratum, rule.cluster, rule.fpc, line);
      }
      const w = gate!.admit(ids, texts, line);
      if (w < 0) return;
      if (rule !== null && replicateWeights !== null && !rule.replicates(texts, line)) return;
      const row = rows++;
      if (row === ESTIMATE_AT && fileSize !== null) {
        // Rows to come, from the bytes the first ones took (a little over, so that one size usually does).
        const estimate = Math.ceil((row * fileSize * 1.05) / Math.max(1, position())) + ESTIMATE_AT;
        weights?.reserve(estimate);
        units?.reserve(estimate);
        replicateWeights?.reserve(estimate);
        layerState?.codes?.reserve(estimate);
        for (const state of states) {
          state.codes?.reserve(estimate);
        }
      }
      if (weights) weights.set(row, w);
      if (units !== null) units.set(row, unit);
      if (replicateWeights !== null) replicateWeights.setRow(row, (rule as DesignRowRule).replicateWeights);
      if (layerState && layerState.codes) {
        const id = ids[layerSlot];
        if (id === MISSING_ID) layerState.missing++;
        else if (id < 0 || id > layerState.cap) layerState.codes = null;
        else layerState.codes.set(row, id);
      }
      for (let k = 0; k < states.length; k++) {
        const state = states[k];
        const id = ids[k];
        if (id === MISSING_ID) {
          state.missing++;
          continue;
        }
        if (state.codes !== null) {
          // Past its cap a column is dropped, unless it may be binned: then it keeps its codes while its values read as numbers.
          if (id < 0 || (id > state.dropAbove && !stillNumeric(state, interners[k].labels, id))) state.codes = null;
          else state.codes.set(row, id);
        }
      }
      if (request.progress && (rows & 0xffff) === 0) request.progress(rows);
    },
    () => DISTINCT_TRACKING_LIMIT,
    textSlots,
    undefined,
    split ?? undefined,
  );
  if (rows === 0) throw dataError(`${source.label}: the header has no data rows under it`);
  // Values seen only in rows that were left out (--where, bad weights, bad
  // rows) are not levels of the kept rows: those columns are compacted.
  const designSkipped = (designRule as DesignRowRule | null)?.skipped ?? 0;
  const leftOut = ((gate as RowGate | null)?.filtered ?? 0) + ((gate as RowGate | null)?.badWeights ?? 0) + summary.badRows + designSkipped > 0;
  const columns = states.map<EncodedColumn>((state, k) => {
    const interner = summary.interners[k];
    let labels = interner.labels;
    let codes = state.codes?.take(rows) ?? null;
    if (leftOut && codes !== null) ({ codes, labels } = compactCodes(codes, labels));
    // Numbers apart from missing-looking tokens (table/missingLooking.ts); such a column keeps its codes past the cap when it may be binned.
    const { numeric, integer } = numericIgnoringTokens(labels);
    if (codes !== null && labels.length > state.cap && !(request.keepNumeric && numeric)) codes = null;
    return {
      name: state.name,
      labels: codes !== null ? labels : [],
      codes,
      missing: state.missing,
      distinct: labels.length,
      distinctCapped: interner.overflowed > 0,
      numeric,
      integer,
      missingLooking: labels.filter(isMissingLooking),
    };
  });
  let layer: EncodedColumn | null = null;
  const finalLayer = layerState as ColumnState | null;
  if (finalLayer) {
    layerState = finalLayer;
    const labels = summary.interners[layerSlot].labels;
    if (layerState.codes === null) throw dataError(`--by "${layerState.name}" has more than ${RECODED_READING_CAP.toLocaleString('en-US')} distinct values; a layer needs few levels`);
    layer = { name: layerState.name, labels, codes: layerState.codes.take(rows), missing: layerState.missing, distinct: labels.length, distinctCapped: false, numeric: false, integer: false, missingLooking: [] };
  }
  const rowWeights = weights ? { values: weights.take(rows), kind: request.weight!.kind } : undefined;
  // A thread that read a range stays to count half of the plain pairs (io/pairWorkers.ts).
  let helper = ranges?.keep() ?? null;
  const whereValues = whereSlotsRead.map((slot) => (summary.interners[slot].overflowed > 0 ? null : summary.interners[slot].labels));
  const { interners: _interners, ...read } = summary;
  const rowDesign: RowDesign | null =
    design === null
      ? null
      : {
          design,
          index,
          units: units !== null ? units.take(rows) : null,
          replicateWeights: replicateWeights !== null ? (replicateWeights as GrowingWeights).take(rows) : null,
          replicateColumns,
          weightColumn: request.weight?.column ?? null,
        };
  return {
    columns,
    layer,
    rows,
    filtered: (gate as RowGate | null)?.filtered ?? 0,
    badWeights: (gate as RowGate | null)?.badWeights ?? 0,
    badDesign: designSkipped,
    design: rowDesign,
    summary: read,
    whereValues,
    weights: rowWeights,
    countPairs: async (ordered, layerColumn) => {
      let grids: Map<OrderedColumn, Map<OrderedColumn, Uint32Array>> | null = null;
      const thread = helper;
      helper = null;
      if (thread !== null) {
        try {
          if (rowWeights === undefined && rowDesign === null && layerColumn === null && ordered.length > 2) grids = await countGridsOnTwoThreads(ordered, thread);
        } finally {
          void thread.terminate();
        }
      }
      return (a, b, layerColumn) => countPair(a, b, { weights: rowWeights, strata: layerColumn ?? undefined, design: rowDesign ?? undefined, grid: grids?.get(a)?.get(b) });
    },
  };
}

/** Codes renumbered 1, 2, … over the ids that occur (in order of id, in place), with their labels. */
function compactCodes(codes: Codes, labels: readonly string[]): { codes: Codes; labels: string[] } {
  const used = new Uint8Array(labels.length + 1);
  for (let r = 0; r < codes.length; r++) used[codes[r]] = 1;
  const remap = new Uint32Array(labels.length + 1);
  const kept: string[] = [];
  for (let id = 1; id <= labels.length; id++) {
    if (used[id]) {
      kept.push(labels[id - 1]);
      remap[id] = kept.length;
    }
  }
  return { codes: remapCodes(codes, remap, kept.length), labels: kept };
}

/** The size of a plain file (null for standard input, a pipe or gzip, whose rows cannot be estimated from it). */
async function plainFileSize(source: InputSource): Promise<number | null> {
  if (source.path === '-') return null;
  try {
    const stat = statSync(source.path);
    return stat.isFile() && !(await isGzipFile(source.path)) ? stat.size : null;
  } catch {
    return null; // the reader names the problem
  }
}

