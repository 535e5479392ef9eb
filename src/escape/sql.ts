/**
 * Text in SQL the tool writes (the engine's queries and the portable SQL of
 * `tabsight sql`): literals and identifiers quoted by the standard (ISO/IEC
 * 9075: a quote inside is written twice), and comments that data can never
 * end: every line break and control character in a comment's text is shown
 * as a visible escape, so a column name with a newline cannot start a live
 * statement after `--`.
 */
import { visibleEscape } from './terminal.js';

/** A text as a standard SQL string literal. */
export function sqlLiteral(text: string): string {
  return `'${text.replace(/'/g, "''")}'`;
}

/** A name as a standard SQL delimited identifier. */
export function sqlIdentifier(name: string): string {
  return `"${name.replace(/"/g, '""')}"`;
}

/** A text that stays inside a `--` comment: no line break, control character or separator can end it. */
export function sqlCommentText(text: string): string {
  // eslint-disable-next-line no-control-regex
  return text.replace(/[\u0000-\u001f\u007f-\u009f\u2028\u2029]/g, visibleEscape);
}
