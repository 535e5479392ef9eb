/**
 * Writing a codebook in its two forms (JSON and spreadsheet CSV) so that it
 * reads back the same.
 */
import type { Codebook } from '../table/codebook.js';
import { spreadsheetField } from '../escape/spreadsheet.js';

/**
 * Writes a codebook in its two forms (docs/codebook.md). What is written
 * reads back as the same codebook (tested both ways).
 */

/** The JSON form: members in a fixed order, empty members left out. */
export function codebookToJson(codebook: Codebook): string {
  const out: Record<string, unknown> = { codebook: 1 };
  if (codebook.title !== null) out.title = codebook.title;
  if (codebook.source !== null) out.source = codebook.source;
  out.columns = codebook.columns.map((column) => {
    const entry: Record<string, unknown> = { name: column.name };
    if (column.question !== null) entry.question = column.question;
    if (column.ordered) entry.ordered = true;
    const values: Record<string, string>[] = [
      ...column.values.map((v) => ({ code: v.code, label: v.label })),
      ...column.missing.map((m): Record<string, string> => (m.label !== null ? { code: m.code, label: m.label, missing: m.reason } : { code: m.code, missing: m.reason })),
    ];
    if (values.length > 0) entry.values = values;
    if (column.nets.length > 0) entry.nets = column.nets.map((n) => ({ name: n.name, codes: n.codes }));
    if (column.cuts !== null) entry.cuts = column.cuts;
    if (column.bins !== null) entry.bins = column.bins;
    if (column.note !== null) entry.note = column.note;
    return entry;
  });
  return layout(out) + '\n';
}

/** One line per column member, one line per code and net: easy to read and edit by hand. */
function layout(value: unknown, indent = ''): string {
  const inner = indent + '  ';
  if (Array.isArray(value)) {
    if (value.length === 0) return '[]';
    if (value.every((v) => v === null || typeof v !== 'object')) return `[${value.map((v) => JSON.stringify(v)).join(', ')}]`;
    const scalar = (x: unknown) => x === null || typeof x !== 'object';
    if (value.every((v) => v !== null && typeof v === 'object' && !Array.isArray(v) && Object.values(v).every((x) => scalar(x) || (Array.isArray(x) && x.every(scalar))))) {
      return `[\n${value.map((v) => `${inner}{ ${Object.entries(v as object).map(([k, x]) => `${JSON.stringify(k)}: ${layout(x)}`).join(', ')} }`).join(',\n')}\n${indent}]`;
    }
    return `[\n${value.map((v) => inner + layout(v, inner)).join(',\n')}\n${indent}]`;
  }
  if (value !== null && typeof value === 'object') {
    const entries = Object.entries(value as object);
    if (entries.length === 0) return '{}';
    return `{\n${entries.map(([k, v]) => `${inner}${JSON.stringify(k)}: ${layout(v, inner)}`).join(',\n')}\n${indent}}`;
  }
  return JSON.stringify(value);
}

/**
 * A cell for a spreadsheet: a text that a spreadsheet would run as a
 * formula (it starts with =, +, - or @ and is not a number) gets a leading
 * apostrophe, which the codebook reader removes again (OWASP, "CSV
 * Injection"). Then quoted as RFC 4180 asks.
 */
export function spreadsheetCell(value: string): string {
  return spreadsheetField(value, ',');
}

/**
 * The CSV form: a column's own row first (question, ordered, cuts, bins,
 * note), then one row per code in level order, missing codes last; nets
 * as the names of the nets each code belongs to, separated by ";".
 */
export function codebookToCsv(codebook: Codebook): string {
  const lines = ['column,code,label,missing,nets,question,ordered,cuts,bins,note'];
  const row = (cells: string[]) => lines.push(cells.map(spreadsheetCell).join(','));
  for (const column of codebook.columns) {
    row([column.name, '', '', '', '', column.question ?? '', column.ordered ? 'yes' : '', column.cuts?.join(';') ?? '', column.bins === null ? '' : String(column.bins), column.note ?? '']);
    for (const value of column.values) {
      const nets = column.nets.filter((n) => n.codes.includes(value.code)).map((n) => n.name);
      row([column.name, value.code, value.label, '', nets.join(';'), '', '', '', '', '']);
    }
    for (const m of column.missing) row([column.name, m.code, m.label ?? '', m.reason, '', '', '', '', '', '']);
  }
  return lines.join('\n') + '\n';
}
