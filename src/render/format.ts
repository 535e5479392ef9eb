/** Number formatting and display width shared by the human-facing renderers (the rule itself: src/readableNumbers.ts). */
export { formatCount, formatExpected, formatMeasure, formatP, formatPercent, formatRatio, formatSigned, formatStatistic, MINUS, UNDEFINED } from '../readableNumbers.js';
export { displayWidth, padEnd as padRight, padStart as padLeft } from './layout.js';
export { quoteLevel } from './words.js';

import { cutToWidth, displayWidth as width } from './layout.js';

/** Shortens a label to a display width, marking the cut with an ellipsis (for fixed-width summaries such as the profile; reports fold or key labels instead). */
export function clip(s: string, limit: number): string {
  const head = s.length > 4 * limit + 8 ? s.slice(0, 4 * limit + 8) : s;
  if (head === s && width(s) <= limit) return s;
  return cutToWidth(head, limit - 1) + '…';
}
