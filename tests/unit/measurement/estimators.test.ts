import { describe, expect, it } from "vitest";
import seedrandom from "seedrandom";
import { mean as ssMean, variance as ssVariance, sampleVariance } from "simple-statistics";
import digamma from "@stdlib/math-base-special-digamma";
import gammaCdf from "@stdlib/stats-base-dists-gamma-cdf";
import lognormalCdf from "@stdlib/stats-base-dists-lognormal-cdf";
import weibullCdf from "@stdlib/stats-base-dists-weibull-cdf";
import kstest from "@stdlib/stats-kstest";
import { trigamma } from "../../../lib/measurement/special";
import { FAMILIES, gammaShapeMle, summarise, weibullMle } from "../../../lib/measurement/laws";
import { adStatistic, fitHoldingTimes, ksStatistic, writtenResolution } from "../../../lib/measurement/fit";

/** Test-side generators, written here so no draw comes from the code under test. */
function uniforms(seed: string) {
  const r = seedrandom.alea(seed);
  return () => {
    let x = r();
    while (x === 0) x = r();
    return x;
  };
}
const normals = (u: () => number) => () => Math.sqrt(-2 * Math.log(u())) * Math.sin(2 * Math.PI * u());

describe("special functions", () => {
  it("trigamma: ψ'(1) = π²/6, ψ'(1/2) = π²/2 (Abramowitz & Stegun 6.4.2, 6.4.4)", () => {
    expect(trigamma(1)).toBeCloseTo(Math.PI ** 2 / 6, 13);
    expect(trigamma(0.5)).toBeCloseTo(Math.PI ** 2 / 2, 12);
  });
  it("trigamma is the derivative of @stdlib/math-base-special-digamma (central difference, error O(h²) ≈ 1e-8)", () => {
    for (const x of [0.05, 0.3, 1.7, 5.9, 6.1, 40, 1e4]) {
      const h = 1e-4 * x;
      const numeric = (digamma(x + h) - digamma(x - h)) / (2 * h);
      expect(Math.abs(trigamma(x) - numeric) / trigamma(x)).toBeLessThan(1e-7);
    }
  });
  it("family CDFs agree with @stdlib gamma-cdf, lognormal-cdf and weibull-cdf", () => {
    for (const x of [0.01, 0.7, 3, 25, 400]) {
      expect(FAMILIES.gamma.cdf({ shape: 2.3, scale: 4 }, x)).toBeCloseTo(gammaCdf(x, 2.3, 1 / 4), 13);
      expect(FAMILIES.gamma.survival({ shape: 0.4, scale: 4 }, x)).toBeCloseTo(1 - gammaCdf(x, 0.4, 1 / 4), 12);
      expect(FAMILIES.lognormal.cdf({ mu: 1.2, sigma: 0.8 }, x)).toBeCloseTo(lognormalCdf(x, 1.2, 0.8), 13);
      expect(FAMILIES.weibull.cdf({ shape: 1.6, scale: 5 }, x)).toBeCloseTo(weibullCdf(x, 1.6, 5), 13);
    }
  });
  it("quantiles invert the CDFs", () => {
    const cases = [
      ["exponential", { mean: 3 }],
      ["lognormal", { mu: 1, sigma: 1.3 }],
      ["gamma", { shape: 0.7, scale: 2 }],
      ["weibull", { shape: 2.2, scale: 9 }],
    ] as const;
    for (const [name, p] of cases) for (const q of [1e-6, 0.1, 0.5, 0.99, 1 - 1e-9]) expect(FAMILIES[name].cdf(p, FAMILIES[name].quantile(p, q))).toBeCloseTo(q, 9);
  });
});

