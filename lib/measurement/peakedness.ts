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

/**
 * Peakedness measured from the calls in progress within D windows of length T (the busy hour of
 * each day), the variance taken around each window's own mean so that day-to-day level changes do
 * not count. That mean itself varies, which lowers the within-window variance: for a stationary
 * number in progress N with variance V and autocorrelation ρ,
 *   E[(1/T)∫(N − N̄_w)²] = V − Var N̄_w = V · (1 − (2/T²) ∫₀^T (T − τ) ρ(τ) dτ) = V · f(T).
 * For calls offered by Poisson arrivals to an infinite group (M/G/∞) ρ(τ) = (1/m) ∫_τ^∞ (1 − H(x)) dx
 * (H the holding-time law, mean m: a call in progress at t is still in progress at t + τ with
 * probability (1/m)∫_τ^∞ (1 − H) for Poisson arrivals; Riordan, "Telephone traffic time averages",
 * BSTJ 30, 1951, uses the same covariance for the variance of time averages), so f depends on the
 * holding law only. With the empirical law of n holding
 * times x_i, ρ(τ) = Σ (x_i − τ)⁺ / Σ x_i and
 *   f(T) = 1 − (2/T²) Σ g(x_i) / Σ x_i,  g(x) = ∫₀^{min(x,T)} (T − τ)(x − τ) dτ
 *        = x²(3T − x)/6 for x ≤ T,  T²(3x − T)/6 for x > T,
 * and for exponential holding f = 1 − (2m/T)(1 − (m/T)(1 − e^{−T/m})) (0.847 for m = 300 s, T = 1 h).
 * Z = (within-window variance / mean) / f is exact in expectation (to first order in the ratio of
 * means) for Poisson arrivals; for other streams the correlation of N also carries the arrivals'
 * own correlation, so the correction is first-order only: for an on-off stream with a cycle
 * faster than the holding time it leaves about 1 % of Z (an on-off stream with Z = 1.758, m = 180 s,
 * T = 1 h: E ≈ 1.572 uncorrected, 1.737 corrected; see the unit test).
 */
export function windowMeanFactor(holdingSeconds: ArrayLike<number>, windowSeconds: number): number {
  const T = windowSeconds;
  let sx = 0;
  let sg = 0;
  for (let i = 0; i < holdingSeconds.length; i++) {
    const x = holdingSeconds[i];
    if (!(x > 0)) continue;
    sx += x;
    sg += x <= T ? (x * x * (3 * T - x)) / 6 : (T * T * (3 * x - T)) / 6;
  }
  return sx > 0 ? 1 - (2 / (T * T)) * (sg / sx) : 1;
}

/**
 * Variance of the time-averaged squared deviation within one window, per unit Var(N)², for M/G/∞
 * with the empirical holding law (ρ as in windowMeanFactor). For a Gaussian process the time
 * average of (N − A)² over a window of length T has variance 2⟨ρ²⟩, ⟨ρ²⟩ = (1/T²)∫∫ρ(s − t)² ds dt
 * = (2/T²)∫₀^T (T − τ) ρ(τ)² dτ (→ (4/T)∫₀^∞ρ², i.e. 2m/T for exponential holding, Riordan 1951);
 * taken around the window's own mean the covariance is ρ(s − t) − c(s) − c(t) + c̄ with
 * c(s) = (1/T)∫₀^T ρ(s − u) du, c̄ = 1 − f, whose mean square is ⟨ρ²⟩ − 2⟨c²⟩ + c̄².
 * Returns gaussian = 2⟨ρ²⟩ and share = (⟨ρ²⟩ − 2⟨c²⟩ + c̄²)/⟨ρ²⟩. The Poisson counts add
 * E[X²]/(A m T) for a known mean (the pair (N₀, N_τ) shares a Poisson part of mean Aρ(τ), fourth
 * cumulant Aρ(τ)); measuredPeakedness scales it by the same share, an approximation of order 1/A.
 */
