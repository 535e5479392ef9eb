/**
 * The single read of a profile: every column's values tallied in one pass,
 * exactly up to a limit and summarised beyond it.
 */
import { dataError } from '../errors.js';
import { DistinctSketch } from '../table/distinctSketch.js';
import { isNumericLabel } from '../table/naturalOrder.js';
import { isMissingLooking } from '../table/missingLooking.js';
import { readRecords, ReaderOptions, ReadSummary } from './readRecords.js';
import { InputSource } from './source.js';

/** Distinct values a profile tracks exactly per column; past it, values are only estimated and summarised. */
export const PROFILE_DISTINCT_LIMIT = 10_000;

/** What one column's values looked like in the single read. */
export interface ColumnTally {
  name: string;
  /** Distinct values tracked exactly (trimmed, non-empty), in order of first appearance. */
  labels: readonly string[];
  /** Rows per tracked value, parallel to labels. */
  counts: Float64Array;
  /** Empty or whitespace-only fields. */
  empty: number;
  /** Values first seen after the column had PROFILE_DISTINCT_LIMIT distinct values; null when none. */
  overflow: OverflowTally | null;
}

/** A summary of the values past the exact limit (none of them is kept). */
export interface OverflowTally {
  rows: number;
  /** Distinct values among them, estimated (HyperLogLog, about 1.6% error). */
  distinctEstimate: number;
  /** Every one of them is a number (missing-looking tokens aside). */
  numeric: boolean;
  integer: boolean;
  /** Over the numbers among them. */
  min: number;
  max: number;
  sum: number;
  /** Rows holding a missing-looking or declared-missing token, by token. */
  tokens: Map<string, number>;
  /** Rows holding such a token, in all. */
  tokenRows: number;
  /** Rows whose value has whitespace inside (words, not codes). */
  withSpaces: number;
  /** Total length of the values, in UTF-16 code units. */
  length: number;
}

export interface ProfiledFile {
  summary: ReadSummary;
  columns: ColumnTally[];
}

class OverflowState {
  rows = 0;
  readonly sketch = new DistinctSketch();
  numeric = true;
  integer = true;
  min = Infinity;
  max = -Infinity;
  sum = 0;
  tokens = new Map<string, number>();
  withSpaces = 0;
  length = 0;

  see(label: string, declared: ReadonlySet<string>): void {
    this.rows++;
    this.length += label.length;
    if (declared.has(label) || isMissingLooking(label)) {
      this.tokens.set(label, (this.tokens.get(label) ?? 0) + 1);
      return;
    }
    this.sketch.add(label);
    if (/\s/.test(label)) this.withSpaces++;
    if (!this.numeric) return;
    if (!isNumericLabel(label)) {
      this.numeric = false;
      this.integer = false;
      return;
    }
    const x = Number(label);
    if (this.integer && !/^[+-]?\d+$/.test(label)) this.integer = false;
    if (x < this.min) this.min = x;
    if (x > this.max) this.max = x;
    this.sum += x;
  }

  tally(): OverflowTally {
    return {
      rows: this.rows,
      distinctEstimate: Math.round(this.sketch.estimate()),
      numeric: this.numeric,
      integer: this.numeric && this.integer,
      min: this.min,
      max: this.max,
      sum: this.sum,
      tokens: this.tokens,
      tokenRows: [...this.tokens.values()].reduce((a, b) => a + b, 0),
      withSpaces: this.withSpaces,
      length: this.length,
    };
  }
}

/**
 * Reads a file once and tallies every column: each distinct value's rows
 * while the column has at most `limit` distinct values (the same interning
 * reader as scan, so the cost per field is a hash look-up), and past that a
 * fixed-size summary (a distinct-count sketch, numeric range, tokens).
 * Memory is bounded by `limit` values per column, whatever the file holds.
 *
 * Nothing is treated as missing here except empty fields: declared
 * `--missing` tokens are values like any other, so that the profile can say
 * how many rows hold each one.
 */
export async function profileColumns(source: InputSource, reader: ReaderOptions, limit = PROFILE_DISTINCT_LIMIT): Promise<ProfiledFile> {
  const declared = new Set(reader.missing.map((m) => m.trim()));
  let names: string[] = [];
  let counts: Float64Array[] = [];
  let empty: number[] = [];
  let overflow: (OverflowState | null)[] = [];
  // The value past the limit that a column's field just held: tallied when
  // its record turns out complete (a record cut by a chunk boundary is
  // delivered again, and a bad row never), so each row counts once.
  let pending: string[] = [];
  const summary = await readRecords(
    source,
    { ...reader, missing: [] },
    (header) => {
      names = header;
      counts = header.map(() => new Float64Array(64));
      empty = header.map(() => 0);
      overflow = header.map(() => null);
      pending = header.map(() => '');
      return header.map((_h, i) => i);
    },
    (ids) => {
      for (let slot = 0; slot < ids.length; slot++) {
        const id = ids[slot];
        if (id === 0) empty[slot]++;
        else if (id > 0) {
          let column = counts[slot];
          if (id > column.length) {
            const grown = new Float64Array(Math.max(column.length * 2, id));
            grown.set(column);
            column = counts[slot] = grown;
          }
          column[id - 1]++;
        }
        else {
          let state = overflow[slot];
          if (state === null) state = overflow[slot] = new OverflowState();
          state.see(pending[slot], declared);
        }
      }
    },
    () => limit,
    new Set(),
    (slot, label) => {
      pending[slot] = label;
    },
  );
  if (summary.records === 0) throw dataError(`${source.label}: the header has no data rows under it`);
  const columns = names.map<ColumnTally>((name, slot) => {
    const labels = summary.interners[slot].labels;
    return { name, labels, counts: counts[slot].subarray(0, labels.length), empty: empty[slot], overflow: overflow[slot]?.tally() ?? null };
  });
  return { summary, columns };
}
