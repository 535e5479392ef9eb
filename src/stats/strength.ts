/**
 * Strength-of-association measures built on X²: phi, C, Cramér's V and its
 * bias-corrected form, Tschuprow's T, Yule's Q and Y.
 */
import { CountMatrix, isTwoByTwo } from './contingency.js';
import { differenceOfProducts } from '../numerics/errorFree.js';

/**
 * Strength-of-association measures built on Pearson's X². Each returns null
 * (never NaN) when the table leaves it undefined.
 */

/**
 * phi = √(X²/n) (Yule 1912; Agresti 2013 §3.2). Unbounded above 1 for tables larger than 2×2.
 *
 * @example
 * // aspirin and myocardial infarction, Physicians' Health Study (Steering Committee 1989, N. Engl. J. Med. 321, 129–135): X² = 25.014, n = 22071
 * phiCoefficient(25.014, 22071) // 0.0337
 */
export function phiCoefficient(chiSquare: number, n: number): number | null {
  if (!(n > 0)) return null;
  return Math.sqrt(chiSquare / n);
}

/**
 * Pearson's contingency coefficient C = √(X² / (X² + n)) (Pearson 1904).
 *
 * @example
 * // aspirin and myocardial infarction, Physicians' Health Study (Steering Committee 1989, N. Engl. J. Med. 321, 129–135)
 * contingencyCoefficient(25.014, 22071) // 0.0336
 */
export function contingencyCoefficient(chiSquare: number, n: number): number | null {
  if (!(n > 0)) return null;
  return Math.sqrt(chiSquare / (chiSquare + n));
}

/**
 * Corrected contingency coefficient C* = C / C_max with C_max = √((m−1)/m),
 * m = min(r, c), so that C* reaches 1 under perfect association
 * (Sakoda 1977; see also Blaikie 2003, Analyzing Quantitative Data, §5).
 *
 * @example
 * // aspirin and myocardial infarction, Physicians' Health Study (Steering Committee 1989, N. Engl. J. Med. 321, 129–135)
 * correctedContingencyCoefficient(25.014, 22071, 2, 2) // 0.0476
 */
export function correctedContingencyCoefficient(chiSquare: number, n: number, r: number, c: number): number | null {
  const C = contingencyCoefficient(chiSquare, n);
  const m = Math.min(r, c);
  if (C === null || m < 2) return null;
  return C * Math.sqrt(m / (m - 1));
}

/**
 * Cramér's V = √(X² / (n · (min(r, c) − 1))) (Cramér 1946, Mathematical Methods of Statistics, §21.9).
 *
 * @example
 * // aspirin and myocardial infarction, Physicians' Health Study (Steering Committee 1989, N. Engl. J. Med. 321, 129–135)
 * cramersV(25.014, 22071, 2, 2) // 0.0337
 */
export function cramersV(chiSquare: number, n: number, r: number, c: number): number | null {
  const m = Math.min(r, c);
  if (!(n > 0) || m < 2) return null;
  return Math.sqrt(chiSquare / (n * (m - 1)));
}

/**
 * Tschuprow's T = √(X² / (n √((r−1)(c−1)))) (Tschuprow 1939, Principles of the Mathematical Theory of Correlation).
 *
 * @example
 * // aspirin and myocardial infarction, Physicians' Health Study (Steering Committee 1989, N. Engl. J. Med. 321, 129–135)
 * tschuprowT(25.014, 22071, 2, 2) // 0.0337
 */
export function tschuprowT(chiSquare: number, n: number, r: number, c: number): number | null {
  if (!(n > 0) || r < 2 || c < 2) return null;
  return Math.sqrt(chiSquare / (n * Math.sqrt((r - 1) * (c - 1))));
}

/** Relative size of φ² − correction below which it is taken as rounding noise (2^-46, about 64 units in the last place). */
const BIAS_CORRECTION_NOISE = 2 ** -46;

