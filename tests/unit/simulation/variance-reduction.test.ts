// Issue #11, section 2: the variance-reduced call-congestion estimator (variance-reduction.ts)
// keeps its coverage on non-Poisson traffic and reduces to the plain ratio without controls.
import tQuantile from "@stdlib/stats-base-dists-t-quantile";
import { describe, expect, it } from "vitest";
import { mmppLossSystem } from "../../../lib/teletraffic";
import { controlledRatio, maxControls } from "../../../lib/simulation/variance-reduction";
import { ratioInterval } from "../../../lib/simulation/estimators";
import { Random } from "../../../lib/simulation/node";
import { coverageRegion as region, coverageCount as coverage, simulateReference } from "./helpers";

describe("the regression estimator", () => {
  it("without controls it is exactly the ratio estimator", () => {
    const y = [3, 5, 4, 6, 2];
    const x = [100, 110, 90, 120, 95];
    const a = controlledRatio(y, x, [], 0.95);
    const b = ratioInterval(y, x, 0.95);
    expect(a.estimate).toBe(b.estimate);
    expect(a.standardError).toBeCloseTo(b.standardError, 15);
    expect(a.halfWidth).toBeCloseTo(b.halfWidth, 15);
    expect(a.degreesOfFreedom).toBe(4);
  });

  it("one control: the textbook formulas beta = Sxy/Sxx, Y - beta X, s^2 (1/n + X^2/Sxx) on n - 2 degrees of freedom", () => {
    // Lavenberg & Welch (1981), single control with known mean 0; with x_i = 1 the ratio is the mean.
    const rng = new Random(3, 0, 0);
    const n = 30;
    const c = Array.from({ length: n }, () => rng.normal());
    const y = c.map((ci) => 5 + 2 * ci + 0.1 * rng.normal());
    const r = controlledRatio(y, Array(n).fill(1), [{ name: "c", values: c }], 0.95);
    const mean = (v: number[]) => v.reduce((s, t) => s + t, 0) / v.length;
    const cm = mean(c);
    const ym = mean(y);
    const sxx = c.reduce((s, ci) => s + (ci - cm) ** 2, 0);
    const sxy = c.reduce((s, ci, i) => s + (ci - cm) * (y[i] - ym), 0);
    const beta = sxy / sxx;
    const resid = y.map((yi, i) => yi - ym - beta * (c[i] - cm));
    const s2 = resid.reduce((s, e) => s + e * e, 0) / (n - 2);
    expect(r.estimate).toBeCloseTo(ym - beta * cm, 12);
    expect(r.standardError).toBeCloseTo(Math.sqrt(s2 * (1 / n + (cm * cm) / sxx)), 12);
    expect(r.halfWidth).toBeCloseTo(tQuantile(0.975, n - 2) * r.standardError, 12);
    // The control explains almost all the noise: the error is near 0.1 / sqrt(n), not 2 / sqrt(n).
    expect(r.standardError).toBeLessThan(0.05);
  });

  it("a control with no variation is skipped; at most floor((n - 2) / 5) controls", () => {
    const y = [1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12];
    const x = Array(12).fill(1);
    const zero = { name: "zero", values: Array(12).fill(0) };
    const wiggle = (k: number) => ({ name: `w${k}`, values: y.map((_, i) => Math.sin(i * (k + 1))) });
    expect(maxControls(12)).toBe(2);
    expect(controlledRatio(y, x, [zero, wiggle(1), wiggle(2), wiggle(3)], 0.95).used).toEqual(["w1", "w2"]);
  });
});

/** Mean interarrival 0.1333 (7.5 calls per holding time on 8 servers), squared coefficient of variation about 2.5. */
const H2_MEANS = [0.05, 0.2 / 0.75 - 0.05];

/**
 * GI/M/N/N call congestion (Takacs, Introduction to the Theory of Queues, 1962; Cooper, Introduction
 * to Queueing Theory, 2nd ed., 1981, sec. 6.4): B = 1 / sum_{j=0..N} C(N, j) prod_{i=1..j} (1 - f(i mu)) / f(i mu),
 * f the Laplace-Stieltjes transform of the interarrival law (here a mixture of exponentials).
 */
