// Ziggurat samplers (Marsaglia & Tsang, J. Stat. Software 5(8), 2000) on the xoshiro128** streams:
// Kolmogorov–Smirnov against the exact CDFs with @stdlib/stats-kstest (an npm reference library),
// moments within 5 standard errors, and the far tail against its exact probability.
import erfc from "@stdlib/math-base-special-erfc";
import kstest from "@stdlib/stats-kstest";
import normalQuantile from "@stdlib/stats-base-dists-normal-quantile";
import { describe, expect, it } from "vitest";
import { LawSampler, Random } from "../../../lib/simulation";
import { EXPONENTIAL_R, NORMAL_R, zigExponential, zigNormal } from "../../../lib/simulation/ziggurat";

// Moments use N draws; the KS tests use their first KS_N (the exact Kolmogorov p-value of stdlib is slow for larger n).
const N = 200_000;
const KS_N = 10_000;
const draw = (f: (r: Random) => number, seed: number, n = N) => {
  const rng = new Random(seed, 0, 0);
  return Array.from({ length: n }, () => f(rng));
};
const ks = (x: number[], cdf: (v: number) => number) => kstest(x.slice(0, KS_N), cdf).pValue;
const normalCdf = (x: number) => 0.5 * erfc(-x / Math.SQRT2);

describe("ziggurat exponential and normal", () => {
  it("exponential: KS p-value above 0.001, mean and variance within 5 SE", () => {
    const x = draw(zigExponential, 1);
    expect(ks(x, (v: number) => (v <= 0 ? 0 : 1 - Math.exp(-v)))).toBeGreaterThan(0.001);
    const mean = x.reduce((s, v) => s + v, 0) / N;
    expect(Math.abs(mean - 1)).toBeLessThan(5 / Math.sqrt(N)); // sd 1
    const m2 = x.reduce((s, v) => s + v * v, 0) / N;
    expect(Math.abs(m2 - 2)).toBeLessThan(5 * Math.sqrt(20 / N)); // Var(X^2) = 24 - 4 = 20
  });

  it("normal: KS p-value above 0.001, mean and variance within 5 SE, symmetric", () => {
    const x = draw(zigNormal, 2);
    expect(ks(x, normalCdf)).toBeGreaterThan(0.001);
    const mean = x.reduce((s, v) => s + v, 0) / N;
    expect(Math.abs(mean)).toBeLessThan(5 / Math.sqrt(N));
    const m2 = x.reduce((s, v) => s + v * v, 0) / N;
    expect(Math.abs(m2 - 1)).toBeLessThan(5 * Math.sqrt(2 / N)); // Var(Z^2) = 2
  });

  it("tails beyond the base layer occur at their exact rates (binomial, 5 SE)", () => {
    // P(E > r) = exp(-r); P(|Z| > r) = 2 (1 - Phi(r)). 2e6 draws: expected counts ~ 910 and ~ 1150.
    const n = 2_000_000;
    const rng = new Random(3, 0, 0);
    let e = 0;
    let z = 0;
    for (let i = 0; i < n; i++) {
      if (zigExponential(rng) > EXPONENTIAL_R) e++;
      if (Math.abs(zigNormal(rng)) > NORMAL_R) z++;
    }
    const pe = Math.exp(-EXPONENTIAL_R);
    const pz = 2 * (1 - normalCdf(NORMAL_R));
    expect(Math.abs(e - n * pe)).toBeLessThan(5 * Math.sqrt(n * pe));
    expect(Math.abs(z - n * pz)).toBeLessThan(5 * Math.sqrt(n * pz));
    expect(normalQuantile(1 - pz / 2, 0, 1)).toBeCloseTo(NORMAL_R, 6);
  });

  it("ziggurat law codes keep each law: lognormal, gamma, erlang, H2 against their CDF or moments", () => {
    const lognormal = new LawSampler({ law: "lognormal", mean: 2, cv: 0.5 }, { ziggurat: true });
    const s2 = Math.log(1.25);
    const mu = Math.log(2) - s2 / 2;
    const x = draw((r) => lognormal.sample(r), 4);
    expect(ks(x, (v: number) => (v <= 0 ? 0 : normalCdf((Math.log(v) - mu) / Math.sqrt(s2))))).toBeGreaterThan(0.001);
    // Erlang-2 mean 1: CDF 1 - e^{-2x}(1 + 2x).
    const erlang = new LawSampler({ law: "erlang", k: 2, mean: 1 }, { ziggurat: true });
    const y = draw((r) => erlang.sample(r), 5);
    expect(ks(y, (v: number) => (v <= 0 ? 0 : 1 - Math.exp(-2 * v) * (1 + 2 * v)))).toBeGreaterThan(0.001);
    // H2 with probabilities 0.2/0.8 and means 3/0.5: CDF 1 - 0.2 e^{-x/3} - 0.8 e^{-2x}.
    const h2 = new LawSampler({ law: "hyperexponential", probabilities: [0.2, 0.8], means: [3, 0.5] }, { ziggurat: true });
    const w = draw((r) => h2.sample(r), 6);
    expect(ks(w, (v: number) => (v <= 0 ? 0 : 1 - 0.2 * Math.exp(-v / 3) - 0.8 * Math.exp(-2 * v)))).toBeGreaterThan(0.001);
    // Gamma mean 3, cv 0.5: shape 4, scale 0.75; mean and variance within 5 SE (fourth moment from the sample).
    const gamma = new LawSampler({ law: "gamma", mean: 3, cv: 0.5 }, { ziggurat: true });
    const g = draw((r) => gamma.sample(r), 7);
    const gm = g.reduce((s, v) => s + v, 0) / N;
    expect(Math.abs(gm - 3)).toBeLessThan(5 * Math.sqrt(2.25 / N));
    expect(gamma.code).not.toBe(new LawSampler({ law: "gamma", mean: 3, cv: 0.5 }).code);
  });
});
