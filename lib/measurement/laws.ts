import type { Law } from "../simulation/scenario";
import { digamma, gammaP, gammaQ, lnGamma, normalCdf, normalInverse, normalSurvival, trigamma } from "./special";

/**
 * Holding-time families fitted by maximum likelihood. Each entry holds its MLE, distribution
 * functions, a sampler (for the parametric bootstrap and the demo) and the scenario-law shape
 * the engine reads (lib/simulation/scenario.ts). Samples must be > 0.
 */
export type FamilyName = "exponential" | "lognormal" | "gamma" | "weibull";
export const FAMILY_NAMES: FamilyName[] = ["exponential", "lognormal", "gamma", "weibull"];

/** Sufficient pieces of a positive sample, computed once. */
export interface SampleSummary {
  n: number;
  mean: number;
  /** mean of ln x */
  meanLog: number;
  /** the sample itself (any order) */
  values: Float64Array;
}

export function summarise(values: Float64Array): SampleSummary {
  let sum = 0;
  let sumLog = 0;
  for (const x of values) {
    sum += x;
    sumLog += Math.log(x);
  }
  return { n: values.length, mean: sum / values.length, meanLog: sumLog / values.length, values };
}

export type Parameters = Record<string, number>;

export interface Family {
  name: FamilyName;
  /** parameter names in display order */
  parameterNames: string[];
  fit(s: SampleSummary): Parameters;
  logLikelihood(p: Parameters, s: SampleSummary): number;
  cdf(p: Parameters, x: number): number;
  survival(p: Parameters, x: number): number;
  pdf(p: Parameters, x: number): number;
  quantile(p: Parameters, q: number): number;
  /** one draw from uniforms on (0, 1) */
  draw(p: Parameters, uniform: () => number): number;
  mean(p: Parameters): number;
  cv(p: Parameters): number;
  scenarioLaw(p: Parameters): Law;
}

/** Standard normal by Box–Muller from two uniforms (one of the pair is dropped for simplicity). */
function standardNormal(uniform: () => number): number {
  return Math.sqrt(-2 * Math.log(uniform())) * Math.cos(2 * Math.PI * uniform());
}

const exponential: Family = {
  name: "exponential",
  parameterNames: ["mean"],
  fit: (s) => ({ mean: s.mean }),
  logLikelihood: ({ mean }, s) => -s.n * Math.log(mean) - (s.n * s.mean) / mean,
  cdf: ({ mean }, x) => (x <= 0 ? 0 : -Math.expm1(-x / mean)),
  survival: ({ mean }, x) => (x <= 0 ? 1 : Math.exp(-x / mean)),
  pdf: ({ mean }, x) => (x < 0 ? 0 : Math.exp(-x / mean) / mean),
  quantile: ({ mean }, q) => -mean * Math.log1p(-q),
  draw: ({ mean }, u) => -mean * Math.log(u()),
  mean: ({ mean }) => mean,
  cv: () => 1,
  scenarioLaw: ({ mean }) => ({ law: "exponential", mean }),
};

const lognormal: Family = {
  name: "lognormal",
  parameterNames: ["mu", "sigma"],
  fit(s) {
    let ss = 0;
    for (const x of s.values) ss += (Math.log(x) - s.meanLog) ** 2;
    return { mu: s.meanLog, sigma: Math.sqrt(ss / s.n) };
  },
  logLikelihood({ mu, sigma }, s) {
    let ss = 0;
    for (const x of s.values) ss += (Math.log(x) - mu) ** 2;
    return -s.n * s.meanLog - s.n * Math.log(sigma) - (s.n / 2) * Math.log(2 * Math.PI) - ss / (2 * sigma * sigma);
  },
  cdf: ({ mu, sigma }, x) => (x <= 0 ? 0 : normalCdf((Math.log(x) - mu) / sigma)),
  survival: ({ mu, sigma }, x) => (x <= 0 ? 1 : normalSurvival((Math.log(x) - mu) / sigma)),
  pdf: ({ mu, sigma }, x) => (x <= 0 ? 0 : Math.exp(-((Math.log(x) - mu) ** 2) / (2 * sigma * sigma)) / (x * sigma * Math.sqrt(2 * Math.PI))),
  quantile: ({ mu, sigma }, q) => Math.exp(mu + sigma * normalInverse(q)),
  draw: ({ mu, sigma }, u) => Math.exp(mu + sigma * standardNormal(u)),
  mean: ({ mu, sigma }) => Math.exp(mu + (sigma * sigma) / 2),
  cv: ({ sigma }) => Math.sqrt(Math.expm1(sigma * sigma)),
  scenarioLaw: (p) => ({ law: "lognormal", mean: lognormal.mean(p), cv: lognormal.cv(p) }),
};

