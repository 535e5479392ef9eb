/**
 * One rule for numbers a person reads, in every human-facing format (text,
 * Markdown, HTML, SVG and the sentences of the record's messages). JSON and
 * CSV/TSV carry full-precision numbers instead.
 *
 * - a negative number takes the minus sign − (U+2212), never a hyphen;
 * - a signed measure (one whose sign means a direction) always shows its sign;
 * - thousands are grouped with commas, counts and expected counts alike;
 * - p-values: three significant digits, written 1.23e−5 below 0.001, and
 *   "< 1e−300" below 1e−300 (underflow, subnormal numbers and 0 alike);
 * - an undefined value is an em dash —.
 *
 * It sits above the rooms rather than in src/render because the analysis
 * record's sentences use it too (imports run down the rooms, never back up);
 * arithmetic on numbers is src/numerics/.
 */

export const MINUS = '−';
export const UNDEFINED = '—';

function minus(text: string): string {
  return text.replace(/-/g, MINUS);
}

function grouped(x: number, digits: number): string {
  // The shortest decimal form of x, rounded half away from zero, with its
  // thousands grouped by commas, is what the locale's formatter gives, many
  // times faster (a banner formats hundreds of thousands of numbers), and
  // without the locale data that the formatter's first use loads (a visible
  // part of a run on a small file; README, Speed).
  const size = Math.abs(x);
  // Whole numbers: a tie x.5 is exactly representable, so rounding the double half away from zero is rounding its shortest form.
  if (digits === 0 && size < 999 && size >= 0.5) return minus(String(x < 0 ? -Math.round(size) : Math.round(size)));
  if (Number.isFinite(x) && digits <= 20 && !Object.is(x, -0)) {
    const fast = roundShortest(x, digits);
    if (fast !== null) return minus(groupThousands(fast));
  }
  return minus(x.toLocaleString('en-US', { minimumFractionDigits: digits, maximumFractionDigits: digits }));
}

/** A plain decimal ([-]digits[.digits]) with a comma between each three digits of its whole part (1234567.5 → 1,234,567.5). */
function groupThousands(text: string): string {
  const sign = text.startsWith('-') ? '-' : '';
  const point = text.indexOf('.');
  const whole = text.slice(sign.length, point < 0 ? text.length : point);
  if (whole.length <= 3) return text;
  let out = whole.slice(0, whole.length % 3 || 3);
  for (let k = out.length; k < whole.length; k += 3) out += ',' + whole.slice(k, k + 3);
  return sign + out + (point < 0 ? '' : text.slice(point));
}

/** x's shortest decimal form (String(x)) rounded to `digits` decimals, half away from zero; null for a "−0" result (left to the locale's formatter). */
function roundShortest(x: number, digits: number): string | null {
  const text = String(Math.abs(x));
  if (text.includes('e')) return null;
  const [whole, fraction = ''] = text.split('.');
  let kept = whole + fraction.slice(0, digits).padEnd(digits, '0');
  if (fraction.length > digits && fraction.charCodeAt(digits) >= 53) {
    // add one unit in the last kept place
    const chars = kept.split('');
    let k = chars.length - 1;
    while (k >= 0 && chars[k] === '9') chars[k--] = '0';
    if (k < 0) chars.unshift('1');
    else chars[k] = String.fromCharCode(chars[k].charCodeAt(0) + 1);
    kept = chars.join('');
  }
  const intLength = kept.length - digits;
  const body = digits > 0 ? `${kept.slice(0, intLength)}.${kept.slice(intLength)}` : kept;
  if (x < 0) return /^[0.]*$/.test(body) ? null : `-${body}`;
  return body;
}

function defined(x: number | null | undefined): x is number {
  return x !== null && x !== undefined && !Number.isNaN(x);
}

/** Below this a p-value is shown as a bound: it is at or near the limit of double precision. */
export const P_FLOOR = 1e-300;

export function formatP(p: number | null | undefined): string {
  if (!defined(p)) return UNDEFINED;
  if (p < P_FLOOR) return `< 1e${MINUS}300`;
  if (p < 0.001) {
    const [mantissa, exponent] = p.toExponential(2).split('e');
    return `${mantissa}e${minus(exponent.replace('+', ''))}`;
  }
  if (p >= 1) return '1';
  const text = p.toPrecision(3);
  return text === '1.00' ? '1' : text;
}

/** A count: whole numbers as they are, weighted sums with one decimal; grouped. */
export function formatCount(x: number | null | undefined): string {
  if (!defined(x)) return UNDEFINED;
  return grouped(x, Number.isInteger(x) ? 0 : 1);
}

/** An expected count: one decimal, grouped; two significant digits below 1 (so that 0.04 is not 0.0). */
export function formatExpected(x: number | null | undefined): string {
  if (!defined(x)) return UNDEFINED;
  if (x > 0 && x < 0.95) return x.toPrecision(2);
  return grouped(x, 1);
}

/** A test statistic: two decimals, grouped; exponent form from 1e9. */
export function formatStatistic(x: number | null | undefined, digits = 2): string {
  if (!defined(x)) return UNDEFINED;
  if (!Number.isFinite(x)) return x > 0 ? '∞' : `${MINUS}∞`;
  if (Math.abs(x) >= 1e9) return minus(x.toExponential(3).replace('+', ''));
  return grouped(x, digits);
}

/** A measure on a 0–1 (or −1–1) scale: three decimals. */
export function formatMeasure(x: number | null | undefined): string {
  if (!defined(x)) return UNDEFINED;
  return minus(x.toFixed(3));
}

/** A signed measure: three decimals (or `digits`) and always its sign; 0 without one. */
export function formatSigned(x: number | null | undefined, digits = 3): string {
  if (!defined(x)) return UNDEFINED;
  const text = Math.abs(x).toFixed(digits);
  if (Number(text) === 0) return text;
  return (x > 0 ? '+' : MINUS) + text;
}

/** A ratio (odds, risk): about four significant digits, grouped; ∞ for an infinite one. */
export function formatRatio(x: number | null | undefined): string {
  if (!defined(x)) return UNDEFINED;
  if (!Number.isFinite(x)) return '∞';
  const size = Math.abs(x);
  return grouped(x, size < 10 ? 3 : size < 100 ? 2 : size < 1000 ? 1 : 0);
}

/** A percentage 0–100, one decimal, with its sign. */
export function formatPercent(x: number | null | undefined, digits = 1): string {
  if (!defined(x)) return UNDEFINED;
  return `${grouped(x, digits)}%`;
}

/** A level such as alpha or a confidence: as given (0.05, 0.01, 0.95). */
export function formatLevel(x: number): string {
  return String(x);
}

/** A confidence level as a percentage: 95%, 99%, 99.9%. */
export function formatConfidence(confidence: number): string {
  return `${Number((confidence * 100).toPrecision(6))}%`;
}
