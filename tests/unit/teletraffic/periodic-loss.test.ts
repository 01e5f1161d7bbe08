// The exact periodic M(t)/M/N/N solution (periodic-loss.ts) against computations done here: Erlang B
// for a constant profile, a dense matrix exponential of the same forward equations, and the two
// known limits (slowly varying load: the pointwise stationary approximation; fast cycling: Erlang B
// at the mean load).
import { describe, expect, it } from "vitest";
import { analyticOperations, erlangB, periodicLossSystem, timeVaryingLoss, TeletrafficInputError } from "../../../lib/teletraffic";
import { denseStationary, expm, multiply, relativeError, zeros, type Matrix } from "./dense-chain";

/**
 * The periodic solution by dense linear algebra, written without the library's structure: each
 * segment's transition matrix e^{Q d} and occupation integral ∫_0^d e^{Qs} ds from one exponential
 * of the block matrix [[Q, I], [0, 0]] (Van Loan, IEEE Trans. Automatic Control 23, 1978), the
 * cycle matrix as their product, its stationary vector by Gaussian elimination.
 */
function denseReference(servers: number, profile: Array<{ duration: number; rate: number }>, meanHolding: number): { segments: number[]; call: number; time: number } {
  const s = servers + 1;
  const blocks = profile.map(({ duration, rate }) => {
    const big = zeros(2 * s);
    for (let k = 0; k <= servers; k++) {
      if (k < servers) big[k][k + 1] = rate;
      if (k > 0) big[k][k - 1] = k / meanHolding;
      big[k][k] = -(k < servers ? rate : 0) - k / meanHolding;
      big[k][s + k] = 1;
    }
    // exp([[Q, I], [0, 0]] d) = [[e^{Qd}, ∫_0^d e^{Qs} ds], [0, I]].
    const e = expm(big.map((row) => row.map((v) => v * duration)));
    return { transition: e.slice(0, s).map((row) => row.slice(0, s)), integral: e.slice(0, s).map((row) => row.slice(s)) };
  });
  let cycle: Matrix = zeros(s).map((row, i) => row.map((_, j) => (i === j ? 1 : 0)));
  for (const b of blocks) cycle = multiply(cycle, b.transition);
  const transitions: Array<[number, number, number]> = [];
  for (let i = 0; i < s; i++) for (let j = 0; j < s; j++) if (i !== j) transitions.push([i, j, cycle[i][j]]);
  let p = denseStationary(s, transitions);
  const segments: number[] = [];
  let blocked = 0;
  let offered = 0;
  let total = 0;
  profile.forEach(({ duration, rate }, index) => {
    const b = blocks[index];
    let busyAll = 0;
    for (let i = 0; i < s; i++) busyAll += p[i] * b.integral[i][servers];
    segments.push(busyAll / duration);
    blocked += rate * busyAll;
    offered += rate * duration;
    total += busyAll;
    p = Array.from({ length: s }, (_, j) => p.reduce((acc, pi, i) => acc + pi * b.transition[i][j], 0));
  });
  const cycleLength = profile.reduce((a, q) => a + q.duration, 0);
  return { segments, call: blocked / offered, time: total / cycleLength };
}

