/**
 * Words of a command the tool suggests (in notes, suggestions and the
 * read-back line of `tabsight sql`), so that the line can be pasted into a
 * POSIX shell as it stands: a word made only of characters the shell never
 * treats specially is written bare; any other word is put in single quotes,
 * inside which every character is literal, and a single quote inside the
 * word is written '\'' (close the quotes, an escaped quote, open them again).
 * Source: POSIX.1-2017, Shell Command Language, 2.2.2 "Single-Quotes" and
 * 2.2.1 "Escape Character (Backslash)".
 */

/** Characters that are never special to a POSIX shell anywhere in an argument word (no globbing, expansion, quoting or operators). */
const PLAIN_WORD = /^[A-Za-z0-9_.,:/+@%=-]+$/;

/** A word as a POSIX shell reads it back unchanged: bare when it needs no quoting, else single-quoted. */
export function shellWord(word: string): string {
  return PLAIN_WORD.test(word) ? word : `'${word.replace(/'/g, `'\\''`)}'`;
}
