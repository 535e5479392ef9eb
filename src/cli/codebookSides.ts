/**
 * What --codebook adds to a one-table report (pair, compare): the question,
 * the ordered flag and the codes of each level, the rows left out by
 * reason, the warnings of codes the week's data do not use, and whether the
 * pair gets the ordinal measures (both columns ordered in the codebook).
 */
import type { Warning } from '../analysis/analyzeTable.js';
import type { NamedVariable } from '../analysis/analyzeTable.js';
import { columnRules, TableRequest } from '../io/countTable.js';
import type { ExcludedBy } from '../table/countedTable.js';
import { recodesByColumn } from '../io/rowRules.js';
import { codebookColumn } from '../table/codebook.js';
import { codebookFacts, LevelRules } from '../table/levelRules.js';
import type { TwoWayTable } from '../table/twoWayTable.js';

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

export function codebookSides(request: TableRequest, table: TwoWayTable): CodebookSides {
  if (!request.codebook) return { rows: null, cols: null, ordered: false, warnings: [] };
  const rows = codebookFacts(rulesOf(request, request.rows), table.rowLevels);
  const cols = codebookFacts(rulesOf(request, request.cols), table.colLevels);
  const warnings: Warning[] = [];
  for (const [name, facts] of [
    [request.rows, rows],
    [request.cols, cols],
  ] as const) {
    const column = codebookColumn(request.codebook, name);
    if (!facts || !column) continue;
    const used = new Set(facts.codes.flat());
    const unseen = column.values.map((v) => v.code).filter((c) => !used.has(c));
    if (unseen.length > 0) {
      warnings.push({ code: 'code-not-seen', message: `${request.codebook.file}: code${unseen.length === 1 ? '' : 's'} ${unseen.map((c) => `"${c}"`).join(', ')} of "${name}" ${unseen.length === 1 ? 'does' : 'do'} not occur in the counted rows` });
    }
  }
  return { rows, cols, ordered: rows?.ordered === true && cols?.ordered === true, warnings };
}

/** Adds the codebook's facts to the report's sides, and the rows left out by reason. */
export function describeSides(report: { rows: NamedVariable; cols: NamedVariable; excludedBy?: ExcludedBy[] }, sides: CodebookSides, excludedBy: ExcludedBy[]): void {
  if (sides.rows) Object.assign(report.rows, sides.rows);
  if (sides.cols) Object.assign(report.cols, sides.cols);
  report.excludedBy = excludedBy;
}
