/** Number formatting shared by the human-facing renderers. */

export function formatCount(x: number): string {
  if (Number.isInteger(x)) return x.toLocaleString('en-US');
  return x.toLocaleString('en-US', { maximumFractionDigits: 1, minimumFractionDigits: 1 });
}

/** p-values: three significant digits, scientific below 0.001, a floor at the double range. */
export function formatP(p: number | null | undefined): string {
  if (p === null || p === undefined || Number.isNaN(p)) return '—';
  if (p === 0) return '< 1e-300';
  if (p < 0.001) {
    const [mantissa, exponent] = p.toExponential(2).split('e');
    return `${mantissa}e${exponent.replace('+', '')}`;
  }
  if (p >= 0.9995) return '1.000';
  return p < 0.01 ? p.toFixed(4) : p.toFixed(3);
}

export function formatStatistic(x: number | null | undefined, digits = 2): string {
  if (x === null || x === undefined || Number.isNaN(x)) return '—';
  if (!Number.isFinite(x)) return x > 0 ? '∞' : '−∞';
  if (Math.abs(x) >= 1e6) return x.toExponential(3).replace('+', '');
  return x.toLocaleString('en-US', { maximumFractionDigits: digits, minimumFractionDigits: digits });
}

export function formatMeasure(x: number | null | undefined): string {
  if (x === null || x === undefined || Number.isNaN(x)) return '—';
  return x.toFixed(3);
}

export function formatSigned(x: number | null | undefined, digits = 1): string {
  if (x === null || x === undefined || Number.isNaN(x)) return '—';
  const s = Math.abs(x).toFixed(digits);
  return x > 0 ? `+${s}` : x < 0 ? `−${s}` : s;
}

/** Display width of a string, counting astral characters and wide CJK as their columns. */
export function displayWidth(s: string): number {
  let width = 0;
  for (const ch of s) {
    const cp = ch.codePointAt(0) as number;
    if (cp < 0x20) continue;
    if ((cp >= 0x1100 && cp <= 0x115f) || (cp >= 0x2e80 && cp <= 0xa4cf) || (cp >= 0xac00 && cp <= 0xd7a3) || (cp >= 0xf900 && cp <= 0xfaff) || (cp >= 0xfe30 && cp <= 0xfe4f) || (cp >= 0xff00 && cp <= 0xff60) || (cp >= 0xffe0 && cp <= 0xffe6) || (cp >= 0x1f300 && cp <= 0x1faff) || (cp >= 0x20000 && cp <= 0x3fffd)) width += 2;
    else if ((cp >= 0x300 && cp <= 0x36f) || cp === 0x200d || (cp >= 0xfe00 && cp <= 0xfe0f)) width += 0;
    else width += 1;
  }
  return width;
}

export function padLeft(s: string, width: number): string {
  const w = displayWidth(s);
  return w >= width ? s : ' '.repeat(width - w) + s;
}

export function padRight(s: string, width: number): string {
  const w = displayWidth(s);
  return w >= width ? s : s + ' '.repeat(width - w);
}

/** Shortens a label to a display width, marking the cut with an ellipsis. */
export function clip(s: string, width: number): string {
  // Look at no more than the first few characters: a label can be megabytes long.
  const head = s.length > 4 * width + 8 ? s.slice(0, 4 * width + 8) : s;
  if (head === s && displayWidth(s) <= width) return s;
  let out = '';
  let used = 0;
  for (const ch of head) {
    const w = displayWidth(ch);
    if (used + w > width - 1) break;
    out += ch;
    used += w;
  }
  return out + '…';
}

/** A level shown in a sentence: always quoted, so that "no" reads as a level, not a word. */
export function quoteLevel(level: string): string {
  return `"${level.length > 60 ? clip(level, 60) : level}"`;
}
