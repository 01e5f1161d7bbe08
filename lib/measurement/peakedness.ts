import { FAMILIES, type FamilyName, type Parameters } from "./laws";

/**
 * Peakedness of arrival streams offered to an infinite group: Z = variance / mean of the number
 * of calls in progress (Wilkinson 1956; generalised to any holding law by Eckberg, "Generalized
 * peakedness of teletraffic processes", ITC-10, 1983). With covariance density c(t) of the
 * stationary stream (rate λ) and holding survival S (mean m),
 *   Var N = λ m + ∫∫ c(u − v) S(u) S(v) du dv,   so   Z = 1 + (1/(λ m)) ∫∫ c(u − v) S(u) S(v) du dv.
 */

/** A holding law as a piecewise-linear survival function on increasing nodes (x₀ = 0, S = 1). */
export interface HoldingShape {
  mean: number;
  x: Float64Array;
  s: Float64Array;
}

/** Nodes at equal-probability quantiles plus a geometric run into the far tail. */
export function shapeOfFamily(family: FamilyName, p: Parameters, nodes = 2000): HoldingShape {
  const f = FAMILIES[family];
  const probs: number[] = [];
  for (let j = 1; j < nodes; j++) probs.push(j / nodes);
  for (let e = Math.log10(nodes) + 0.25; e <= 12; e += 0.25) probs.push(1 - 10 ** -e);
  const x = new Float64Array(probs.length + 1);
  const s = new Float64Array(probs.length + 1);
  s[0] = 1;
  probs.forEach((q, i) => {
    x[i + 1] = f.quantile(p, q);
    s[i + 1] = 1 - q;
  });
  return { mean: f.mean(p), x, s };
}

/** The empirical law of a sample (linear between order statistics, 0 beyond the largest). */
export function shapeOfSample(values: ArrayLike<number>): HoldingShape {
  const sorted = Float64Array.from(values).sort();
  const n = sorted.length;
  const x = new Float64Array(n + 1);
  const s = new Float64Array(n + 1);
  s[0] = 1;
  let sum = 0;
  for (let i = 0; i < n; i++) {
    x[i + 1] = sorted[i];
    s[i + 1] = 1 - (i + 1) / n;
    sum += sorted[i];
  }
  return { mean: sum / n, x, s };
}

/** ∫₀^Δ e^{−a w} dw and ∫₀^Δ w e^{−a w} dw, by series when aΔ is small (no cancellation). */
function expMoments(a: number, d: number): [number, number] {
  const z = a * d;
  if (z < 1e-4) return [d * (1 - z / 2 + (z * z) / 6), d * d * (0.5 - z / 3 + (z * z) / 8)];
  const e = Math.exp(-z);
  return [(1 - e) / a, (1 - e * (1 + z)) / (a * a)];
}

/**
 * I(a) = ∫₀^∞∫₀^∞ e^{−a|u−v|} S(u) S(v) du dv = 2 ∫₀^∞ S(v) K(v) dv with
 * K(v) = ∫₀^∞ e^{−a w} S(v + w) dw, built backwards cell by cell (exact for linear S).
 * Checks: a → 0 gives m²; exponential S gives 1/(μ (a + μ)).
 */
export function exponentialKernelIntegral(shape: HoldingShape, a: number): number {
  const { x, s } = shape;
  const n = x.length;
  // K(v) = e^{−a h} K(v + h) + ∫₀^h e^{−a w} S(v + w) dw, exact for S linear on [v, v + h]
  const step = (kNext: number, sv: number, sEnd: number, h: number) => {
    const [e0, e1] = expMoments(a, h);
    return Math.exp(-a * h) * kNext + sv * e0 + ((sEnd - sv) * e1) / h;
  };
  let k = 0; // K at the last node (S = 0 beyond, to within the tail cut)
  let total = 0;
  for (let i = n - 2; i >= 0; i--) {
    const d = x[i + 1] - x[i];
    if (!(d > 0)) continue;
    const kNext = k;
    const sMid = (s[i] + s[i + 1]) / 2;
    const kMid = step(kNext, sMid, s[i + 1], d / 2);
    k = step(kMid, s[i], sMid, d / 2);
    total += (d / 6) * (s[i] * k + 4 * sMid * kMid + s[i + 1] * kNext); // Simpson on the cell
  }
  return 2 * total;
}

/** ∫₀^∞ S(u)² du (exact for linear S), the a → ∞ limit of a·I(a)/2. */
export function survivalSquareIntegral(shape: HoldingShape): number {
  let total = 0;
  for (let i = 0; i < shape.x.length - 1; i++) {
    const d = shape.x[i + 1] - shape.x[i];
    const [p, q] = [shape.s[i], shape.s[i + 1]];
    total += (d * (p * p + p * q + q * q)) / 3;
  }
  return total;
}

/** Interrupted Poisson (on-off) stream: Poisson at onRate while on; on and off periods exponential. */
export interface OnOff {
  onRate: number;
  meanOn: number;
  meanOff: number;
}

/**
 * Peakedness of an on-off stream: its covariance density is c(t) = λ² p (1 − p) e^{−a|t|} with
 * p = meanOn / (meanOn + meanOff), a = 1/meanOn + 1/meanOff (two-state Markov modulation), so
 * Z = 1 + λ (1 − p) I(a) / m. For exponential holding this is Kuczura's
 * Z = 1 + λ ω / ((γ + ω)(γ + ω + μ)) ("The interrupted Poisson process as an overflow process",
 * BSTJ 52, 1973), ω = 1/meanOn, γ = 1/meanOff.
 */
export function onOffPeakedness(stream: OnOff, holding: HoldingShape): number {
  const a = 1 / stream.meanOn + 1 / stream.meanOff;
  const p = stream.meanOn / (stream.meanOn + stream.meanOff);
  return 1 + (stream.onRate * (1 - p) * exponentialKernelIntegral(holding, a)) / holding.mean;
}

/** Interarrival squared coefficient of variation of an on-off stream, 1 + 2 λ ω / (γ + ω)² (Kuczura 1973: it is a renewal process). */
export function onOffInterarrivalScv(stream: OnOff): number {
  const a = 1 / stream.meanOn + 1 / stream.meanOff;
  return 1 + (2 * stream.onRate) / (stream.meanOn * a * a);
}

export function onOffMeanRate(stream: OnOff): number {
  return (stream.onRate * stream.meanOn) / (stream.meanOn + stream.meanOff);
}
