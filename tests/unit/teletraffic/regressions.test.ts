import { describe, expect, it } from "vitest";
import {
  engset,
  engsetIdleRateForOfferedTraffic,
  erlangB,
  erlangBSummary,
  finiteQueue,
  batchPoissonLossSystem,
  haywardBlocking,
  kaufmanRoberts,
  maxTrafficForBlocking,
  mmppLossSystem,
  overflowLossSystem,
  renewalLossSystem,
  TeletrafficInputError,
} from "../../../lib/teletraffic";
import { bigRatio, relativeError } from "./dense-chain";

function inputErrorField(fn: () => unknown): string | undefined {
  try {
    fn();
  } catch (error) {
    if (error instanceof TeletrafficInputError) return error.field;
    throw error;
  }
  return undefined;
}

describe("Erlang B inverse in A: tiny targets and the edges of the domain", () => {
  // For small A the closed form B(N, A) = (A^N/N!) / Σ_{k<=N} A^k/k! (Erlang 1917) is A^N/N! to
  // within a relative A, so the root of B = t is (N! t)^(1/N) to far below double precision.
  it.each([
    [1, 1e-100],
    [3, 1e-300],
    [5, 1e-300],
    [2, 1e-200],
  ])("N = %i, target %e: root (N! t)^(1/N) from the small-A closed form, blocking <= target", (n, target) => {
    const factorial = [1, 1, 2, 6, 24, 120][n];
    const expected = Math.pow(factorial * target, 1 / n);
    const r = maxTrafficForBlocking({ servers: n, target });
    expect(relativeError(r.traffic, expected)).toBeLessThan(1e-12);
    expect(r.blocking).toBeLessThanOrEqual(target);
  });
  it("tiny real N: 1/B(x, A) ≈ 1 + x ln(1/A) (Jagerman 1974 integral), so no double A meets 0.5 at x = 1e-9: input error on target", () => {
    // 1/B(1e-9, 5e-324) ≈ 1 + 1e-9 · 744.4, i.e. B ≈ 1 − 7.4e-7 even at the smallest positive traffic
    expect(inputErrorField(() => maxTrafficForBlocking({ servers: 1e-9, target: 0.5 }))).toBe("target");
  });
  it("target near 1: B(5, A) ≈ 1 − 5/A for A ≫ N, so the root for 1 − 1e-15 is about 5e15, beyond the 1e7 traffic domain: input error", () => {
    expect(inputErrorField(() => maxTrafficForBlocking({ servers: 5, target: 1 - 1e-15 }))).toBe("target");
    // inside the domain the same relation holds: target 1 − 1e-6 gives A ≈ 5e6 (N/(1 − t) to first order)
    const r = maxTrafficForBlocking({ servers: 5, target: 1 - 1e-6 });
    expect(relativeError(r.traffic, 5e6)).toBeLessThan(1e-5);
    expect(erlangB(5, r.traffic)).toBeLessThanOrEqual(1 - 1e-6);
  });
});

describe("M/M/N/N+Q with a long queue (accuracy of the geometric queue sums)", () => {
  it("N = 1, A = 1e7, Q = 1e6 is M/M/1/K, K = Q + 1: p_j ∝ ρ^j (Kleinrock, Queueing Systems vol. 1), so carried = 1 − p_0 ≈ 1 and P(wait) = Σ_{0<j<K} p_j ≈ 1/ρ", () => {
    const rho = 1e7;
    const q = 1_000_000;
    const r = finiteQueue({ servers: 1, traffic: rho, waitingPositions: q });
    // relative to the top state p_{K−i} ∝ ρ^−i; ρ^−K underflows, so Σ_{i>=1} ρ^−i = 1/(ρ − 1) gives
    // 1 − p_K = 1/ρ, p_0 = 0, P(wait) = 1/ρ; E[i] = 1/(ρ − 1), so L = K − 1/(ρ − 1) and
    // L_q = L − (1 − p_0) = Q − 1/(ρ − 1)
    expect(relativeError(r.carriedTraffic, 1)).toBeLessThan(1e-12);
    expect(r.carriedTraffic).toBeLessThanOrEqual(1 + 1e-15);
    // over admitted calls: (1/ρ) / (1 − p_K) = (1/ρ) / (1/ρ) = 1 − p_0/(1 − p_K), and p_0 underflows
    expect(relativeError(r.waitingProbability, 1)).toBeLessThan(1e-12);
    expect(relativeError(r.fullCongestion, 1 - 1 / rho)).toBeLessThan(1e-15);
    expect(r.timeCongestion).toBe(1); // 1 − p_0, p_0 ∝ ρ^−K underflows
    expect(r.meanQueueLength).toBeLessThanOrEqual(q);
    expect(relativeError(r.meanQueueLength, q - 1 / (rho - 1))).toBeLessThan(1e-15);
  });
  it("N = 3, A = 2.9999, Q = 100 000: full-system congestion against an exact rational value", () => {
    // Exact value computed with Python decimal at 60 digits from the exact binary value of 2.9999:
    //   from decimal import Decimal as D, getcontext
    //   getcontext().prec = 60; getcontext().Emax = 10**9; getcontext().Emin = -10**9
    //   a = D(2.9999); n = 3; q = 100000; rho = a / n
    //   w = [D(1), a, a*a/2, a**3/6]
    //   geo = (1 - rho**(q+1)) / (1 - rho)   # sum_{k=0}^{Q} rho^k
    //   total = w[0] + w[1] + w[2] + w[3]*geo
    //   print(repr(float(w[3]*rho**q/total)))   # 1.2329704845835904e-06
    // (ln(A/N) as log(A/N) carried the rounding of A/N times Q: 2.3e-12 relative error)
    const r = finiteQueue({ servers: 3, traffic: 2.9999, waitingPositions: 100_000 });
    expect(relativeError(r.fullCongestion, 1.2329704845835904e-6)).toBeLessThan(1e-13);
  });
});

