import { describe, expect, it } from "vitest";
import fc from "fast-check";
import {
  equivalentRandom,
  erlangB,
  extendedErlangB,
  haywardBlocking,
  overflowLossSystem,
  overflowMoments,
  TeletrafficInputError,
} from "../../../lib/teletraffic";
import { denseOverflowNetwork, denseStationary, relativeError } from "./dense-chain";

/** Moments of the busy count on an (effectively) infinite overflow group, by dense solve. */
function denseOverflowMoments(a: number, n: number, truncation: number) {
  const idx = (k: number, j: number) => k * (truncation + 1) + j;
  const t: Array<[number, number, number]> = [];
  for (let k = 0; k <= n; k++) {
    for (let j = 0; j <= truncation; j++) {
      if (k < n) t.push([idx(k, j), idx(k + 1, j), a]);
      else if (j < truncation) t.push([idx(k, j), idx(k, j + 1), a]);
      if (k > 0) t.push([idx(k, j), idx(k - 1, j), k]);
      if (j > 0) t.push([idx(k, j), idx(k, j - 1), j]);
    }
  }
  const p = denseStationary((n + 1) * (truncation + 1), t);
  let m1 = 0;
  let m2 = 0;
  for (let k = 0; k <= n; k++) for (let j = 0; j <= truncation; j++) {
    m1 += j * p[idx(k, j)];
    m2 += j * j * p[idx(k, j)];
  }
  return { mean: m1, variance: m2 - m1 * m1 };
}

describe("Riordan overflow moments (Wilkinson 1956, Bell Syst. Tech. J. 35; ITU-T E.521)", () => {
  it.each([
    [3, 2],
    [5, 4],
    [2, 3],
  ])("A = %f on N = %i: mean and variance match a dense solve of the two-stage chain (overflow group truncated at 45)", (a, n) => {
    const d = denseOverflowMoments(a, n, 45);
    const r = overflowMoments({ traffic: a, servers: n });
    expect(relativeError(r.mean, d.mean)).toBeLessThan(1e-10);
    expect(relativeError(r.variance, d.variance)).toBeLessThan(1e-9);
    expect(r.peakedness).toBeGreaterThan(1);
  });
  it("N = 0: the whole Poisson stream overflows, Z = 1", () => {
    const r = overflowMoments({ traffic: 7, servers: 0 });
    expect(r.mean).toBe(7);
    expect(r.peakedness).toBeCloseTo(1, 14);
  });
});

describe("Wilkinson equivalent random (Wilkinson 1956; Rapp 1964 starting values; ITU-T E.521)", () => {
  it.each([
    [10, 8],
    [20, 15.5],
    [50, 45],
    [2, 0.5],
    [100, 120],
  ])("recovers A* = %f, N* = %f from the Riordan moments of its own overflow (round trip)", (a, n) => {
    const m = overflowMoments({ traffic: a, servers: n });
    const er = equivalentRandom({ mean: m.mean, variance: m.variance });
    expect(relativeError(er.equivalentTraffic, a)).toBeLessThan(1e-8);
    expect(Math.abs(er.equivalentServers - n)).toBeLessThan(1e-7);
  });
  it("Z = 1 gives Erlang B (property)", () => {
    fc.assert(
      fc.property(fc.double({ min: 0.1, max: 200, noNaN: true }), fc.double({ min: 0, max: 200, noNaN: true }), (m, n) => {
        const er = equivalentRandom({ mean: m, variance: m, servers: n });
        return er.equivalentServers === 0 && relativeError(er.blocking! + 1e-300, erlangB(n, m) + 1e-300) < 1e-12;
      }),
      { seed: 42, numRuns: 100 },
    );
  });
  it("Z < 1 is rejected naming the variance (ER needs peakedness >= 1)", () => {
    expect(() => equivalentRandom({ mean: 5, variance: 4, servers: 3 })).toThrow(TeletrafficInputError);
    try {
      equivalentRandom({ mean: 5, variance: 4 });
    } catch (error) {
      expect((error as TeletrafficInputError).field).toBe("variance");
    }
  });
  it("for one primary group the ER blocking is the exact overflow blocking (exact CTMC, dense solve)", () => {
    const dense = denseOverflowNetwork([{ traffic: 10, servers: 8 }], 5);
    const m = overflowMoments({ traffic: 10, servers: 8 });
    const er = equivalentRandom({ mean: m.mean, variance: m.variance, servers: 5 });
    expect(relativeError(er.blocking!, dense.blocking)).toBeLessThan(1e-9);
    expect(relativeError(er.lostTraffic!, dense.blocking * dense.overflowOffered)).toBeLessThan(1e-9);
  });
});

describe("Hayward approximation (Fredericks 1980, Bell Syst. Tech. J. 59, 'Congestion in blocking systems')", () => {
  it("Z = 1 gives Erlang B (property)", () => {
    fc.assert(
      fc.property(fc.double({ min: 0.1, max: 200, noNaN: true }), fc.double({ min: 0, max: 200, noNaN: true }), (m, n) => {
        return haywardBlocking({ mean: m, variance: m, servers: n }).blocking === erlangB(n, m);
      }),
      { seed: 42, numRuns: 100 },
    );
  });
  it("works for smooth traffic (Z < 1) and uses fractional groups: B(N/Z, A/Z)", () => {
    const r = haywardBlocking({ mean: 8, variance: 6, servers: 10 });
    expect(r.blocking).toBe(erlangB(10 / 0.75, 8 / 0.75));
    expect(r.blocking).toBeLessThan(erlangB(10, 8)); // smooth traffic is blocked less than Poisson
  });
});

