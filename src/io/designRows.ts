/**
 * The design values of a row (stratum, cluster, fpc, replicate weights),
 * judged by the tool's rules: a missing or unusable value stops the run
 * with the file, line and column, or with --skip-bad-rows is counted and the
 * row left out of the design. Also the replicate columns a pattern names.
 */
import { dataError, usageError } from '../errors.js';
import { matchesPattern, type ReplicateColumns, type SurveyDesign } from '../table/surveyDesign.js';
import { type FieldInterner, MISSING_ID, OVERFLOW_ID } from './fieldInterner.js';
import { parseWeightValue } from './rowRules.js';

/** The replicate weight columns of a header, in header order for a pattern, in the given order for a list. */
export function resolveReplicateColumns(columns: ReplicateColumns, header: readonly string[], label: string, resolve: (name: string) => number): string[] {
  if (columns.kind === 'list') {
    columns.columns.forEach(resolve);
    return [...columns.columns];
  }
  const found = header.filter((name) => matchesPattern(name, columns.pattern));
  if (found.length === 0) throw usageError(`--replicate-weights "${columns.pattern}" matches no column of ${label}`);
  return found;
}

/** Replicate variance needs two replicates or more, and jkn's scale factors one per replicate column. */
export function checkReplicateCount(design: Extract<SurveyDesign, { kind: 'replicate' }>, replicates: number): void {
  if (replicates < 2) throw usageError(`--replicate-weights names ${replicates} column; replicate variance needs at least 2`);
  if (design.scales !== null && design.scales.length !== replicates) {
    throw usageError(`--replicate-scales gives ${design.scales.length} scale factors for ${replicates} replicate weight columns; give one per column, in their order`);
  }
}

/** Where the design's columns sit among a reader's selected slots (−1 when absent). */
export interface DesignSlots {
  strata: number;
  cluster: number;
  fpc: number;
  /** One slot per replicate weight column. */
  replicates: number[];
}

/**
 * Reads the design values of rows. `read` judges a row's stratum, cluster
 * and fpc (every row of the sample, the domain's or not), `replicates` its
 * replicate weights (rows that enter the table). Each returns false when the
 * row is skipped (--skip-bad-rows), and counts it.
 */
export class DesignRowRule {
  /** Rows skipped for a missing or unusable design value (--skip-bad-rows). */
  skipped = 0;
  /** The row's stratum as written in the file (messages name it), or '' without --strata. */
  stratum = '';
  /** The row's cluster, as its value id (clusters are only told apart, never named). */
  cluster = 0;
  fpc: number | undefined = undefined;
  readonly replicateWeights: Float64Array;

  constructor(
    private readonly design: SurveyDesign,
    private readonly slots: DesignSlots,
    private readonly columnOf: (slot: number) => string,
    private readonly sourceLabel: string,
    private readonly skipBadRows: boolean,
    private readonly decimalComma: boolean,
  ) {
    this.replicateWeights = new Float64Array(slots.replicates.length);
  }

  private refuse(line: number, option: string, slot: number, reason: string): false {
    if (this.skipBadRows) {
      this.skipped++;
      return false;
    }
    throw dataError(`${this.sourceLabel}, line ${line}: ${option} column "${this.columnOf(slot)}" ${reason}; fix it or pass --skip-bad-rows to count and skip such rows`);
  }

  private idOf(ids: Int32Array, slot: number, option: string, line: number): number | false {
    const id = ids[slot];
    if (id === MISSING_ID) return this.refuse(line, option, slot, 'has no value (every row of the sample needs one)');
    if (id === OVERFLOW_ID) throw dataError(`${this.sourceLabel}: ${option} column "${this.columnOf(slot)}" has more than a million distinct values`);
    return id;
  }

  /** Reads the stratum, cluster and fpc of a row (Taylor designs); false when it is skipped. */
  read(ids: Int32Array, texts: readonly (string | undefined)[], line: number, interners: readonly FieldInterner[]): boolean {
    const { strata, cluster, fpc } = this.slots;
    if (strata >= 0) {
      const id = this.idOf(ids, strata, '--strata', line);
      if (id === false) return false;
      this.stratum = interners[strata].labels[id - 1];
    }
    if (cluster >= 0) {
      const id = this.idOf(ids, cluster, '--cluster', line);
      if (id === false) return false;
      this.cluster = id;
    }
    if (fpc >= 0) {
      const value = parseWeightValue(texts[fpc], 'weight', this.decimalComma);
      if (typeof value === 'string') return this.refuse(line, '--fpc', fpc, value);
      this.fpc = value;
    }
    return true;
  }

  /** Parses a row's replicate weights into `replicateWeights`; false when the row is skipped. */
  replicates(texts: readonly (string | undefined)[], line: number): boolean {
    const slots = this.slots.replicates;
    for (let r = 0; r < slots.length; r++) {
      const value = parseWeightValue(texts[slots[r]], 'weight', this.decimalComma);
      if (typeof value === 'string') return this.refuse(line, '--replicate-weights', slots[r], value);
      this.replicateWeights[r] = value;
    }
    return true;
  }

  get isTaylor(): boolean {
    return this.design.kind === 'taylor';
  }
}
