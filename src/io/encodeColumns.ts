/**
 * The built-in reader's scan: one read of the file, every candidate column
 * dictionary-encoded into a code per row (2 bytes a cell while levels fit
 * in 16 bits), so that every pair's table is counted from the codes in
 * memory (table/countPair.ts) without reading again.
 */
import { dataError } from '../errors.js';
import { countPair } from '../table/countPair.js';
import type { EncodedColumn } from '../table/encodedColumn.js';
import { isNumericLabel } from '../table/naturalOrder.js';
import { ColumnsRequest, DISTINCT_TRACKING_LIMIT, RECODED_READING_CAP, scanSelection } from './columns.js';
import type { EncodedInput } from './counting.js';
import { MISSING_ID } from './fieldInterner.js';
import { readRecords, ReaderOptions } from './readRecords.js';
import { RecodedLabels, RowGate } from './rowRules.js';
import { InputSource } from './source.js';

/** A typed array that grows as rows arrive; unwritten rows stay 0 (for codes: missing). */
class GrowableCodes<T extends Uint16Array | Uint32Array | Float64Array> {
  constructor(public array: T) {}
  set(index: number, code: number): void {
    if (index >= this.array.length) this.reserve(index + 1);
    this.array[index] = code;
  }
  reserve(length: number): void {
    if (length <= this.array.length) return;
    const grown = new (this.array.constructor as new (n: number) => T)(Math.max(this.array.length * 2, length));
    grown.set(this.array);
    this.array = grown;
  }
  take(length: number): T {
    this.reserve(length);
    return this.array.subarray(0, length) as T;
  }
}

interface ColumnState {
  name: string;
  /** Raw levels the column may hold while reading. */
  cap: number;
  codes: GrowableCodes<Uint16Array | Uint32Array> | null;
  /** Every row's value id, kept only for numeric columns when binning was asked for. */
  allIds: GrowableCodes<Uint32Array> | null;
  missing: number;
}

/**
 * Reads the file once and dictionary-encodes every candidate column (and the
 * layer); the reader's ids are the codes: 0 missing, 1.. in order of first
 * appearance. Weights are kept per row for the pair counts.
 */