/**
 * Gamma MLE by Minka's generalized Newton iteration on the shape ("Estimating a Gamma
 * distribution", 2002): with s = ln x̄ − mean(ln x), start a = (3 − s + √((s − 3)² + 24 s)) / (12 s)
 * and iterate 1/a ← 1/a + (mean(ln x) − ln x̄ + ln a − ψ(a)) / (a² (1/a − ψ'(a))); scale = x̄ / a.
 */
export function gammaShapeMle(mean: number, meanLog: number): number {
  const s = Math.log(mean) - meanLog;
  if (!(s > 0)) return Infinity; // all values equal: a point mass
  let a = (3 - s + Math.sqrt((s - 3) ** 2 + 24 * s)) / (12 * s);
  for (let i = 0; i < 100; i++) {
    const next = 1 / (1 / a + (meanLog - Math.log(mean) + Math.log(a) - digamma(a)) / (a * a * (1 / a - trigamma(a))));
    const done = Math.abs(next - a) <= 1e-12 * a;
    a = next;
    if (done) break;
  }
  return a;
}

const gamma: Family = {
  name: "gamma",
  parameterNames: ["shape", "scale"],
  fit(s) {
    const shape = gammaShapeMle(s.mean, s.meanLog);
    return { shape, scale: s.mean / shape };
  },
  logLikelihood: ({ shape, scale }, s) => s.n * ((shape - 1) * s.meanLog - s.mean / scale - lnGamma(shape) - shape * Math.log(scale)),
  cdf: ({ shape, scale }, x) => gammaP(shape, x / scale),
  survival: ({ shape, scale }, x) => gammaQ(shape, x / scale),
  pdf: ({ shape, scale }, x) => (x <= 0 ? 0 : Math.exp((shape - 1) * Math.log(x / scale) - x / scale - lnGamma(shape)) / scale),
  quantile: (p, q) => invertCdf((x) => gamma.cdf(p, x), q, gamma.mean(p)),
  draw: ({ shape, scale }, u) => scale * gammaDraw(shape, u),
  mean: ({ shape, scale }) => shape * scale,
  cv: ({ shape }) => 1 / Math.sqrt(shape),
  scenarioLaw: (p) => ({ law: "gamma", mean: gamma.mean(p), cv: gamma.cv(p) }),
};

/** Marsaglia & Tsang, "A simple method for generating gamma variables" (ACM TOMS 26(3), 2000); shape < 1 by u^(1/a) boosting. */
function gammaDraw(shape: number, u: () => number): number {
  if (shape < 1) return gammaDraw(shape + 1, u) * Math.pow(u(), 1 / shape);
  const d = shape - 1 / 3;
  const c = 1 / Math.sqrt(9 * d);
  for (;;) {
    let x: number;
    let v: number;
    do {
      x = standardNormal(u);
      v = 1 + c * x;
    } while (v <= 0);
    v = v * v * v;
    const w = u();
    if (w < 1 - 0.0331 * x ** 4 || Math.log(w) < 0.5 * x * x + d * (1 - v + Math.log(v))) return d * v;
  }
}

/**
 * Weibull MLE by profile likelihood: the shape k solves
 * g(k) = Σ x^k ln x / Σ x^k − 1/k − mean(ln x) = 0, increasing in k (g' = weighted variance of
 * ln x + 1/k² > 0), solved by Newton kept inside a bisection bracket; then scale = (mean x^k)^(1/k).
 * Powers are taken as exp(k (ln x − max ln x)) so nothing overflows.
 */