describe("goodness-of-fit statistics", () => {
  const u = uniforms("ks");
  const sample = Float64Array.from({ length: 300 }, () => -2 * Math.log(u())).sort();
  const cdf = (x: number) => FAMILIES.exponential.cdf({ mean: 2.2 }, x);
  it("Kolmogorov–Smirnov D equals @stdlib/stats-kstest's statistic for a fully specified law", () => {
    expect(ksStatistic(sample, cdf)).toBeCloseTo(kstest(Array.from(sample), cdf).statistic, 14);
  });
  it("Anderson–Darling A² equals its definition n ∫ (Fₙ − F)² / (F (1 − F)) dF, integrated exactly between order statistics", () => {
    // On [F(x_(i)), F(x_(i+1))] Fₙ = i/n; ∫ (c − t)² / (t (1 − t)) dt has the closed form
    // c² ln t − (1 − c)² ln(1 − t) − t + const (partial fractions).
    const n = sample.length;
    const F = [0, ...Array.from(sample, cdf), 1];
    const prim = (c: number, t: number) => (c === 0 ? 0 : c * c * Math.log(t)) - (c === 1 ? 0 : (1 - c) ** 2 * Math.log1p(-t)) - t;
    // The guards drop the c² ln t term when c = 0 and the (1 − c)² ln(1 − t) term when c = 1, so the
    // end segments [0, F(x_(1))] and [F(x_(n)), 1] stay finite.
    let integral = 0;
    for (let i = 0; i <= n; i++) integral += prim(i / n, F[i + 1]) - prim(i / n, F[i]);
    expect(Number.isFinite(integral)).toBe(true);
    expect(adStatistic(sample, cdf, (x) => 1 - cdf(x))).toBeCloseTo(n * integral, 8);
  });
});

describe("maximum-likelihood fits", () => {
  it("exponential: the mean (checked with simple-statistics mean)", () => {
    const x = Float64Array.from([3, 1, 4, 1, 5, 9, 2, 6]);
    expect(FAMILIES.exponential.fit(summarise(x)).mean).toBeCloseTo(ssMean(Array.from(x)), 14);
  });
  it("lognormal: mean and population variance of ln x (simple-statistics mean and variance)", () => {
    const x = Float64Array.from([3, 1, 4, 1, 5, 9, 2, 6]);
    const logs = Array.from(x, Math.log);
    const p = FAMILIES.lognormal.fit(summarise(x));
    expect(p.mu).toBeCloseTo(ssMean(logs), 14);
    expect(p.sigma ** 2).toBeCloseTo(ssVariance(logs), 14);
  });
  it("gamma: Minka's iteration solves the likelihood equation ln a − ψ(a) = ln x̄ − mean ln x and is a maximum", () => {
    const x = Float64Array.from([0.3, 2.2, 1.7, 4.1, 0.9, 3.3, 0.05, 7.4]);
    const s = summarise(x);
    const a = gammaShapeMle(s.mean, s.meanLog);
    expect(Math.log(a) - digamma(a)).toBeCloseTo(Math.log(s.mean) - s.meanLog, 12);
    const ll = (shape: number) => FAMILIES.gamma.logLikelihood({ shape, scale: s.mean / shape }, s);
    expect(ll(a)).toBeGreaterThan(ll(a * 1.001));
    expect(ll(a)).toBeGreaterThan(ll(a / 1.001));
  });
  it("Weibull: profile-likelihood shape solves Σ xᵏ ln x / Σ xᵏ − 1/k = mean ln x; scale = (mean xᵏ)^(1/k); a maximum", () => {
    const x = Float64Array.from([0.3, 2.2, 1.7, 4.1, 0.9, 3.3, 0.05, 7.4, 1e3]);
    const s = summarise(x);
    const { shape: k, scale } = weibullMle(s);
    const xs = Array.from(x);
    const w = xs.map((v) => v ** k);
    expect(w.reduce((a, b, i) => a + b * Math.log(xs[i]), 0) / w.reduce((a, b) => a + b, 0) - 1 / k).toBeCloseTo(s.meanLog, 11);
    expect(scale).toBeCloseTo(ssMean(w) ** (1 / k), 10);
    const ll = (shape: number, sc: number) => FAMILIES.weibull.logLikelihood({ shape, scale: sc }, s);
    for (const [dk, ds] of [[1.001, 1], [0.999, 1], [1, 1.001], [1, 0.999]]) expect(ll(k, scale)).toBeGreaterThan(ll(k * dk, scale * ds));
  });

  // Recovery from samples with known parameters. Bounds: 4 asymptotic standard errors from the
  // Fisher information (two-sided normal tail 6e-5); the seeds are fixed, so the checks are exact repeats.
  const n = 20_000;
  it("lognormal (μ = 4.5, σ = 0.9): se(μ̂) = σ/√n, se(σ̂) = σ/√(2n)", () => {
    const z = normals(uniforms("lognormal"));
    const x = Float64Array.from({ length: n }, () => Math.exp(4.5 + 0.9 * z()));
    const p = FAMILIES.lognormal.fit(summarise(x));
    expect(Math.abs(p.mu - 4.5)).toBeLessThan((4 * 0.9) / Math.sqrt(n));
    expect(Math.abs(p.sigma - 0.9)).toBeLessThan((4 * 0.9) / Math.sqrt(2 * n));
  });
  it("gamma as Erlang-3 (sums of exponentials, scale 40): var(â) = a / (n (a ψ'(a) − 1)) from the inverse Fisher information", () => {
    const u = uniforms("erlang");
    const x = Float64Array.from({ length: n }, () => -40 * (Math.log(u()) + Math.log(u()) + Math.log(u())));
    const p = FAMILIES.gamma.fit(summarise(x));
    const se = Math.sqrt(3 / (n * (3 * trigamma(3) - 1)));
    expect(Math.abs(p.shape - 3)).toBeLessThan(4 * se);
    expect(p.shape * p.scale).toBeCloseTo(ssMean(Array.from(x)), 9);
  });
  it("Weibull (k = 1.4, λ = 120) by inversion: var(k̂) = 6 k² / (π² n) (Cohen, Technometrics 7, 1965; from memory)", () => {
    const u = uniforms("weibull");
    const x = Float64Array.from({ length: n }, () => 120 * (-Math.log(u())) ** (1 / 1.4));
    const p = weibullMle(summarise(x));
    expect(Math.abs(p.shape - 1.4)).toBeLessThan(4 * Math.sqrt((6 * 1.4 ** 2) / (Math.PI ** 2 * n)));
    // scale: var(λ̂) ≈ 1.109 λ² / (k² n) (same source)
    expect(Math.abs(p.scale - 120)).toBeLessThan(4 * Math.sqrt((1.109 * 120 ** 2) / (1.4 ** 2 * n)));
  });
});