function takacsCallCongestion(servers: number, mu: number, probabilities: number[], means: number[]): number {
  const f = (s: number) => probabilities.reduce((a, q, k) => a + q / (1 + means[k] * s), 0);
  let sum = 0;
  for (let j = 0; j <= servers; j++) {
    let term = 1;
    for (let i = 1; i <= j; i++) term *= (((servers - j + i) / i) * (1 - f(i * mu))) / f(i * mu);
    sum += term;
  }
  return 1 / sum;
}

describe("coverage of the variance-reduced call congestion on non-Poisson traffic", () => {
  it("bursty on-off arrivals (intensity estimator + 4 controls, 22 replications): covers the exact MMPP chain", () => {
    const runs = 400;
    const { low, high, fail, passNarrow } = region(runs);
    expect(fail).toBeLessThan(0.002);
    expect(passNarrow).toBeLessThan(0.01);
    const exact = mmppLossSystem({ servers: 10, rates: [14, 0], switching: [[0, 1], [1, 0]], meanHolding: 1 }).callCongestion;
    const { covered, methods } = coverage(runs, exact, (seed) => ({
      servers: 10,
      arrivals: { process: "on-off", onRate: 14, meanOn: 1, meanOff: 1 },
      holding: { law: "exponential", mean: 1 },
      run: { seed, replications: 22, callsPerReplication: 1_500, warmupCalls: 150 },
    }));
    expect([...methods]).toEqual(["intensity estimator with control variates (arrivals, holding times, phase sojourns, near-refusal phase sojourns)"]);
    // At these seeds (reference loop): on-off 380 of 400, overflow 292 of 300, renewal 289 of 300.
    expect(covered, `covered ${covered} of ${runs}`).toBeGreaterThanOrEqual(low);
    expect(covered, `covered ${covered} of ${runs}`).toBeLessThanOrEqual(high);
  }, 60_000);

  it("renewal (hyperexponential) arrivals: direct count + controls covers Palm-Takacs GI/M/N/N", () => {
    const runs = 300;
    const { low, high, passNarrow } = region(runs);
    expect(passNarrow).toBeLessThan(0.01);
    const exact = takacsCallCongestion(8, 1, [0.5, 0.5], H2_MEANS);
    const { covered, methods } = coverage(runs, exact, (seed) => ({
      servers: 8,
      arrivals: { process: "renewal", interarrival: { law: "hyperexponential", probabilities: [0.5, 0.5], means: H2_MEANS } },
      holding: { law: "exponential", mean: 1 },
      run: { seed, replications: 22, callsPerReplication: 1_500, warmupCalls: 150 },
    }));
    expect([...methods][0]).toMatch(/^direct count with control variates/);
    // At these seeds (reference loop): on-off 380 of 400, overflow 292 of 300, renewal 289 of 300.
    expect(covered, `covered ${covered} of ${runs}`).toBeGreaterThanOrEqual(low);
    expect(covered, `covered ${covered} of ${runs}`).toBeLessThanOrEqual(high);
  }, 60_000);
});

describe("the variance falls", () => {
  it("M/M/30/30 at 20 E with 40 replications: the reported estimator's variance is below 0.6 x the direct count's", () => {
    // Measured in the bench (tests/bench/variance.bench.ts): about 0.25 x. Each variance estimate is
    // within a factor 2 of its value at 99.9 % on 34-39 degrees of freedom (chi-square), so the
    // ratio stays below 0.25 x 2 x 1.2 = 0.6 at any seed with overwhelming probability.
    const r = simulateReference({ servers: 30, arrivals: { process: "poisson", rate: 20 }, holding: { law: "exponential", mean: 1 }, run: { seed: 5, replications: 40, callsPerReplication: 20_000, warmupCalls: 1_000 } });
    expect(r.callCongestion.method).toMatch(/PASTA/);
    expect((r.callCongestion.standardError / r.callCongestionDirect.standardError) ** 2).toBeLessThan(0.6);
  });
});
