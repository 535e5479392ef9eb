import { usageError, dataError } from '../errors.js';
import { isNumericLabel } from '../table/naturalOrder.js';
import type { EncodedColumn } from '../table/encodedColumn.js';
import { resolveColumn } from './columns.js';
import { readRecords, ReaderOptions, ReadSummary } from './readRecords.js';
import { InputSource } from './source.js';
import { MISSING_ID } from './fieldInterner.js';

export type { EncodedColumn };

export interface EncodedFile {
  columns: EncodedColumn[];
  rows: number;
  summary: ReadSummary;
}

export interface EncodeRequest {
  columns?: string[];
  exclude?: string[];
  maxLevels: number;
  keepNumeric: boolean;
  progress?: (rows: number) => void;
}

/** Distinct values tracked per column for screening (beyond it a column is "more than" that). */
const DISTINCT_TRACKING_LIMIT = 1_000_000;

/** A typed array of codes that grows as rows arrive; unwritten rows stay 0 (missing). */
class GrowableCodes<T extends Uint16Array | Uint32Array> {
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
  codes: GrowableCodes<Uint16Array | Uint32Array> | null;
  /** Every row's value id, kept only for numeric columns when binning was asked for. */
  allIds: GrowableCodes<Uint32Array> | null;
  missing: number;
}

/**
 * Reads the file once and dictionary-encodes every candidate column into an
 * array of small integer codes (2 bytes a cell while levels fit in 16 bits),
 * so that every pair's table can be counted from the codes without reading
 * again. The reader's ids are the codes: 0 missing, 1.. in order of first
 * appearance.
 */
export async function encodeColumns(source: InputSource, reader: ReaderOptions, request: EncodeRequest): Promise<EncodedFile> {
  const states: ColumnState[] = [];
  const wide = request.maxLevels >= 65535;
  let rows = 0;
  const summary = await readRecords(
    source,
    reader,
    (header) => {
      let chosen = request.columns ? request.columns.map((c) => resolveColumn(c, header, '--columns', source.label)) : header.map((_h, i) => i);
      if (request.exclude) {
        const dropped = new Set(request.exclude.map((c) => resolveColumn(c, header, '--exclude', source.label)));
        chosen = chosen.filter((i) => !dropped.has(i));
      }
      chosen = [...new Set(chosen)];
      if (chosen.length < 2) throw usageError(`scan needs at least two candidate columns; ${chosen.length} left after --columns/--exclude`);
      for (const i of chosen) {
        states.push({
          name: header[i],
          codes: new GrowableCodes(wide ? new Uint32Array(1 << 14) : new Uint16Array(1 << 14)),
          allIds: request.keepNumeric ? new GrowableCodes(new Uint32Array(1 << 14)) : null,
          missing: 0,
        });
      }
      return chosen;
    },
    (ids) => {
      const row = rows++;
      for (let k = 0; k < states.length; k++) {
        const state = states[k];
        const id = ids[k];
        if (id === MISSING_ID) {
          state.missing++;
          continue;
        }
        if (state.codes !== null) {
          if (id > request.maxLevels || id < 0) state.codes = null;
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
  );
  if (rows === 0) throw dataError(`${source.label}: the header has no data rows under it`);
  const columns = states.map<EncodedColumn>((state, k) => {
    const interner = summary.interners[k];
    const labels = interner.labels;
    const numeric = labels.length > 0 && labels.every(isNumericLabel);
    const integer = numeric && labels.every((l) => /^[+-]?\d+$/.test(l));
    let values: Float64Array | null = null;
    if (numeric && state.allIds !== null) {
      const numberOf = new Float64Array(labels.length + 1);
      numberOf[0] = Number.NaN;
      labels.forEach((l, i) => (numberOf[i + 1] = Number(l)));
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
  return { columns, rows, summary };
}
