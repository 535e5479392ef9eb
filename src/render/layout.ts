/**
 * Text by display width: measuring, padding, cutting and wrapping strings by
 * the terminal columns they take.
 */
import stringWidth from 'string-width';
import wrapAnsi from 'wrap-ansi';

/**
 * Text by display width: every measure of a string here is the number of
 * terminal columns it takes (string-width: East Asian wide characters and
 * emoji count two, combining marks and zero-width joiners none, colour codes
 * none), never its length in UTF-16 units.
 */

/** Glue between words that must stay on one line ("p 0.05", "α 0.05", "0.1 to 0.2"). */
export const GLUE = '\u00a0';

/** Joins words with glue, so that wrapping never separates them. */
export function glued(...words: string[]): string {
  return words.join(GLUE);
}

/** Printable ASCII only: one column per character (no escape codes, no wide or combining characters). */
const PLAIN_ASCII = /^[\x20-\x7e]*$/;

export function displayWidth(text: string): number {
  // Most cells of a table are plain ASCII numbers: their width is their length.
  return PLAIN_ASCII.test(text) ? text.length : stringWidth(text);
}

export function padEnd(text: string, width: number): string {
  const w = displayWidth(text);
  return w >= width ? text : text + ' '.repeat(width - w);
}

export function padStart(text: string, width: number): string {
  const w = displayWidth(text);
  return w >= width ? text : ' '.repeat(width - w) + text;
}

/** Cuts a string to at most `width` columns, whole characters only (a grapheme is never split). */
export function cutToWidth(text: string, width: number): string {
  let out = '';
  let used = 0;
  for (const { segment } of graphemes(text)) {
    const w = displayWidth(segment);
    if (used + w > width) break;
    out += segment;
    used += w;
  }
  return out;
}

const segmenter = new Intl.Segmenter('en', { granularity: 'grapheme' });

function graphemes(text: string): Iterable<{ segment: string }> {
  return segmenter.segment(text);
}

/**
 * Wraps text to `width` columns with `indent` before every line (and
 * `hanging` before lines after the first, when given). Words joined with
 * GLUE stay together; a word wider than the line is broken by display
 * width, never clipped. The glue comes out as plain spaces.
 */
export function wrapText(text: string, width: number, indent = '', hanging = indent): string[] {
  const first = displayWidth(indent);
  const rest = displayWidth(hanging);
  const room = Math.max(8, width - Math.max(first, rest));
  const lines = wrapAnsi(text.replace(/[ \t\n]+/g, ' ').trim(), room, { hard: true, trim: true, wordWrap: true }).split('\n');
  return lines.filter((l) => l !== '').map((line, k) => (k === 0 ? indent : hanging) + line.replace(/\u00a0/g, ' '));
}

/**
 * Splits a label into lines of at most `width` columns at spaces, hyphens
 * and slashes where it can, by display width otherwise; at most `maxLines`
 * lines, or null when it does not fit them.
 */
export function foldLabel(label: string, width: number, maxLines: number, breakWords = true): string[] | null {
  if (displayWidth(label) <= width) return [label];
  const parts = label.match(/[^\s\-/]+[\-/]?|\s+/g) ?? [label];
  const lines: string[] = [];
  let line = '';
  const push = () => {
    if (line.trim() !== '') lines.push(line.trim());
    line = '';
  };
  for (const part of parts) {
    if (/^\s+$/.test(part)) {
      if (line !== '') line += ' ';
      continue;
    }
    if (displayWidth(line + part) <= width) {
      line += part;
      continue;
    }
    push();
    let rest = part;
    if (!breakWords && displayWidth(rest) > width) return null;
    while (displayWidth(rest) > width) {
      const head = cutToWidth(rest, width);
      if (head === '') return null;
      lines.push(head);
      rest = rest.slice(head.length);
    }
    line = rest;
  }
  push();
  return lines.length <= maxLines ? lines : null;
}

/** Short keys for labels too long to show in place: A, B, …, Z, AA, AB, … */
export function keyFor(index: number, first = 'A'): string {
  const base = first.charCodeAt(0);
  let k = index;
  let key = '';
  do {
    key = String.fromCharCode(base + (k % 26)) + key;
    k = Math.floor(k / 26) - 1;
  } while (k >= 0);
  return key;
}

/** Labels past this length are shown shortened, saying so (a level can be megabytes long). */
export const LONG_LABEL = 400;

/** A label as shown: whole up to LONG_LABEL characters; past that its start and how much was left out, never silently cut. */
export function shownLabel(label: string): string {
  if (label.length <= LONG_LABEL) return label;
  const head = cutToWidth(label.slice(0, 2 * LONG_LABEL), 60);
  return `${head}… (${(label.length - head.length).toLocaleString('en-US')} more characters)`;
}
