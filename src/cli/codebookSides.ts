/**
 * What --codebook adds to a one-table report (pair, compare, waves): the question,
 * the ordered flag and the codes of each level, the rows left out by
 * reason, the warnings of codes the week's data do not use, and whether the
 * pair gets the ordinal measures (both columns ordered in the codebook).
 */
import type { Warning } from '../analysis/analyzeTable.js';
import type { NamedVariable } from '../analysis/analyzeTable.js';
import { columnRules, TableRequest } from '../io/countTable.js';
import type { ExcludedBy } from '../table/countedTable.js';
import { recodesByColumn } from '../io/rowRules.js';
import { codebookColumn, labelColumn, labellingWarnings } from '../table/codebook.js';
import { codebookFacts, LevelRules } from '../table/levelRules.js';

export interface CodebookSides {
  rows: ReturnType<typeof codebookFacts>;
  cols: ReturnType<typeof codebookFacts>;
  /** Both columns are ordered in the codebook: the ordinal measures apply without --ordinal. */
  ordered: boolean;
  warnings: Warning[];
}

function rulesOf(request: TableRequest, name: string): LevelRules {
  return columnRules(request, name, recodesByColumn(request.recodes));
}

/**
 * The codebook's facts about both sides of a table with these levels, and
 * its warnings against the values the columns hold (`raw`: codes listed that
 * no row holds, values the codebook does not label; docs/codebook.md).
 */
export function codebookSides(request: TableRequest, levels: { rowLevels: readonly string[]; colLevels: readonly string[] }, raw: RawValues | null = null): CodebookSides {
  if (!request.codebook) return { rows: null, cols: null, ordered: false, warnings: [] };
  const rows = codebookFacts(rulesOf(request, request.rows), levels.rowLevels);
  const cols = codebookFacts(rulesOf(request, request.cols), levels.colLevels);
  const warnings: Warning[] = [];
  if (raw !== null) {
    for (const [name, values] of [
      [request.rows, raw.rows],
      [request.cols, raw.cols],
    ] as const) {
      const column = codebookColumn(request.codebook, name);
      if (!column) continue;
      for (const w of labellingWarnings(column, labelColumn(column, values), request.codebook.file)) warnings.push({ code: w.code, message: w.message });
    }
  }
  return { rows, cols, ordered: rows?.ordered === true && cols?.ordered === true, warnings };
}

/** The distinct values of the two columns as read, over every input of a report (the union for compare and waves). */
export interface RawValues {
  rows: readonly string[];
  cols: readonly string[];
}

export function unionOfRawValues(inputs: readonly { rawValues: RawValues }[]): RawValues {
  return { rows: [...new Set(inputs.flatMap((i) => i.rawValues.rows))], cols: [...new Set(inputs.flatMap((i) => i.rawValues.cols))] };
}

/** Adds the codebook's facts to the report's sides, and the rows left out by reason. */
export function describeSides(report: { rows: NamedVariable; cols: NamedVariable; excludedBy?: ExcludedBy[] }, sides: CodebookSides, excludedBy: ExcludedBy[]): void {
  if (sides.rows) Object.assign(report.rows, sides.rows);
  if (sides.cols) Object.assign(report.cols, sides.cols);
  report.excludedBy = excludedBy;
}
