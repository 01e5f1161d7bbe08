import type { BatchSizeLaw, Law } from "./laws";
import { lnGamma } from "./numeric";

// Formulas on a law's parameters (means, moments, branch forms), apart from the zod schemas in laws.ts so
// the simulation engine's threads load them without zod.

/** Balanced-means two-branch hyperexponential for a mean and squared coefficient of variation >= 1 (Whitt 1982). */
export function balancedHyperexponential(mean: number, scv: number): { probabilities: number[]; means: number[] } {
  const p = (1 + Math.sqrt((scv - 1) / (scv + 1))) / 2;
  return { probabilities: [p, 1 - p], means: [mean / (2 * p), mean / (2 * (1 - p))] };
}

/** Branches of a hyperexponential law in either form. */
export function hyperexponentialBranches(law: Extract<Law, { law: "hyperexponential" }>): { probabilities: number[]; means: number[] } {
  return law.probabilities && law.means ? { probabilities: law.probabilities, means: law.means } : balancedHyperexponential(law.mean!, law.scv!);
}

/** Weibull shape k with the given coefficient of variation: cv^2 = G(1+2/k)/G(1+1/k)^2 - 1, decreasing in k. */
export function weibullShapeForCv(cv: number): number {
  const cvOf = (k: number) => Math.sqrt(Math.exp(lnGamma(1 + 2 / k) - 2 * lnGamma(1 + 1 / k)) - 1);
  let lo = Math.log(0.02);
  let hi = Math.log(200);
  for (let i = 0; i < 200; i++) {
    const mid = (lo + hi) / 2;
    if (cvOf(Math.exp(mid)) > cv) lo = mid;
    else hi = mid;
  }
  return Math.exp((lo + hi) / 2);
}

/** Weibull {shape, scale} from either form. */
export function weibullParameters(law: Extract<Law, { law: "weibull" }>): { shape: number; scale: number } {
  const shape = law.shape ?? weibullShapeForCv(law.cv!);
  const scale = law.scale ?? law.mean! / Math.exp(lnGamma(1 + 1 / shape));
  return { shape, scale };
}

export function lawMean(law: Law): number {
  switch (law.law) {
    case "exponential":
    case "erlang":
    case "lognormal":
    case "gamma":
    case "pareto":
      return law.mean;
    case "deterministic":
      return law.value;
    case "hyperexponential":
      return law.mean ?? law.probabilities!.reduce((s, p, i) => s + p * law.means![i], 0);
    case "weibull":
      return law.mean ?? law.scale! * Math.exp(lnGamma(1 + 1 / law.shape!));
    case "uniform":
      return (law.min + law.max) / 2;
    case "empirical":
      return law.samples.reduce((a, b) => a + b, 0) / law.samples.length;
  }
}

export function batchMean(law: BatchSizeLaw): number {
  switch (law.law) {
    case "geometric":
      return law.mean;
    case "fixed":
      return law.value;
    case "uniform":
      return (law.min + law.max) / 2;
    case "empirical":
      return law.values.reduce((s, v, i) => s + v * law.probabilities[i], 0);
  }
}

/** E[X] and E[X^2] of a batch-size law. */
export function batchMoments(law: BatchSizeLaw): { m1: number; m2: number } {
  switch (law.law) {
    case "geometric":
      // var = m (m - 1) for the geometric law on 1, 2, ... with mean m
      return { m1: law.mean, m2: law.mean * (law.mean - 1) + law.mean * law.mean };
    case "fixed":
      return { m1: law.value, m2: law.value * law.value };
    case "uniform": {
      let m1 = 0;
      let m2 = 0;
      for (let x = law.min; x <= law.max; x++) {
        m1 += x;
        m2 += x * x;
      }
      const count = law.max - law.min + 1;
      return { m1: m1 / count, m2: m2 / count };
    }
    case "empirical": {
      let m1 = 0;
      let m2 = 0;
      law.values.forEach((x, i) => {
        m1 += x * law.probabilities[i];
        m2 += x * x * law.probabilities[i];
      });
      return { m1, m2 };
    }
  }
}

/**
 * Tail P(X > x) of a batch-size law for x = 0..upTo (P(X > 0) = 1), and the largest batch size
 * (Infinity for the geometric law).
 */
export function batchTail(law: BatchSizeLaw, upTo: number): { tail: Float64Array; largest: number } {
  const tail = new Float64Array(upTo + 1);
  const pmf = new Map<number, number>();
  let largest = 0;
  switch (law.law) {
    case "geometric": {
      const q = 1 - 1 / law.mean;
      for (let x = 0; x <= upTo; x++) tail[x] = x === 0 ? 1 : Math.pow(q, x);
      return { tail, largest: law.mean === 1 ? 1 : Infinity };
    }
    case "fixed":
      pmf.set(law.value, 1);
      break;
    case "uniform":
      for (let x = law.min; x <= law.max; x++) pmf.set(x, 1 / (law.max - law.min + 1));
      break;
    case "empirical":
      law.values.forEach((x, i) => pmf.set(x, (pmf.get(x) ?? 0) + law.probabilities[i]));
      break;
  }
  for (const [x, p] of pmf) if (p > 0) largest = Math.max(largest, x);
  // tail summed from the top, so small tails keep their digits
  const mass = new Float64Array(largest + 2);
  for (const [x, p] of pmf) mass[x] += p;
  let acc = 0;
  const full = new Float64Array(largest + 1);
  for (let x = largest; x >= 0; x--) {
    full[x] = acc; // P(X > x)
    acc += mass[x];
  }
  for (let x = 0; x <= upTo; x++) tail[x] = x === 0 ? 1 : x <= largest ? full[x] / acc : 0;
  return { tail, largest };
}