describe("Engset traffic congestion when it is small", () => {
  it("S = 1000, N = 10, β = 2^-13: C = (A − Y)/A against exact BigInt rational arithmetic of the truncated binomial (Engset 1918)", () => {
    const S = 1000;
    const N = 10;
    // p_j ∝ binom(S, j) β^j; with β = 1/8192 scale by 8192^N: w_j = binom(S, j) 8192^(N−j)
    const w: bigint[] = [];
    let binom = 1n;
    for (let j = 0; j <= N; j++) {
      if (j > 0) binom = (binom * BigInt(S - j + 1)) / BigInt(j);
      w.push(binom * 8192n ** BigInt(N - j));
    }
    const total = w.reduce((s, v) => s + v, 0n);
    const busy = w.reduce((s, v, j) => s + BigInt(j) * v, 0n);
    // A = S β/(1+β) = S/8193, Y = busy/total: C = (S total − 8193 busy) / (S total)
    const exact = bigRatio(BigInt(S) * total - 8193n * busy, BigInt(S) * total);
    const r = engset({ sources: S, servers: N, idleRate: 2 ** -13 });
    expect(relativeError(r.trafficCongestion, exact)).toBeLessThan(1e-12);
    // and the identity C = (S − N) E / S (Iversen, Teletraffic Engineering Handbook, Engset chapter)
    expect(relativeError(r.trafficCongestion, ((S - N) * r.timeCongestion) / S)).toBeLessThan(1e-15);
  });
  it("S = 100, N = 50, β = 0.1: traffic congestion is positive (≈ 3.66e-26), not rounded to 0, and below the call congestion", () => {
    const r = engset({ sources: 100, servers: 50, idleRate: 0.1 });
    expect(r.trafficCongestion).toBeGreaterThan(0);
    expect(relativeError(r.trafficCongestion, (50 * r.timeCongestion) / 100)).toBeLessThan(1e-15);
    expect(r.trafficCongestion).toBeLessThan(r.callCongestion);
  });
  it("inverse from attempt-based traffic: tiny congestion stays positive and the root reproduces α", () => {
    const r = engsetIdleRateForOfferedTraffic({ sources: 1000, servers: 10, attemptPerSource: 1e-4 });
    expect(r.callCongestion).toBeGreaterThan(0);
    expect(r.trafficCongestion).toBeGreaterThan(0);
    // fixed point check against the definition α = β (1 − Y/S)
    expect(relativeError(r.offeredPerIdleSource * (1 - r.carriedTraffic / 1000), 1e-4)).toBeLessThan(1e-12);
  });
});

describe("GI/M/N/N with a nearly deterministic gamma law", () => {
  it("cv = 1e-200 (shape 1/cv² = Infinity) gives the deterministic Palm–Takács value computed here from φ(s) = e^{−sD} (Takács 1962)", () => {
    const n = 5;
    const d = 0.2;
    let sum = 1;
    let binom = 1;
    let c = 1;
    for (let j = 1; j <= n; j++) {
      binom = (binom * (n - j + 1)) / j;
      const phi = Math.exp(-j * d);
      c *= phi / (1 - phi);
      sum += binom / c;
    }
    const r = renewalLossSystem({ servers: n, interarrival: { law: "gamma", mean: d, cv: 1e-200 } });
    expect(relativeError(r.callCongestion, 1 / sum)).toBeLessThan(1e-13);
  });
});