/**
 * Bias-corrected Cramér's V (Bergsma 2013, J. Korean Stat. Soc. 42, 323–328):
 *   φ̃² = max(0, φ² − (r−1)(c−1)/(n−1)),
 *   r̃ = r − (r−1)²/(n−1),  c̃ = c − (c−1)²/(n−1),
 *   Ṽ = √(φ̃² / min(r̃ − 1, c̃ − 1)).
 * When φ² and the correction agree to 2^-46 relative (the rounding error of
 * X²), φ̃² is 0: the value then has an absolute error bound of
 * √(2^-46 φ² / min(r̃ − 1, c̃ − 1)) ≈ 1.2·10⁻⁷ V instead of a relative one.
 *
 * @example
 * // aspirin and myocardial infarction, Physicians' Health Study (Steering Committee 1989, N. Engl. J. Med. 321, 129–135)
 * biasCorrectedCramersV(25.014, 22071, 2, 2) // 0.0330
 */
export function biasCorrectedCramersV(chiSquare: number, n: number, r: number, c: number): number | null {
  if (!(n > 1) || r < 2 || c < 2) return null;
  const phiSquared = chiSquare / n;
  const correction = ((r - 1) * (c - 1)) / (n - 1);
  // X² carries a relative rounding error of a few units in the last place;
  // where φ² and the correction agree that closely the difference is noise,
  // and the exact value may well be 0 (as for [[1, 0], [0, 1]]): clamp it.
  const difference = phiSquared - correction;
  const phiSquaredCorrected = difference > BIAS_CORRECTION_NOISE * Math.max(phiSquared, correction) ? difference : 0;
  const rCorrected = r - ((r - 1) * (r - 1)) / (n - 1);
  const cCorrected = c - ((c - 1) * (c - 1)) / (n - 1);
  const denominator = Math.min(rCorrected - 1, cCorrected - 1);
  if (!(denominator > 0)) return null;
  return Math.sqrt(phiSquaredCorrected / denominator);
}

/**
 * Yule's Q = (ad − bc) / (ad + bc) for the 2×2 table [[a, b], [c, d]]
 * (Yule 1900, Phil. Trans. R. Soc. A 194, 257–319). Signed: positive when the
 * main diagonal (first row with first column, second with second) dominates.
 *
 * @example
 * // aspirin and myocardial infarction, Physicians' Health Study (Steering Committee 1989, N. Engl. J. Med. 321, 129–135)
 * yulesQ([[189, 10845], [104, 10933]]) // 0.2938
 */
export function yulesQ(counts: CountMatrix): number | null {
  if (!isTwoByTwo(counts)) return null;
  const [[a, b], [c, d]] = counts;
  const concordant = a * d;
  const discordant = b * c;
  if (concordant + discordant === 0) return null;
  // ad − bc from error-free products: near independence the two nearly cancel
  return differenceOfProducts(a, d, b, c) / (concordant + discordant);
}

/**
 * Yule's Y (coefficient of colligation) = (√(ad) − √(bc)) / (√(ad) + √(bc)) (Yule 1912).
 *
 * @example
 * // aspirin and myocardial infarction, Physicians' Health Study (Steering Committee 1989, N. Engl. J. Med. 321, 129–135)
 * yulesY([[189, 10845], [104, 10933]]) // 0.1502
 */
export function yulesY(counts: CountMatrix): number | null {
  if (!isTwoByTwo(counts)) return null;
  const [[a, b], [c, d]] = counts;
  const s = Math.sqrt(a * d);
  const t = Math.sqrt(b * c);
  if (s + t === 0) return null;
  // (√ad − √bc)/(√ad + √bc) = (ad − bc)/(√ad + √bc)², with ad − bc formed exactly
  return differenceOfProducts(a, d, b, c) / ((s + t) * (s + t));
}

/**
 * Signed phi for a 2×2 table, (ad − bc)/√(n1. n2. n.1 n.2): the same size as
 * phi, with the direction of the association (Yule 1912).
 *
 * @example
 * // aspirin and myocardial infarction, Physicians' Health Study (Steering Committee 1989, N. Engl. J. Med. 321, 129–135): positive, placebo with infarction on the main diagonal
 * signedPhi([[189, 10845], [104, 10933]]) // 0.0337
 */
export function signedPhi(counts: CountMatrix): number | null {
  if (!isTwoByTwo(counts)) return null;
  const [[a, b], [c, d]] = counts;
  const denominator = Math.sqrt((a + b) * (c + d) * (a + c) * (b + d));
  if (denominator === 0) return null;
  return differenceOfProducts(a, d, b, c) / denominator;
}
