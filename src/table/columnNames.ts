/**
 * A column requested by name: the exact name, else one line naming the
 * option, the file, the closest name (Levenshtein distance) and the columns.
 * Shared by the readers (src/io) and the banner's column patterns (src/analysis).
 */
import { usageError } from '../errors.js';

/** Levenshtein distance (Levenshtein 1966), for "did you mean" suggestions. */
export function editDistance(a: string, b: string): number {
  const previous = Array.from({ length: b.length + 1 }, (_, j) => j);
  for (let i = 1; i <= a.length; i++) {
    let diagonal = previous[0];
    previous[0] = i;
    for (let j = 1; j <= b.length; j++) {
      const above = previous[j];
      previous[j] = Math.min(previous[j] + 1, previous[j - 1] + 1, diagonal + (a[i - 1] === b[j - 1] ? 0 : 1));
      diagonal = above;
    }
  }
  return previous[b.length];
}

export function closestName(name: string, names: readonly string[]): string | null {
  let best: string | null = null;
  let bestDistance = Infinity;
  for (const candidate of names) {
    const d = editDistance(name.toLowerCase(), candidate.toLowerCase());
    if (d < bestDistance) {
      best = candidate;
      bestDistance = d;
    }
  }
  return best !== null && bestDistance <= Math.max(2, Math.floor(name.length / 2)) ? best : null;
}

function listNames(names: readonly string[]): string {
  const shown = names.slice(0, 30).join(', ');
  return names.length > 30 ? `${shown}, … (${names.length} in all)` : shown;
}

/** Finds a requested column in the header, or fails with the list of columns and the closest match. */
export function resolveColumn(name: string, header: readonly string[], option: string, label: string): number {
  const index = header.indexOf(name);
  if (index >= 0) return index;
  const folded = header.findIndex((h) => h.toLowerCase() === name.toLowerCase());
  const suggestion = folded >= 0 ? header[folded] : closestName(name, header);
  const hint = suggestion !== null ? `did you mean "${suggestion}"? ` : '';
  throw usageError(`${option} "${name}": no such column in ${label}; ${hint}columns: ${listNames(header)}`);
}