describe("exact overflow network beside ER and Hayward (exact CTMC; the comparison is the known weakness of ER for mixed streams)", () => {
  it("one primary: exact equals a dense solve, and ER agrees with it", () => {
    const dense = denseOverflowNetwork([{ traffic: 6, servers: 4 }], 6);
    const r = overflowLossSystem({ primaries: [{ traffic: 6, servers: 4 }], servers: 6 });
    expect(relativeError(r.blocking, dense.blocking)).toBeLessThan(1e-10);
    expect(relativeError(r.timeCongestion, dense.timeCongestion)).toBeLessThan(1e-10);
    expect(relativeError(r.equivalentRandomBlocking, r.blocking)).toBeLessThan(1e-8);
    // overflow offered to the final group is the primary's lost traffic A B(n, A)
    expect(relativeError(r.overflowOffered, 6 * erlangB(4, 6))).toBeLessThan(1e-12);
  });
  it("two primaries (10 E on 15, 2 E on 2) onto 8 servers: ER underestimates the exact blocking by about 63 %", () => {
    const primaries = [
      { traffic: 10, servers: 15 },
      { traffic: 2, servers: 2 },
    ];
    const dense = denseOverflowNetwork(primaries, 8);
    const r = overflowLossSystem({ primaries, servers: 8 });
    expect(relativeError(r.blocking, dense.blocking)).toBeLessThan(1e-9);
    // numbers as computed (exact ≈ 0.00576, ER ≈ 0.00216): the peaked overflow of the large group
    // arrives in bursts the two-moment match does not see at this low blocking.
    expect(r.blocking).toBeCloseTo(0.00576, 5);
    expect(r.equivalentRandomBlocking / r.blocking).toBeGreaterThan(0.3);
    expect(r.equivalentRandomBlocking / r.blocking).toBeLessThan(0.45);
  });
  it("a primary plus a direct Poisson stream (10 E on 15, 2 E direct) onto 8 servers: ER about 50 % low; overflow calls of the two streams are blocked differently", () => {
    const primaries = [
      { traffic: 10, servers: 15 },
      { traffic: 2, servers: 0 },
    ];
    const dense = denseOverflowNetwork(primaries, 8);
    const r = overflowLossSystem({ primaries, servers: 8 });
    expect(relativeError(r.blocking, dense.blocking)).toBeLessThan(1e-9);
    expect(r.blocking).toBeCloseTo(0.010506, 5);
    expect(r.equivalentRandomBlocking / r.blocking).toBeGreaterThan(0.45);
    expect(r.equivalentRandomBlocking / r.blocking).toBeLessThan(0.55);
    // the direct Poisson calls see the time congestion (PASTA); the bursty overflow sees far more
    expect(relativeError(r.perPrimary[1].blocking, r.timeCongestion)).toBeLessThan(1e-10);
    expect(r.perPrimary[0].blocking).toBeGreaterThan(5 * r.perPrimary[1].blocking);
  });
  it("rejects state spaces over the documented limit", () => {
    expect(() => overflowLossSystem({ primaries: [{ traffic: 5, servers: 600 }, { traffic: 5, servers: 600 }], servers: 10 })).toThrow(TeletrafficInputError);
  });
});

describe("extended Erlang B with repeated attempts (Jewett & Shrago's recall model, from memory)", () => {
  it("r = 0 is Erlang B", () => {
    const r = extendedErlangB({ servers: 10, traffic: 8, persistence: 0 });
    expect(r.blocking).toBe(erlangB(10, 8));
    expect(r.offeredTotal).toBe(8);
    expect(r.converged).toBe(true);
  });
  it("the result satisfies its fixed point A_tot = A + r A_tot B(N, A_tot) and flows balance", () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 100 }), fc.double({ min: 0.1, max: 1.5, noNaN: true }), fc.double({ min: 0, max: 0.95, noNaN: true }), (n, load, r) => {
        const x = extendedErlangB({ servers: n, traffic: n * load, persistence: r });
        if (!x.converged) return false;
        const fixed = n * load + r * x.offeredTotal * erlangB(n, x.offeredTotal);
        // fresh = carried + finally lost
        return relativeError(fixed, x.offeredTotal) < 1e-10 && relativeError(x.carriedTraffic + x.lostTraffic, n * load) < 1e-9;
      }),
      { seed: 42, numRuns: 150 },
    );
  });
  it("blocking grows with the recall factor", () => {
    const b = [0, 0.3, 0.6, 0.9].map((r) => extendedErlangB({ servers: 20, traffic: 18, persistence: r }).blocking);
    for (let i = 1; i < b.length; i++) expect(b[i]).toBeGreaterThan(b[i - 1]);
  });
  it("heavy overload with r near 1 (slow contraction) is finished by the bracketed root and still meets the fixed point", () => {
    const x = extendedErlangB({ servers: 100, traffic: 150, persistence: 0.999 });
    expect(x.converged).toBe(true);
    expect(relativeError(150 + 0.999 * x.offeredTotal * erlangB(100, x.offeredTotal), x.offeredTotal)).toBeLessThan(1e-10);
    expect(x.carriedTraffic).toBeLessThan(100);
  });
  it("an iteration cap that is too small is reported as not converged", () => {
    const r = extendedErlangB({ servers: 20, traffic: 25, persistence: 0.9, maxIterations: 3 });
    expect(r.converged).toBe(false);
    expect(r.iterations).toBe(3);
  });
});
