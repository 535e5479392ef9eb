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

/**
 * Characters of one column each that are each a grapheme of their own:
 * printable ASCII, and the Latin, Greek, punctuation, sub- and superscript,
 * currency, arrow, mathematical, box and block characters the reports use
 * (no escape codes, no wide, combining, invisible or emoji characters).
 * test/render/layout.test.ts checks every one of them against string-width
 * and the grapheme segmenter. A text of these alone is measured by its
 * length and wrapped without the segmenter, whose start-up (and that of the
 * emoji pattern) was a visible part of a run on a small file.
 */
export const SIMPLE_CHARACTERS =
  '\\x20-\\x7e\\u00a0-\\u00a8\\u00aa-\\u00ac\\u00af-\\u02ff\\u0370-\\u0377\\u037a-\\u037f\\u0384-\\u038a\\u038c\\u038e-\\u03a1\\u03a3-\\u03ff' +
  '\\u2010-\\u2027\\u2030-\\u203b\\u203d-\\u2048\\u204a-\\u205e\\u2070\\u2071\\u2074-\\u208e\\u2090-\\u209c\\u20a0-\\u20c0' +
  '\\u2190-\\u2193\\u21d0-\\u21d4\\u2200-\\u22ff\\u2308-\\u230b\\u2500-\\u259f\\u25a0-\\u25a9\\u25ac-\\u25b5\\u25b7-\\u25bf\\u25c1-\\u25f7\\u2713';
const SIMPLE_TEXT = new RegExp(`^[${SIMPLE_CHARACTERS}]*$`);

export function displayWidth(text: string): number {
  // Most cells of a table are plain ASCII numbers, and most words of a report simple characters: their width is their length.
  return SIMPLE_TEXT.test(text) ? text.length : stringWidth(text);
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

let segmenter: Intl.Segmenter | undefined;

function graphemes(text: string): Iterable<{ segment: string }> {
  // Made when first needed: its start-up is paid only by a text that needs it.
  return (segmenter ??= new Intl.Segmenter('en', { granularity: 'grapheme' })).segment(text);
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
  const lines = wrapPlain(text.replace(/[ \t\n]+/g, ' ').trim(), room).split('\n');
  return lines.filter((l) => l !== '').map((line, k) => (k === 0 ? indent : hanging) + line.replace(/\u00a0/g, ' '));
}

/**
 * wrap-ansi (hard, trimmed, by words) on a text of single spaces. A text of
 * simple characters is wrapped as the same text with every character other
 * than a space written as one ASCII letter, which wrap-ansi measures without
 * the segmenter: every simple character takes one column and is a grapheme
 * of its own, so the breaks fall at the same places. The wrapped letters
 * are then given back their characters in order (wrapping only removes
 * spaces and adds line breaks; a row that would start with a no-break
 * space, which wrap-ansi trims, is left to wrap-ansi itself).
 */
function wrapPlain(text: string, room: number): string {
  const options = { hard: true, trim: true, wordWrap: true };
  // (wrap-ansi gives its text in normal form C; so does this.)
  const normal = text.normalize('NFC');
  if (!SIMPLE_TEXT.test(normal)) return wrapAnsi(text, room, options);
  // A no-break space (the glue) stays apart: wrap-ansi trims one that starts a row, as it trims spaces, and that case is left to it.
  const wrapped = wrapAnsi(normal.replace(/[^ \u00a0]/g, 'x').replace(/\u00a0/g, 'y'), room, options);
  if (/(^|\n)y/.test(wrapped)) return wrapAnsi(text, room, options);
  let out = '';
  let from = 0;
  for (let k = 0; k < wrapped.length; k++) {
    const c = wrapped[k];
    if (c === ' ' || c === '\n') {
      out += c;
      continue;
    }
    while (normal[from] === ' ') from++;
    out += normal[from++];
  }
  return out;
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
