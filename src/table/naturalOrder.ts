/**
 * Natural order for level labels, the same on every machine (no locale):
 * labels that are whole numbers or decimals compare numerically and come
 * first; other labels compare run by run, digit runs by their numeric value
 * ("item 2" before "item 10") and other runs by Unicode code point; full
 * ties fall back to code point order of the whole label.
 */
const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

export function compareCodePoints(a: string, b: string): number {
  const n = Math.min(a.length, b.length);
  for (let i = 0; i < n; i++) {
    const x = a.codePointAt(i) as number;
    const y = b.codePointAt(i) as number;
    if (x !== y) return x < y ? -1 : 1;
    if (x > 0xffff) i++;
  }
  return a.length === b.length ? 0 : a.length < b.length ? -1 : 1;
}

function compareDigitRuns(a: string, b: string): number {
  const x = a.replace(/^0+(?=\d)/, '');
  const y = b.replace(/^0+(?=\d)/, '');
  if (x.length !== y.length) return x.length < y.length ? -1 : 1;
  return x < y ? -1 : x > y ? 1 : 0;
}

const RUN = /\d+|\D+/g;

export function compareNatural(a: string, b: string): number {
  const aNumeric = NUMBER.test(a);
  const bNumeric = NUMBER.test(b);
  if (aNumeric && bNumeric) {
    const d = Number(a) - Number(b);
    if (d !== 0) return d < 0 ? -1 : 1;
    return compareCodePoints(a, b);
  }
  if (aNumeric !== bNumeric) return aNumeric ? -1 : 1;
  const runsA = a.match(RUN) ?? [];
  const runsB = b.match(RUN) ?? [];
  const n = Math.min(runsA.length, runsB.length);
  for (let i = 0; i < n; i++) {
    const x = runsA[i];
    const y = runsB[i];
    const xDigits = x.charCodeAt(0) >= 48 && x.charCodeAt(0) <= 57;
    const yDigits = y.charCodeAt(0) >= 48 && y.charCodeAt(0) <= 57;
    const d = xDigits && yDigits ? compareDigitRuns(x, y) : compareCodePoints(x, y);
    if (d !== 0) return d;
  }
  if (runsA.length !== runsB.length) return runsA.length < runsB.length ? -1 : 1;
  return compareCodePoints(a, b);
}

export function isNumericLabel(value: string): boolean {
  return NUMBER.test(value);
}