describe("MMPP/M/N/N carried traffic and N = 0", () => {
  it("carried traffic equals the mean number busy (Little's law) and stays <= N when the call congestion is near 1", () => {
    const r = mmppLossSystem({
      servers: 49_999,
      rates: [1, 2, 3, 4],
      switching: [
        [0, 1, 0, 0],
        [0, 0, 1, 0],
        [0, 0, 0, 1],
        [1, 0, 0, 0],
      ],
      meanHolding: 1e12,
    });
    expect(r.callCongestion).toBeGreaterThan(0.99999);
    expect(r.carriedTraffic).toBeLessThanOrEqual(49_999);
    expect(relativeError(r.carriedTraffic, r.meanBusy)).toBeLessThan(1e-6);
  });
  it("no arrivals on zero servers: the only state is the full one, time congestion 1 (as B(0, 0) = 1)", () => {
    const r = mmppLossSystem({ servers: 0, rates: [0, 0], switching: [[0, 1], [1, 0]] });
    expect(r.timeCongestion).toBe(1);
    const busy = mmppLossSystem({ servers: 0, rates: [3, 1], switching: [[0, 1], [1, 0]] });
    expect(busy.timeCongestion).toBe(1);
    expect(busy.callCongestion).toBe(1);
  });
});

describe("Hayward with a very smooth stream", () => {
  it("V = 1e-300 on N = 0: M/Z = M²/V is far beyond the traffic domain, an input error naming variance", () => {
    expect(inputErrorField(() => haywardBlocking({ mean: 1e5, variance: 1e-300, servers: 0 }))).toBe("variance");
  });
});

describe("overflow network whose overflow underflows", () => {
  it("0.001 E on 1000 primary servers: M = A B(1000, 0.001) ≈ 0.001^1001/1000! underflows to 0 (Riordan mean), an input error naming primaries", () => {
    // ln M ≈ 1001 ln 0.001 − ln 1000! ≈ −6915 − 5912, far below ln(5e-324) ≈ −744
    expect(inputErrorField(() => overflowLossSystem({ primaries: [{ traffic: 0.001, servers: 1000 }], servers: 5 }))).toBe("primaries");
  });
});

/**
 * 1 − B(x, A) from the integral 1/B(x, A) = ∫_0^∞ e^{−u} (1 + u/A)^x du (Jagerman 1974), as
 * ∫ e^{−u} expm1(x ln(1 + u/A)) du / ∫ e^{−u} (1 + u/A)^x du, by double-exponential quadrature
 * u = exp(π/2 sinh t) (Takahasi & Mori 1974); no subtraction near B = 1.
 */
function complementByQuadrature(x: number, a: number): number {
  const h = 1 / 64;
  let num = 0;
  let den = 0;
  for (let k = -384; k <= 384; k++) {
    const t = k * h;
    const u = Math.exp((Math.PI / 2) * Math.sinh(t));
    if (u > 745) break;
    const w = Math.exp(-u) * u * (Math.PI / 2) * Math.cosh(t) * h;
    num += w * Math.expm1(x * Math.log1p(u / a));
    den += w * Math.exp(x * Math.log1p(u / a));
  }
  return num / den;
}

describe("Erlang B carried traffic when B is near 1", () => {
  it("N = 1, A = 1e7: carried = A/(1 + A) (closed form)", () => {
    expect(relativeError(erlangBSummary({ servers: 1, traffic: 1e7 }).carriedTraffic, 1e7 / (1 + 1e7))).toBeLessThan(1e-15);
  });
  it.each([
    [0.001, 1e7],
    [0.5, 1e7],
    [0.7, 1e5],
    [0.3, 50],
  ])("real N = %f, A = %f: carried against the Jagerman integral by quadrature, and never above N", (n, a) => {
    const r = erlangBSummary({ servers: n, traffic: a });
    expect(relativeError(r.carriedTraffic, a * complementByQuadrature(n, a))).toBeLessThan(1e-13);
    expect(r.carriedTraffic).toBeLessThanOrEqual(n);
  });
});

describe("carried traffic in overload, where every model reduces to M/M/1/1: carried = A/(1 + A) (Erlang 1917)", () => {
  const a = 1e7;
  const exact = a / (1 + a);
  it("Kaufman–Roberts, C = 1, one class of bandwidth 1", () => {
    expect(relativeError(kaufmanRoberts({ capacity: 1, classes: [{ traffic: a, bandwidth: 1 }] }).classes[0].carriedTraffic, exact)).toBeLessThan(1e-14);
  });
  it("GI/M/1/1 with exponential interarrivals of mean 1e-7", () => {
    expect(relativeError(renewalLossSystem({ servers: 1, interarrival: { law: "exponential", mean: 1 / a } }).carriedTraffic, exact)).toBeLessThan(1e-14);
  });
  it("batch Poisson with mean batch size 1", () => {
    expect(relativeError(batchPoissonLossSystem({ servers: 1, traffic: a, meanBatchSize: 1, admission: "partial" }).carriedTraffic, exact)).toBeLessThan(1e-14);
  });
});
