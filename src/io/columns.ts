/**
 * Finding columns in a header: the checks of header names, a requested
 * column by name (with the closest match when it is misspelt), and the
 * columns a scan reads with their roles.
 */
import { usageError, dataError } from '../errors.js';
import { closestName, editDistance, resolveColumn } from '../table/columnNames.js';

export { closestName, editDistance, resolveColumn };
import type { WeightKind, WhereClause } from './rowRules.js';
import type { Codebook } from '../table/codebook.js';
import { checkCodebookColumns } from './codebookFile.js';
import type { SurveyDesign } from '../table/surveyDesign.js';
import { checkReplicateCount, resolveReplicateColumns } from './designRows.js';

/**
 * Header names as the analyst types them. Some exports write every heading
 * inside single quotes (`'PID'<tab>'age'`: a program's printed names, not
 * CSV quoting, whose quote is `"`); when every name of the header is so
 * wrapped, the quotes are dropped, so that `--rows PID`, a codebook's
 * `"name": "PID"` and the reports all use the bare name. A header where only
 * some names are wrapped is taken as written (a name may begin and end with
 * an apostrophe on purpose), and so is a name that would become empty.
 */
export function bareHeaderNames(names: readonly string[]): string[] {
  const wrapped = (name: string) => name.length > 2 && name.startsWith("'") && name.endsWith("'") && name.slice(1, -1).trim() !== '';
  if (names.length === 0 || !names.every(wrapped)) return [...names];
  return names.map((name) => name.slice(1, -1).trim());
}

/** Checks header names: none empty, none repeated. */
export function validateHeader(names: readonly string[], label: string, line: number): void {
  const seen = new Map<string, number>();
  names.forEach((name, i) => {
    if (name === '') throw dataError(`${label}, line ${line}: column ${i + 1} has an empty name in the header`);
    const earlier = seen.get(name);
    if (earlier !== undefined) throw dataError(`${label}, line ${line}: the header names "${name}" twice (columns ${earlier + 1} and ${i + 1})`);
    seen.set(name, i);
  });
}


/** What a scan reads: the candidate columns, the roles of other columns, and the caps. */
export interface ColumnsRequest {
  columns?: string[];
  exclude?: string[];
  maxLevels: number;
  /** Binning was asked for (--bins, a codebook's bins): a column that reads as numbers keeps its codes past the level cap (table/encodedColumn.ts). */
  keepNumeric: boolean;
  /** Refuse more candidate columns than this (the pairs grow with its square). */
  maxColumns: number;
  progress?: (rows: number) => void;
  where?: WhereClause[];
  /** Recodes by column: filters see recoded values; recoded columns may hold more raw levels than the cap. */
  recodes?: Map<string, Map<string, string>>;
  weight?: { column: string; kind: WeightKind; decimalComma: boolean };
  by?: string;
  /** --codebook: its columns must be in the file. */
  codebook?: Codebook | null;
  /** A survey design: its columns are read for every row, and are not candidates (strata and clusters may be named with --columns). */
  design?: SurveyDesign;
  /** Decimal commas in the design's numbers (fpc, replicate weights). */
  decimalComma?: boolean;
  /**
   * Chooses the candidate columns from the header, in place of `columns`
   * (banner: patterns such as svc_* need the header to be expanded).
   */
  select?: (header: readonly string[]) => string[];
  /** Columns that may hold up to RECODED_READING_CAP levels (banner: numeric questions and delimited answers). */
  wide?: ReadonlySet<string>;
  /** Raw levels any column may hold while reading (default: maxLevels); scan --other raises it, since levels are merged before the cap applies. */
  readingCap?: number;
  /** The fewest candidate columns the command needs (default 2, a pair). */
  minColumns?: number;
}

/** The design's columns of a scan, by index in the header (null or empty when absent). */
export interface DesignSelection {
  strata: number | null;
  cluster: number | null;
  fpc: number | null;
  replicates: number[];
}

/** The columns of a scan, by index in the header: candidates, layer, weight, filter and design columns. */
export function scanSelection(header: string[], request: ColumnsRequest, label: string): { candidates: number[]; layer: number | null; weight: number | null; where: number[]; design: DesignSelection | null } {
  const named = request.select ? request.select(header) : request.columns;
  let chosen = named ? named.map((c) => resolveColumn(c, header, '--columns', label)) : header.map((_h, i) => i);
  if (request.exclude) {
    const dropped = new Set(request.exclude.map((c) => resolveColumn(c, header, '--exclude', label)));
    chosen = chosen.filter((i) => !dropped.has(i));
  }
  if (request.codebook) checkCodebookColumns(request.codebook, header, label);
  for (const column of request.recodes?.keys() ?? []) resolveColumn(column, header, '--recode', label);
  const weight = request.weight ? resolveColumn(request.weight.column, header, request.weight.kind === 'freq' ? '--freq' : '--weight', label) : null;
  const layer = request.by !== undefined ? resolveColumn(request.by, header, '--by', label) : null;
  const design = request.design ? designSelection(header, request.design, label) : null;
  // Strata and clusters are labels and may be analysed when named with --columns; numbers of the design never are.
  const designRoles = design ? [design.fpc, ...design.replicates, ...(named ? [] : [design.strata, design.cluster])] : [];
  const roles = new Set([weight, layer, ...designRoles].filter((i): i is number => i !== null));
  chosen = [...new Set(chosen)].filter((i) => !roles.has(i));
  const fewest = request.minColumns ?? 2;
  if (chosen.length < fewest) throw usageError(`scan needs at least two candidate columns; ${chosen.length} left after --columns/--exclude`);
  if (chosen.length > request.maxColumns) {
    throw usageError(
      `${label} has ${chosen.length.toLocaleString('en-US')} candidate columns (${((chosen.length * (chosen.length - 1)) / 2).toLocaleString('en-US')} pairs), more than --max-columns ${request.maxColumns}; choose some with --columns or --exclude, or raise --max-columns`,
    );
  }
  return { candidates: chosen, layer, weight, where: (request.where ?? []).map((w) => resolveColumn(w.column, header, '--where', label)), design };
}

function designSelection(header: string[], design: SurveyDesign, label: string): DesignSelection {
  if (design.kind === 'replicate') {
    const names = resolveReplicateColumns(design.replicateColumns, header, label, (name) => resolveColumn(name, header, '--replicate-weights', label));
    checkReplicateCount(design, names.length);
    return { strata: null, cluster: null, fpc: null, replicates: names.map((name) => header.indexOf(name)) };
  }
  const find = (name: string | null, option: string) => (name === null ? null : resolveColumn(name, header, option, label));
  return { strata: find(design.strata, '--strata'), cluster: find(design.cluster, '--cluster'), fpc: find(design.fpc, '--fpc'), replicates: [] };
}

/** Raw levels a recoded column may hold while reading (the cap applies after recoding). */
export const RECODED_READING_CAP = 65534;

/** Distinct values tracked per column for screening (beyond it a column is "more than" that). */
export const DISTINCT_TRACKING_LIMIT = 1_000_000;