export function weibullMle(s: SampleSummary): { shape: number; scale: number } {
  const logs = new Float64Array(s.n);
  let c = -Infinity;
  for (let i = 0; i < s.n; i++) {
    logs[i] = Math.log(s.values[i]);
    if (logs[i] > c) c = logs[i];
  }
  const sums = (k: number) => {
    let s0 = 0;
    let s1 = 0;
    let s2 = 0;
    for (const l of logs) {
      const y = l - c;
      const w = Math.exp(k * y);
      s0 += w;
      s1 += w * y;
      s2 += w * y * y;
    }
    return { s0, s1, s2 };
  };
  const g = (k: number) => {
    const { s0, s1, s2 } = sums(k);
    const m1 = s1 / s0;
    return { value: c + m1 - 1 / k - s.meanLog, slope: s2 / s0 - m1 * m1 + 1 / (k * k), s0 };
  };
  if (!(c - s.meanLog > 0)) return { shape: Infinity, scale: Math.exp(c) };
  let sd = 0;
  for (const l of logs) sd += (l - s.meanLog) ** 2;
  sd = Math.sqrt(sd / s.n);
  // Gumbel: sd(ln x) = π / (k √6)
  let k = Math.PI / (sd * Math.sqrt(6));
  let lo = 0;
  let hi = Infinity;
  for (let i = 0; i < 200; i++) {
    const { value, slope } = g(k);
    if (value < 0) lo = k;
    else hi = k;
    let next = k - value / slope;
    if (!(next > lo && next < hi)) next = hi === Infinity ? 2 * k : (lo + hi) / 2;
    if (Math.abs(next - k) <= 1e-13 * k) {
      k = next;
      break;
    }
    k = next;
  }
  const { s0 } = g(k);
  return { shape: k, scale: Math.exp(c + Math.log(s0 / s.n) / k) };
}

const weibull: Family = {
  name: "weibull",
  parameterNames: ["shape", "scale"],
  fit: (s) => weibullMle(s),
  logLikelihood({ shape, scale }, s) {
    let sum = 0;
    for (const x of s.values) sum += (x / scale) ** shape;
    return s.n * (Math.log(shape) - shape * Math.log(scale) + (shape - 1) * s.meanLog) - sum;
  },
  cdf: ({ shape, scale }, x) => (x <= 0 ? 0 : -Math.expm1(-((x / scale) ** shape))),
  survival: ({ shape, scale }, x) => (x <= 0 ? 1 : Math.exp(-((x / scale) ** shape))),
  pdf: ({ shape, scale }, x) => (x <= 0 ? 0 : (shape / scale) * (x / scale) ** (shape - 1) * Math.exp(-((x / scale) ** shape))),
  quantile: ({ shape, scale }, q) => scale * (-Math.log1p(-q)) ** (1 / shape),
  draw: ({ shape, scale }, u) => scale * (-Math.log(u())) ** (1 / shape),
  mean: ({ shape, scale }) => scale * Math.exp(lnGamma(1 + 1 / shape)),
  cv: ({ shape }) => Math.sqrt(Math.exp(lnGamma(1 + 2 / shape) - 2 * lnGamma(1 + 1 / shape)) - 1),
  scenarioLaw: ({ shape, scale }) => ({ law: "weibull", shape, scale }),
};

/** Inverse of an increasing CDF by bisection on a log scale (60 halvings: relative error ~1e-15 of the bracket). */
function invertCdf(cdf: (x: number) => number, q: number, scale: number): number {
  let lo = scale;
  let hi = scale;
  while (cdf(lo) > q && lo > 1e-300) lo /= 2;
  while (cdf(hi) < q && hi < 1e300) hi *= 2;
  for (let i = 0; i < 200 && hi - lo > 1e-14 * hi; i++) {
    const mid = (lo + hi) / 2;
    if (cdf(mid) < q) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

export const FAMILIES: Record<FamilyName, Family> = { exponential, lognormal, gamma, weibull };
