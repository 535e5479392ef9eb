import { usageError, dataError } from '../errors.js';
import { isNumericLabel } from '../table/naturalOrder.js';
import { resolveColumn } from './columns.js';
import { readRecords, ReaderOptions, ReadSummary } from './readRecords.js';
import { InputSource } from './source.js';

/** One candidate column of a scan, dictionary-encoded in the single pass. */
export interface EncodedColumn {
  name: string;
  /** Level labels; code k (1-based) is labels[k − 1]; code 0 is missing. */
  labels: string[];
  /** Codes per data row, or null once the column passed the level cap. */
  codes: Uint16Array | Uint32Array | null;
  missing: number;
  /** Distinct values seen (exact up to the tracking limit). */
  distinct: number;
  distinctCapped: boolean;
  numeric: boolean;
  integer: boolean;
  /** Numeric values per row (NaN for missing), kept only when binning was asked for. */
  values: Float64Array | null;
}

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

const DISTINCT_TRACKING_LIMIT = 1_000_000;

class GrowableCodes {
  array: Uint16Array | Uint32Array;
  constructor(wide: boolean) {
    this.array = wide ? new Uint32Array(1 << 14) : new Uint16Array(1 << 14);
  }
  set(index: number, code: number): void {
    if (index >= this.array.length) {
      const grown = this.array instanceof Uint32Array ? new Uint32Array(this.array.length * 2) : new Uint16Array(this.array.length * 2);
      grown.set(this.array);
      this.array = grown;
    }
    this.array[index] = code;
  }
}

class GrowableNumbers {
  array = new Float64Array(1 << 14);
  set(index: number, value: number): void {
    if (index >= this.array.length) {
      const grown = new Float64Array(this.array.length * 2);
      grown.set(this.array);
      this.array = grown;
    }
    this.array[index] = value;
  }
}

interface ColumnState {
  name: string;
  dictionary: Map<string, number>;
  labels: string[];
  codes: GrowableCodes | null;
  overflow: Set<string> | null;
  distinctCapped: boolean;
  missing: number;
  numeric: boolean;
  integer: boolean;
  values: GrowableNumbers | null;
}

/**
 * Reads the file once and dictionary-encodes every candidate column into an
 * array of small integer codes (2 bytes a cell while levels fit in 16 bits),
 * so that every pair's table can be counted from the codes without reading
 * again.
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
          dictionary: new Map(),
          labels: [],
          codes: new GrowableCodes(wide),
          overflow: null,
          distinctCapped: false,
          missing: 0,
          numeric: true,
          integer: true,
          values: request.keepNumeric ? new GrowableNumbers() : null,
        });
      }
      return chosen;
    },
    (values) => {
      const row = rows++;
      for (let k = 0; k < states.length; k++) {
        const state = states[k];
        const value = values[k];
        if (value === null) {
          state.missing++;
          if (state.values) state.values.set(row, Number.NaN);
          if (state.codes) state.codes.set(row, 0);
          continue;
        }
        let code = state.dictionary.get(value);
        if (code === undefined) {
          if (state.numeric && !isNumericLabel(value)) {
            state.numeric = false;
            state.integer = false;
            state.values = null;
          } else if (state.integer && !/^[+-]?\d+$/.test(value)) state.integer = false;
          if (state.labels.length < request.maxLevels) {
            state.labels.push(value);
            code = state.labels.length;
            state.dictionary.set(value, code);
          } else {
            state.codes = null;
            state.overflow ??= new Set();
            if (state.overflow.size < DISTINCT_TRACKING_LIMIT) state.overflow.add(value);
            else state.distinctCapped = true;
          }
        }
        if (state.codes && code !== undefined) state.codes.set(row, code);
        if (state.values) state.values.set(row, Number(value));
      }
      if (request.progress && (rows & 0xffff) === 0) request.progress(rows);
    },
  );
  if (rows === 0) throw dataError(`${source.label}: the header has no data rows under it`);
  const columns = states.map<EncodedColumn>((s) => ({
    name: s.name,
    labels: s.labels,
    codes: s.codes ? s.codes.array.subarray(0, rows) : null,
    missing: s.missing,
    distinct: s.labels.length + (s.overflow?.size ?? 0),
    distinctCapped: s.distinctCapped,
    numeric: s.numeric && s.labels.length > 0,
    integer: s.integer && s.labels.length > 0,
    values: s.values ? s.values.array.subarray(0, rows) : null,
  }));
  return { columns, rows, summary };
}
