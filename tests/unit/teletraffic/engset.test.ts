import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { engset, engsetIdleRateForOfferedTraffic, erlangB } from "../../../lib/teletraffic";
import { denseStationary, relativeError } from "./dense-chain";

function denseEngset(sources: number, servers: number, gamma: number, h: number) {
  const t: Array<[number, number, number]> = [];
  for (let j = 0; j < servers; j++) t.push([j, j + 1, (sources - j) * gamma]);
  for (let j = 1; j <= servers; j++) t.push([j, j - 1, j / h]);
  const p = denseStationary(servers + 1, t);
  const attempts = p.reduce((s, v, j) => s + (sources - j) * v, 0);
  return {
    time: p[servers],
    call: ((sources - servers) * p[servers]) / attempts,
    carried: p.reduce((s, v, j) => s + j * v, 0),
  };
}

describe("Engset (Engset 1918; Iversen, Teletraffic Engineering Handbook (ITU-D, 2005), Engset chapter)", () => {
  it.each([
    [10, 4, 0.3, 1],
    [20, 5, 0.2, 1],
    [6, 5, 2, 0.5],
    [50, 12, 0.05, 3],
  ])("S = %i, N = %i, γ = %f, h = %f against a dense solve of the birth–death chain", (s, n, gamma, h) => {
    const r = engset({ sources: s, servers: n, idleRate: gamma, meanHolding: h });
    const d = denseEngset(s, n, gamma, h);
    expect(relativeError(r.timeCongestion, d.time)).toBeLessThan(1e-12);
    expect(relativeError(r.callCongestion, d.call)).toBeLessThan(1e-12);
    expect(relativeError(r.carriedTraffic, d.carried)).toBeLessThan(1e-12);
    const offered = (s * gamma * h) / (1 + gamma * h);
    expect(relativeError(r.trafficCongestion, (offered - d.carried) / offered)).toBeLessThan(1e-11);
  });
  it("time, call and traffic congestion differ, call = time congestion with S − 1 sources (arrival theorem for finite sources)", () => {
    const r = engset({ sources: 20, servers: 5, idleRate: 0.2 });
    const fewer = engset({ sources: 19, servers: 5, idleRate: 0.2 });
    expect(relativeError(r.callCongestion, fewer.timeCongestion)).toBeLessThan(1e-12);
    expect(r.timeCongestion).toBeGreaterThan(r.callCongestion);
    expect(r.callCongestion).toBeGreaterThan(r.trafficCongestion);
  });
  it("tends to Erlang B as S → ∞ with offered traffic fixed (Poisson limit), error shrinking with S", () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 40 }), fc.double({ min: 0.5, max: 40, noNaN: true }), (n, a) => {
        const at = (s: number) => {
          const beta = a / (s - a); // S β / (1 + β) = A
          return Math.abs(engset({ sources: s, servers: n, idleRate: beta }).timeCongestion - erlangB(n, a)) / erlangB(n, a);
        };
        const coarse = at(10_000);
        const fine = at(1_000_000);
        return fine < coarse && fine < 1e-3;
      }),
      { seed: 42, numRuns: 100 },
    );
  });
  it("N >= S: no call is ever blocked", () => {
    const r = engset({ sources: 5, servers: 5, idleRate: 1 });
    expect(r.callCongestion).toBe(0);
    expect(r.trafficCongestion).toBe(0);
    expect(r.timeCongestion).toBeCloseTo(1 / 32, 15); // all 5 busy: (β/(1+β))^5 with β = 1
  });
});

describe("Engset inverse: idle-source rate from offered traffic per source (fixed point β = α / (1 − α(1 − C)), Iversen, Engset chapter)", () => {
  it.each([
    [20, 5, 0.2],
    [30, 10, 0.5],
    [100, 30, 0.35],
    [12, 11, 0.9],
  ])("S = %i, N = %i, α = %f: the solution reproduces α = β × idle fraction", (s, n, alpha) => {
    const r = engsetIdleRateForOfferedTraffic({ sources: s, servers: n, attemptPerSource: alpha });
    expect(r.given).toBe("attempt-based");
    expect(r.errorBound).toBeLessThanOrEqual(1.1e-13);
    expect(r.iterations).toBeGreaterThan(1);
    // offered traffic per source = call attempt rate per source × h
    expect(relativeError(r.callAttemptRate / s, alpha)).toBeLessThan(1e-10);
    expect(relativeError(r.offeredPerIdleSource * (1 - r.carriedTraffic / s), alpha)).toBeLessThan(1e-10);
  });
  it("without blocking (N >= S) β = α / (1 − α) exactly", () => {
    const r = engsetIdleRateForOfferedTraffic({ sources: 4, servers: 4, attemptPerSource: 0.25 });
    expect(r.offeredPerIdleSource).toBeCloseTo(1 / 3, 14);
  });
  it("near saturation (S = 10^5, N = S − 1) it stops on its error bound and the answer reproduces α to that bound", () => {
    // Before: the fixed point stopped on its step size and reported convergence 5e-9 away from the root.
    const s = 100_000;
    const alpha = 0.99;
    const r = engsetIdleRateForOfferedTraffic({ sources: s, servers: s - 1, attemptPerSource: alpha });
    expect(r.errorBound).toBeLessThanOrEqual(1.1e-13);
    expect(r.iterations).toBeLessThan(200);
    // independent check by the definition α = β (1 − Y/S), Y from the exact Engset distribution
    const check = engset({ sources: s, servers: s - 1, idleRate: r.idleRate });
    expect(relativeError(check.offeredPerIdleSource * (1 - check.carriedTraffic / s), alpha)).toBeLessThan(1e-12);
  });
  it("intended traffic per source inverts in closed form: β = a / (1 − a), and engset reports a × S back as intended traffic", () => {
    const r = engsetIdleRateForOfferedTraffic({ sources: 30, servers: 10, intendedPerSource: 0.4 });
    expect(r.given).toBe("intended");
    expect(r.offeredPerIdleSource).toBeCloseTo(0.4 / 0.6, 14);
    expect(relativeError(engset({ sources: 30, servers: 10, idleRate: r.idleRate }).intendedTraffic, 12)).toBeLessThan(1e-14);
  });
  it("exactly one of the two traffics must be given", () => {
    expect(() => engsetIdleRateForOfferedTraffic({ sources: 30, servers: 10 })).toThrow(/attemptPerSource/);
    expect(() => engsetIdleRateForOfferedTraffic({ sources: 30, servers: 10, intendedPerSource: 0.1, attemptPerSource: 0.1 })).toThrow(/exactly one/);
  });
});
