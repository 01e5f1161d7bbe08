import tQuantile from "@stdlib/stats-base-dists-t-quantile";

export interface Interval {
  estimate: number;
  standardError: number;
  halfWidth: number;
  ciLow: number;
  ciHigh: number;
  /** See result.ts: how the estimate was made, and whether ciHigh is a one-sided bound. */
  method?: string;
  upperBoundOnly?: boolean;
}

/**
 * Ratio estimator across independent replications: R = sum(y) / sum(x), with the
 * delta-method variance Var(R) ~ sum((y_i - R x_i)^2) / (n (n-1) xbar^2) and a Student t
 * interval on n-1 degrees of freedom (Law, Simulation Modeling and Analysis, 5th ed., 2015,
 * ch. 9; Cochran, Sampling Techniques, 3rd ed., 1977, ch. 6). Used for every measure:
 * with equal x_i (fixed calls per replication) it reduces exactly to the mean of the
 * per-replication ratios and their sample variance, and it stays right when x_i vary
 * (horizon runs, batches overshooting the call count, measured time per replication).
 */
export function ratioInterval(y: ArrayLike<number>, x: ArrayLike<number>, confidence: number): Interval {
  const n = y.length;
  let sy = 0;
  let sx = 0;
  for (let i = 0; i < n; i++) {
    sy += y[i];
    sx += x[i];
  }
  const estimate = sx > 0 ? sy / sx : NaN;
  let ss = 0;
  for (let i = 0; i < n; i++) {
    const r = y[i] - estimate * x[i];
    ss += r * r;
  }
  const xbar = sx / n;
  const standardError = n > 1 && xbar > 0 ? Math.sqrt(ss / (n * (n - 1))) / xbar : NaN;
  const halfWidth = n > 1 ? tQuantile(0.5 + confidence / 2, n - 1) * standardError : NaN;
  return { estimate, standardError, halfWidth, ciLow: estimate - halfWidth, ciHigh: estimate + halfWidth };
}

/**
 * MSER-5 truncation point (White, Simulation 69(6), 1997; Franklin & White, WSC 2008):
 * raw observations are averaged in batches of 5, and the warm-up d (in batches) minimises
 * sum_{j>=d} (Z_j - Zbar_d)^2 / (m - d)^2 over the first half of the m batches.
 * Returns the number of raw observations to discard.
 */
export function mser5(observations: ArrayLike<number>): number {
  return mser5Cut(observations).discard;
}

/**
 * MSER-5 with its diagnosis: `atBound` when the minimum falls on the last admissible point
 * (half the batches), the sign that the series was still settling when the pilot ended, so the
 * rule's answer is a bound, not a truncation point (Franklin & White 2008 treat it as a failure).
 */
export function mser5Cut(observations: ArrayLike<number>): { discard: number; atBound: boolean } {
  const m = Math.floor(observations.length / 5);
  if (m < 2) return { discard: 0, atBound: false };
  const z = new Float64Array(m);
  for (let j = 0; j < m; j++) {
    let s = 0;
    for (let i = 0; i < 5; i++) s += observations[5 * j + i];
    z[j] = s / 5;
  }
  // Suffix sums give every candidate d in one pass.
  let best = 0;
  let bestValue = Infinity;
  let sum = 0;
  let sumSq = 0;
  const values = new Float64Array(m);
  for (let j = m - 1; j >= 0; j--) {
    sum += z[j];
    sumSq += z[j] * z[j];
    const count = m - j;
    const ss = Math.max(0, sumSq - (sum * sum) / count);
    values[j] = ss / (count * count);
  }
  const last = Math.floor(m / 2);
  for (let d = 0; d <= last; d++) {
    if (values[d] < bestValue) {
      bestValue = values[d];
      best = d;
    }
  }
  return { discard: best * 5, atBound: best === last && last > 0 };
}
