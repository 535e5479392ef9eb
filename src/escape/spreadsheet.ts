/**
 * Cells for spreadsheet programs (CSV and TSV reports, and any later xlsx
 * writer): a text that starts with =, +, -, @, a tab or a carriage return
 * (or their full-width forms) is run as a formula when the file is opened,
 * which can run commands or send data away ("CSV Injection", OWASP). Such
 * a text, unless it is a plain number, gets a leading apostrophe, which
 * spreadsheets take as "this is text" and do not show (OWASP's advice);
 * `restoreFormula` is the exact inverse for readers of files the tool
 * wrote. Then the RFC 4180 quoting of a field.
 */

const FORMULA_START = /^[=+\-@\t\r\uff1d\uff0b\uff0d\uff20]/;
const PLAIN_NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

/** True when a spreadsheet would run this text as a formula. */
export function looksLikeFormula(text: string): boolean {
  return FORMULA_START.test(text) && !PLAIN_NUMBER.test(text);
}

/** The text a spreadsheet shows as it is: a leading apostrophe before a formula-like text. */
export function neutraliseFormula(text: string): string {
  return looksLikeFormula(text) ? `'${text}` : text;
}

/** The inverse of neutraliseFormula, for reading back a file the tool wrote. */
export function restoreFormula(text: string): string {
  return text.startsWith("'") && looksLikeFormula(text.slice(1)) ? text.slice(1) : text;
}

/** A field as RFC 4180 writes it: quoted (inner quotes doubled) when it holds the delimiter, a quote or a line break. */
export function delimitedField(value: string, delimiter: string): string {
  return value.includes(delimiter) || value.includes('"') || value.includes('\n') || value.includes('\r') ? `"${value.replace(/"/g, '""')}"` : value;
}

/** A cell of a CSV or TSV report: neutralised for spreadsheets unless `raw` (machine use), then quoted. */
export function spreadsheetField(value: string, delimiter: string, raw = false): string {
  return delimitedField(raw ? value : neutraliseFormula(value), delimiter);
}