describe("fitHoldingTimes: ranking and bootstrap p-values", () => {
  const z = normals(uniforms("fits"));
  // durations written to 0.1 s, as a switch would
  const durations = Array.from({ length: 3000 }, () => Math.max(0.1, Math.round(Math.exp(4.6 + 0.8 * z()) * 10) / 10));
  const fit = fitHoldingTimes(durations, { replicates: 99 });
  it("ranks the true family first and finds the written resolution", () => {
    expect(fit.fits[0].family).toBe("lognormal");
    expect(fit.resolution).toBe(0.1);
    expect(writtenResolution(Float64Array.from([1, 2.5, 3]))).toBe(0.1);
    expect(writtenResolution(Float64Array.from([60, 120]))).toBe(60);
    expect(writtenResolution(Float64Array.from([Math.PI]))).toBe(0);
  });
  it("p-values: the true family is not rejected at 1 % and the exponential gets the smallest possible p, 1/(B+1)", () => {
    // Under the true law the bootstrap p-value is uniform on {1/(B+1), ...}, so P(p <= 0.01) = 0.01.
    const byName = Object.fromEntries(fit.fits.map((f) => [f.family, f]));
    expect(byName.lognormal.ksPValue!).toBeGreaterThan(0.01);
    expect(byName.lognormal.adPValue!).toBeGreaterThan(0.01);
    expect(byName.exponential.ksPValue).toBe(1 / 100);
    // written to 0.1 s: the observed statistics are taken on a subsample of the bootstrap size
    expect(fit.pValueMethod).toMatch(/parametric bootstrap, 99 samples of 2000 values compared with a random subsample of 2000 of the 3000 values, draws rounded to the recording resolution 0.1.*not valid with estimated parameters/);
  });
  it("mean and cv are the sample's (simple-statistics sampleVariance)", () => {
    expect(fit.mean).toBeCloseTo(ssMean(durations), 10);
    expect(fit.cv).toBeCloseTo(Math.sqrt(sampleVariance(durations)) / ssMean(durations), 10);
  });
  it("the same seed gives the same p-values", () => {
    const again = fitHoldingTimes(durations, { replicates: 99 });
    expect(again.fits.map((f) => f.ksPValue)).toEqual(fit.fits.map((f) => f.ksPValue));
  });
});