export function withinWindowVariance(holdingSeconds: ArrayLike<number>, windowSeconds: number): { gaussian: number; share: number } {
  const T = windowSeconds;
  const x = Float64Array.from(Array.prototype.filter.call(holdingSeconds, (v: number) => v > 0) as number[]).sort();
  const n = x.length;
  if (n === 0) return { gaussian: 0, share: 1 };
  const p1 = new Float64Array(n + 1);
  const p2 = new Float64Array(n + 1);
  for (let i = 0; i < n; i++) {
    p1[i + 1] = p1[i] + x[i];
    p2[i + 1] = p2[i] + x[i] * x[i];
  }
  const total = p1[n];
  const below = (v: number) => {
    let lo = 0;
    let hi = n;
    while (lo < hi) {
      const mid = (lo + hi) >>> 1;
      if (x[mid] <= v) lo = mid + 1;
      else hi = mid;
    }
    return lo;
  };
  const rho = (t: number) => {
    const k = below(t);
    return (total - p1[k] - t * (n - k)) / total;
  };
  // R1(v) = ∫₀^v ρ = (1/Σx)[Σ_{x_i ≤ v} x_i²/2 + Σ_{x_i > v} (x_i v − v²/2)]
  const r1 = (v: number) => {
    const k = below(v);
    return (p2[k] / 2 + v * (total - p1[k]) - (v * v * (n - k)) / 2) / total;
  };
  // ⟨ρ²⟩: (T − τ)ρ² is cubic between order statistics, so Simpson's rule is exact on each piece
  let rhoSquare = 0;
  let a = 0;
  for (let k = 0; k <= n && a < T; k++) {
    const b = Math.min(k < n ? x[k] : T, T);
    if (b > a) {
      const mid = (a + b) / 2;
      const g = (t: number) => (T - t) * rho(t) ** 2;
      rhoSquare += ((b - a) / 6) * (g(a) + 4 * g(mid) + g(b));
      a = b;
    }
  }
  rhoSquare *= 2 / (T * T);
  // ⟨c²⟩ = (1/T)∫₀^T c(s)² ds, c(s) = (R1(s) + R1(T − s))/T smooth: Simpson on 2 000 panels
  const panels = 2000;
  let cSquare = 0;
  for (let j = 0; j <= panels; j++) {
    const s = (j * T) / panels;
    const c = (r1(s) + r1(T - s)) / T;
    cSquare += (j === 0 || j === panels ? 1 : j % 2 ? 4 : 2) * c * c;
  }
  cSquare /= 3 * panels;
  const cBar = 1 - windowMeanFactor(x, T);
  return { gaussian: 2 * rhoSquare, share: rhoSquare > 0 ? Math.max(0, rhoSquare - 2 * cSquare + cBar * cBar) / rhoSquare : 1 };
}

/** Peakedness measured within busy-hour windows, corrected for the window means (see windowMeanFactor). */
export interface MeasuredPeakedness {
  /** Z = uncorrected / windowFactor */
  value: number;
  /** within-window variance / mean, before the correction */
  uncorrected: number;
  /** f(T): expected within-window variance / variance for M/G/∞ with the measured holding law */
  windowFactor: number;
  meanCalls: number;
  /** within-window variance / windowFactor */
  variance: number;
  observedHours: number;
  /**
   * standard error of Z if the arrivals were Poisson (holding law as measured), see withinWindowVariance:
   * √(q (2 T_w ⟨ρ²⟩ + E[X²]/(A m)) / T) / f, T = seconds observed, T_w the window, A = mean calls
   * in progress. For T_w ≫ m and exponential holding √((2m/T)(1 + 1/A)) / f, less the share the
   * window means take (q ≈ 0.64 for m = 300 s, T_w = 1 h).
   */
  standardErrorIfPoisson: number;
  /** |Z − 1| up to this counts as Poisson: max(0.05, 2 × standardErrorIfPoisson) */
  poissonTolerance: number;
}

export interface WindowSums {
  /** Σ over windows of ∫ N dt (call-seconds) */
  integralN: number;
  /** Σ over windows of ∫ (N − N̄_w)² dt, N̄_w the window's own time average */
  withinSquares: number;
  /** Σ of the window lengths, seconds */
  observedSeconds: number;
  /** the length of one window, seconds (all windows equally long) */
  windowSeconds: number;
  /** holding times of the calls counted (answered calls in the windows), seconds */
  holdingSeconds: ArrayLike<number>;
}

export function measuredPeakedness(w: WindowSums): MeasuredPeakedness | null {
  if (!(w.integralN > 0) || !(w.observedSeconds > 0)) return null;
  const meanCalls = w.integralN / w.observedSeconds;
  const rawVariance = w.withinSquares / w.observedSeconds;
  const windowFactor = windowMeanFactor(w.holdingSeconds, w.windowSeconds);
  let sx = 0;
  let sxx = 0;
  for (let i = 0; i < w.holdingSeconds.length; i++) {
    const x = w.holdingSeconds[i];
    if (x > 0) {
      sx += x;
      sxx += x * x;
    }
  }
  const secondMomentOverMean = sx > 0 ? sxx / sx : 0;
  const { gaussian, share } = withinWindowVariance(w.holdingSeconds, w.windowSeconds);
  const se = Math.sqrt((share * (gaussian * w.windowSeconds + secondMomentOverMean / meanCalls)) / w.observedSeconds) / windowFactor;
  const uncorrected = rawVariance / meanCalls;
  return {
    value: uncorrected / windowFactor,
    uncorrected,
    windowFactor,
    meanCalls,
    variance: rawVariance / windowFactor,
    observedHours: w.observedSeconds / 3600,
    standardErrorIfPoisson: se,
    poissonTolerance: Math.max(0.05, 2 * se),
  };
}