export async function encodeWithReader(source: InputSource, reader: ReaderOptions, request: ColumnsRequest): Promise<EncodedInput> {
  const states: ColumnState[] = [];
  const wide = request.maxLevels >= 65535;
  // Codes are kept while they fit their array; the level cap is applied
  // after reading, to the values of the rows that were kept.
  const readingCap = wide ? DISTINCT_TRACKING_LIMIT : 65535;
  let rows = 0;
  let layerSlot = -1;
  let layerState: ColumnState | null = null;
  let weightSlot = -1;
  let gate: RowGate | null = null;
  let internerLabels: (readonly string[])[] = [];
  const textSlots = new Set<number>();
  const weights = request.weight ? new GrowableCodes(new Float64Array(1 << 14)) : null;
  const summary = await readRecords(
    source,
    reader,
    (header) => {
      const selection = scanSelection(header, request, source.label);
      const chosen = selection.candidates;
      const slots = [...chosen];
      const slotOf = (index: number) => {
        const at = slots.indexOf(index);
        if (at >= 0) return at;
        slots.push(index);
        return slots.length - 1;
      };
      for (const i of chosen) {
        states.push({
          name: header[i],
          codes: new GrowableCodes(wide ? new Uint32Array(1 << 14) : new Uint16Array(1 << 14)),
          allIds: request.keepNumeric ? new GrowableCodes(new Uint32Array(1 << 14)) : null,
          missing: 0,
          cap: request.recodes?.has(header[i]) ? Math.max(RECODED_READING_CAP, request.maxLevels) : request.maxLevels,
        });
      }
      if (selection.layer !== null) {
        const index = selection.layer;
        layerSlot = slotOf(index);
        layerState = { name: header[index], codes: new GrowableCodes(new Uint16Array(1 << 14)), allIds: null, missing: 0, cap: RECODED_READING_CAP };
      }
      if (selection.weight !== null) weightSlot = slotOf(selection.weight);
      const whereSlots = selection.where.map((index) => slotOf(index));
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
      return slots;
    },
    (ids, line, texts, interners) => {
      if (internerLabels.length === 0) internerLabels = interners.map((i) => i.labels);
      const w = gate!.admit(ids, texts, line);
      if (w < 0) return;
      const row = rows++;
      if (weights) weights.set(row, w);
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
          if (id > readingCap || id < 0) state.codes = null;
          else state.codes.set(row, id);
        }
        if (state.allIds !== null) {
          if (id < 0) state.allIds = null;
          else state.allIds.set(row, id);
        }
      }
      if (request.progress && (rows & 0xffff) === 0) request.progress(rows);
    },
    () => DISTINCT_TRACKING_LIMIT,
    textSlots,
  );
  if (rows === 0) throw dataError(`${source.label}: the header has no data rows under it`);
  // Values seen only in rows that were left out (--where, bad weights, bad
  // rows) are not levels of the kept rows: those columns are compacted.
  const leftOut = ((gate as RowGate | null)?.filtered ?? 0) + ((gate as RowGate | null)?.badWeights ?? 0) + summary.badRows > 0;
  const columns = states.map<EncodedColumn>((state, k) => {
    const interner = summary.interners[k];
    let labels = interner.labels;
    if (leftOut && state.codes !== null) {
      const compacted = compactCodes(state.codes.take(rows), labels);
      labels = compacted.labels;
      state.codes = new GrowableCodes(compacted.codes);
    }
    if (state.codes !== null && labels.length > state.cap) state.codes = null;
    const numeric = labels.length > 0 && labels.every(isNumericLabel);
    const allLabels = interner.labels;
    const integer = numeric && labels.every((l) => /^[+-]?\d+$/.test(l));
    let values: Float64Array | null = null;
    if (numeric && state.allIds !== null) {
      const numberOf = new Float64Array(labels.length + 1);
      numberOf[0] = Number.NaN;
      allLabels.forEach((l, i) => (numberOf[i + 1] = Number(l)));
      const idsOfRows = state.allIds.take(rows);
      values = new Float64Array(rows);
      for (let r = 0; r < rows; r++) values[r] = numberOf[idsOfRows[r]];
    }
    return {
      name: state.name,
      labels: state.codes !== null ? labels : [],
      codes: state.codes !== null ? state.codes.take(rows) : null,
      missing: state.missing,
      distinct: labels.length,
      distinctCapped: interner.overflowed > 0,
      numeric,
      integer,
      values,
    };
  });
  let layer: EncodedColumn | null = null;
  const finalLayer = layerState as ColumnState | null;
  if (finalLayer) {
    layerState = finalLayer;
    const labels = summary.interners[layerSlot].labels;
    if (layerState.codes === null) throw dataError(`--by "${layerState.name}" has more than ${RECODED_READING_CAP.toLocaleString('en-US')} distinct values; a layer needs few levels`);
    layer = { name: layerState.name, labels, codes: layerState.codes.take(rows), missing: layerState.missing, distinct: labels.length, distinctCapped: false, numeric: false, integer: false, values: null };
  }
  const rowWeights = weights ? { values: weights.take(rows), kind: request.weight!.kind } : undefined;
  const { interners: _interners, ...read } = summary;
  return {
    columns,
    layer,
    rows,
    filtered: (gate as RowGate | null)?.filtered ?? 0,
    badWeights: (gate as RowGate | null)?.badWeights ?? 0,
    summary: read,
    countPairs: async () => (a, b, layerColumn) => countPair(a, b, { weights: rowWeights, strata: layerColumn ?? undefined }),
  };
}

/** Codes renumbered 1, 2, … over the ids that occur (in order of id), with their labels. */
function compactCodes<T extends Uint16Array | Uint32Array>(codes: T, labels: readonly string[]): { codes: T; labels: string[] } {
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
  const out = new (codes.constructor as new (n: number) => T)(codes.length);
  for (let r = 0; r < codes.length; r++) out[r] = remap[codes[r]];
  return { codes: out, labels: kept };
}