describe("exact periodic M(t)/M/N/N (forward equations)", () => {
  it("a constant profile is Erlang B exactly, in every segment and over the cycle (Erlang 1917)", () => {
    const r = periodicLossSystem({ servers: 10, profile: [{ duration: 0.7, rate: 8 }, { duration: 2.3, rate: 8 }, { duration: 0.05, rate: 8 }] });
    const b = erlangB(10, 8);
    expect(relativeError(r.callCongestion, b)).toBeLessThan(1e-12);
    expect(relativeError(r.timeCongestion, b)).toBeLessThan(1e-12);
    for (const s of r.segments) expect(relativeError(s.callCongestion, b)).toBeLessThan(1e-12);
    // Little's law on the servers: carried = A (1 − B).
    expect(relativeError(r.carriedTraffic, 8 * (1 - b))).toBeLessThan(1e-12);
  });

  it("equals the dense matrix exponential of the same chain (Van Loan block exponential, dense stationary solve)", () => {
    const cases: Array<[number, Array<{ duration: number; rate: number }>, number]> = [
      [4, [{ duration: 1.5, rate: 2 }, { duration: 0.5, rate: 9 }, { duration: 1, rate: 0 }], 0.8],
      [6, [{ duration: 0.3, rate: 1 }, { duration: 0.2, rate: 20 }], 1],
      [1, [{ duration: 2, rate: 0.5 }, { duration: 3, rate: 3 }], 2],
    ];
    for (const [servers, profile, meanHolding] of cases) {
      const r = periodicLossSystem({ servers, profile, meanHolding });
      const dense = denseReference(servers, profile, meanHolding);
      // The library's bound (1e-12 by default) plus the dense method's own rounding (about 1e-14 here).
      const allowed = r.errorBound + 1e-13;
      expect(r.errorBound).toBeLessThanOrEqual(1e-12);
      r.segments.forEach((s, i) => expect(Math.abs(s.timeCongestion - dense.segments[i]), `N=${servers} segment ${i}`).toBeLessThan(allowed));
      expect(Math.abs(r.callCongestion - dense.call)).toBeLessThan(allowed);
      expect(Math.abs(r.timeCongestion - dense.time)).toBeLessThan(allowed);
    }
  });

  it("long segments approach the pointwise stationary approximation, with an error shrinking like h/d (Whitt, Management Science 37, 1991)", () => {
    // N = 10, loads 4 and 12 erlangs alternating; segments of d = 10, 100, 1000 holding times.
    const gaps = [10, 100, 1000].map((d) => {
      const profile = [{ duration: d, rate: 4 }, { duration: d, rate: 12 }];
      const exact = periodicLossSystem({ servers: 10, profile });
      const approx = timeVaryingLoss({ servers: 10, profile });
      // MOL tracks the transient after each change better than PSA (Massey & Whitt, Ann. Appl. Probab. 4, 1994).
      expect(Math.abs(exact.callCongestion - approx.modifiedLoadCallCongestion)).toBeLessThan(Math.abs(exact.callCongestion - approx.pointwiseCallCongestion));
      return Math.abs(exact.callCongestion - approx.pointwiseCallCongestion);
    });
    // The transient after each change lasts a few holding times whatever d is, so its share of the cycle is O(h/d).
    expect(gaps[0] / gaps[1]).toBeGreaterThan(9);
    expect(gaps[0] / gaps[1]).toBeLessThan(11);
    expect(gaps[1] / gaps[2]).toBeGreaterThan(9);
    expect(gaps[1] / gaps[2]).toBeLessThan(11);
    expect(gaps[2] / 0.2278).toBeLessThan(1e-3); // relative to the blocking itself
  });

  it("very fast cycling approaches Erlang B at the mean load (the averaging limit; Massey & Whitt 1994)", () => {
    // Loads 4 and 12 alternating every d holding times: the mean load is 8.
    const gaps = [0.1, 0.01].map((d) => Math.abs(periodicLossSystem({ servers: 10, profile: [{ duration: d, rate: 4 }, { duration: d, rate: 12 }] }).callCongestion - erlangB(10, 8)));
    // The busy count cannot follow changes much faster than the holding time: the deviation falls at least like d.
    expect(gaps[1]).toBeLessThan(gaps[0] / 10);
    expect(gaps[1] / erlangB(10, 8)).toBeLessThan(1e-4);
  });

  it("a zero-rate segment, the flow balance of carried traffic, and the error bound stay consistent", () => {
    const profile = [{ duration: 1, rate: 6 }, { duration: 0.5, rate: 0 }, { duration: 2, rate: 3 }];
    const r = periodicLossSystem({ servers: 5, profile, meanHolding: 0.5 });
    // Carried traffic over the cycle equals offered calls not refused × h (Little's law over a period).
    const offered = profile.reduce((s, p) => s + p.rate * p.duration, 0);
    expect(relativeError(r.carriedTraffic, ((offered * (1 - r.callCongestion)) / 3.5) * 0.5)).toBeLessThan(1e-10);
    // Nothing arrives in the empty segment, so all-busy can only decay from its start value.
    expect(r.segments[1].timeCongestion).toBeLessThan(r.segments[1].blockingAtStart);
    expect(r.errorBound).toBeLessThanOrEqual(r.tolerance);
  });

  it("is an analytic operation with bad input refused by field", () => {
    const op = analyticOperations["periodic-loss"];
    const out = op.evaluate({ servers: 5, profile: [{ duration: 1, rate: 3 }, { duration: 1, rate: 6 }] });
    expect(out.method).toMatch(/periodic/);
    expect(() => op.evaluate({ servers: 5, profile: [{ duration: 1, rate: 0 }] })).toThrow(TeletrafficInputError);
    expect(() => op.evaluate({ servers: 5, profile: [{ duration: 1, rate: 3 }], tolerance: 0 })).toThrow(/tolerance/);
  });
  it("stops at the floor its own numerical error sets, saying how close it got, instead of failing", () => {
    // 20 segments of 10 h on 100 servers: the early-settling error per cycle floors the bound at about
    // 1.2e-12, just above the default tolerance; it used to iterate 130 cycles and throw.
    const profile = Array.from({ length: 20 }, (_, i) => ({ duration: 10, rate: 100 * (0.8 + 0.3 * Math.sin(i / 4)) }));
    const r = periodicLossSystem({ servers: 100, profile });
    expect(r.errorBound).toBeLessThan(1e-11);
    expect(r.cycles).toBeLessThan(130);
    // The same with a looser tolerance meets it outright and agrees within both bounds.
    const loose = periodicLossSystem({ servers: 100, profile, tolerance: 1e-9 });
    expect(Math.abs(loose.callCongestion - r.callCongestion)).toBeLessThan(loose.errorBound + r.errorBound);
  });
});
