import digammaImpl from "@stdlib/math-base-special-digamma";
import erfcImpl from "@stdlib/math-base-special-erfc";
import gammaincImpl from "@stdlib/math-base-special-gammainc";
import gammalnImpl from "@stdlib/math-base-special-gammaln";
import normalQuantile from "@stdlib/stats-base-dists-normal-quantile";

export const digamma: (x: number) => number = digammaImpl;
export const lnGamma: (x: number) => number = gammalnImpl;

/**
 * Trigamma ψ'(x) for x > 0: the recurrence ψ'(x) = ψ'(x+1) + 1/x² up to x >= 10, then the
 * asymptotic series 1/x + 1/(2x²) + Σ_{k=1..6} B_2k / x^(2k+1) (Abramowitz & Stegun 6.4.12),
 * whose first omitted term, B_14/x^15 = (7/6)/10^15, is below 2e-15 there.
 */
export function trigamma(x: number): number {
  let acc = 0;
  while (x < 10) {
    acc += 1 / (x * x);
    x += 1;
  }
  const r = 1 / x;
  const r2 = r * r;
  return acc + r + r2 / 2 + r * r2 * (1 / 6 - r2 * (1 / 30 - r2 * (1 / 42 - r2 * (1 / 30 - r2 * (5 / 66 - (r2 * 691) / 2730)))));
}

/** Regularized lower incomplete gamma P(a, x). */
export function gammaP(a: number, x: number): number {
  return x <= 0 ? 0 : gammaincImpl(x, a, true, false);
}
/** Regularized upper incomplete gamma Q(a, x) = 1 − P(a, x), without cancellation. */
export function gammaQ(a: number, x: number): number {
  return x <= 0 ? 1 : gammaincImpl(x, a, true, true);
}

/** Standard normal Φ(z) and its upper tail, each from erfc so neither cancels. */
export function normalCdf(z: number): number {
  return 0.5 * erfcImpl(-z / Math.SQRT2);
}
export function normalSurvival(z: number): number {
  return 0.5 * erfcImpl(z / Math.SQRT2);
}
export function normalInverse(p: number): number {
  return normalQuantile(p, 0, 1);
}
