/** One candidate column of a scan, dictionary-encoded in the single read. */
export interface EncodedColumn {
  name: string;
  /** Level labels; code k (1-based) is labels[k − 1]; code 0 is missing. */
  labels: string[];
  /** Codes per data row, or null once the column passed the level cap. */
  codes: Uint16Array | Uint32Array | null;
  missing: number;
  /** Distinct values seen (exact up to the reader's tracking limit). */
  distinct: number;
  /** True when the column had more distinct values than the reader tracks. */
  distinctCapped: boolean;
  numeric: boolean;
  integer: boolean;
  /** Numeric values per row (NaN for missing), kept only when binning was asked for. */
  values: Float64Array | null;
}
