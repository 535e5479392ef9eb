/**
 * Text from the data in Markdown (tables and paragraphs): every character
 * that CommonMark or GitHub-flavoured Markdown gives a meaning inside a line
 * is backslash-escaped (CommonMark 0.31, §2.4: any ASCII punctuation may be),
 * so raw HTML from the data stays text (a renderer would run it: with `<`
 * escaped no tag can open, so `>` inside a line stays as it is), `|` does
 * not end a table cell, and emphasis, links, code and strikethrough do not
 * start; a line break (LF, CR or both) becomes a space, so that a row stays
 * one row; other control characters are shown as visible escapes.
 */
import { terminalSafe } from './terminal.js';

export function markdownText(text: string): string {
  return terminalSafe(
    text
      .replace(/\u00a0/g, ' ')
      .replace(/\r\n|[\r\n\u2028\u2029]/g, ' ')
      .replace(/[\\`*_[\]<|&~]/g, (c) => `\\${c}`),
  );
}