describe("fitHoldingTimes: durations recorded at a resolution (whole seconds)", () => {
  /** exponential (mean 180 s) or lognormal (mean 180 s, cv 2) durations rounded to whole seconds, zeros removed */
  function wholeSeconds(seed: string, n: number, law: "exponential" | "lognormal") {
    const u = uniforms(seed);
    const z = normals(uniforms(`${seed}:normal`));
    const sigma = Math.sqrt(Math.log(1 + 2 ** 2));
    const out: number[] = [];
    for (let i = 0; i < n; i++) {
      const x = Math.round(law === "exponential" ? -180 * Math.log(u()) : Math.exp(Math.log(180) - sigma ** 2 / 2 + sigma * z()));
      if (x > 0) out.push(x);
    }
    return out;
  }
  it("68 000 exponential durations in whole seconds: the exponential law is not rejected (same-size comparison, draws rounded)", () => {
    const x = wholeSeconds("whole-seconds-exp", 68_000, "exponential");
    expect(x.length).toBeGreaterThan(60_000);
    const fit = fitHoldingTimes(x, { replicates: 99 });
    expect(fit.resolution).toBe(1);
    expect(fit.pValueMethod).toMatch(/compared with a random subsample of 2000 of the \d+ values, draws rounded to the recording resolution 1,/);
    const exp = fit.fits.find((f) => f.family === "exponential")!;
    // under the true law the bootstrap p is uniform on {1/100, …, 1}: P(p ≤ 0.01) = 0.01 (the old √m·D vs √n·D comparison gave 1/(B+1) here)
    expect(exp.ksPValue!).toBeGreaterThan(0.01);
    expect(exp.adPValue!).toBeGreaterThan(0.01);
  });
  it("lognormal durations (cv 2) in whole seconds are still rejected as exponential, p = 1/(B+1)", () => {
    const fit = fitHoldingTimes(wholeSeconds("whole-seconds-lognormal", 20_000, "lognormal"), { replicates: 99 });
    expect(fit.resolution).toBe(1);
    const exp = fit.fits.find((f) => f.family === "exponential")!;
    expect(exp.ksPValue).toBe(1 / 100);
    expect(exp.adPValue).toBe(1 / 100);
  });
  it("finds grids other than decimal ones from the ties (5 s, 0.5 s), and none in continuous values", () => {
    const u = uniforms("grids");
    const draw = (grid: number) => Float64Array.from({ length: 500 }, () => Math.max(grid, Math.round((-180 * Math.log(u())) / grid) * grid));
    expect(writtenResolution(draw(5))).toBe(5);
    expect(writtenResolution(draw(0.5))).toBe(0.5);
    expect(writtenResolution(Float64Array.from({ length: 500 }, () => -180 * Math.log(u())))).toBe(0);
  });
  it("continuous durations keep the scaled comparison and the p-values they had before the same-size change (Weibull k = 1.4, 3 000 values)", () => {
    const u = uniforms("continuous-weibull");
    const x = Array.from({ length: 3000 }, () => 120 * (-Math.log(1 - u())) ** (1 / 1.4));
    const fit = fitHoldingTimes(x, { replicates: 99 });
    expect(fit.resolution).toBe(0);
    expect(fit.pValueMethod).toMatch(/99 samples of 2000 values \(√m·D compared with √n·D\), draws rounded to no resolution/);
    // values recorded from the previous implementation with the same seed
    const byName = Object.fromEntries(fit.fits.map((f) => [f.family, f]));
    expect([byName.weibull.ksPValue, byName.weibull.adPValue]).toEqual([0.87, 0.94]);
    for (const name of ["gamma", "lognormal", "exponential"]) expect([byName[name].ksPValue, byName[name].adPValue]).toEqual([0.01, 0.01]);
  });
});
