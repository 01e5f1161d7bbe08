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

// MSER-5 lives apart from the t quantile so the replication threads do not load @stdlib's inverse beta.
export { mser5, mser5Cut } from "./mser5";
