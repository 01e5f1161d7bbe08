import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { erlangB, erlangC, finiteQueue } from "../../../lib/teletraffic";
import { bigRatio, denseStationary, relativeError } from "./dense-chain";

/** Exact Erlang C for rational A = p/q (BigInt): C = (A^N/N! · N/(N−A)) / (Σ_{k<N} A^k/k! + A^N/N! · N/(N−A)). */
function exactErlangC(n: number, p: bigint, q: bigint): number {
  // multiply everything by N! q^N (N q − p)
  const N = BigInt(n);
  let head = 0n;
  let falling = N; // N!/k! for k = N−1, N−2, ...
  for (let k = n - 1; k >= 0; k--) {
    head += p ** BigInt(k) * q ** BigInt(n - k) * falling;
    falling *= BigInt(k);
  }
  head *= N * q - p;
  const top = p ** N * N * q;
  return bigRatio(top, head + top);
}

describe("Erlang C", () => {
  it.each([
    [1, 1n, 2n],
    [10, 8n, 1n],
    [24, 20n, 1n],
    [100, 955n, 10n],
  ])("N = %i, A = %i/%i against exact BigInt Erlang C (Erlang 1917, direct sum)", (n, p, q) => {
    const r = erlangC({ servers: n, traffic: Number(p) / Number(q) });
    expect(relativeError(r.waitingProbability, exactErlangC(n, p, q))).toBeLessThan(1e-13);
  });
  it("satisfies C = N B / (N − A (1 − B)) (known relation between Erlang B and C, e.g. Iversen, Teletraffic Engineering, delay chapter)", () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 500 }), fc.double({ min: 0.2, max: 0.99, noNaN: true }), (n, load) => {
        const a = n * load;
        const b = erlangB(n, a);
        return relativeError(erlangC({ servers: n, traffic: a }).waitingProbability, (n * b) / (n - a * (1 - b))) < 1e-12;
      }),
      { seed: 42, numRuns: 200 },
    );
  });
  it("mean wait = ∫ P(W > t) dt with P(W > t) = C e^{−(N−A) t / h} (M/M/N FIFO, Kleinrock, Queueing Systems vol. 1)", () => {
    const r = erlangC({ servers: 10, traffic: 8, meanHolding: 3 });
    // trapezoid rule on P(W > t) from the library's own P(W <= t)
    let integral = 0;
    const dt = 0.001;
    let prev = 1 - erlangC({ servers: 10, traffic: 8, meanHolding: 3, waitLimit: 0 }).probabilityWaitWithinLimit!;
    for (let t = dt; t < 40; t += dt) {
      const cur = 1 - erlangC({ servers: 10, traffic: 8, meanHolding: 3, waitLimit: t }).probabilityWaitWithinLimit!;
      integral += 0.5 * (prev + cur) * dt;
      prev = cur;
    }
    expect(relativeError(integral, r.meanWait)).toBeLessThan(1e-6);
    expect(r.meanWaitOfDelayed).toBeCloseTo(3 / 2, 14);
  });
});

describe("M/M/N/N+Q (finite waiting room)", () => {
  const dense = (n: number, a: number, q: number) => {
    const t: Array<[number, number, number]> = [];
    for (let j = 0; j < n + q; j++) t.push([j, j + 1, a]);
    for (let j = 1; j <= n + q; j++) t.push([j, j - 1, Math.min(j, n)]);
    return denseStationary(n + q + 1, t);
  };
  it.each([
    [3, 2.5, 4],
    [5, 7, 6],
    [8, 6, 1],
  ])("N = %i, A = %f, Q = %i against a dense solve of the birth–death generator", (n, a, q) => {
    const p = dense(n, a, q);
    const r = finiteQueue({ servers: n, traffic: a, waitingPositions: q, meanHolding: 2 });
    const waiting = p.slice(n, n + q).reduce((s, v) => s + v, 0);
    const lq = p.reduce((s, v, j) => s + Math.max(0, j - n) * v, 0);
    const allBusy = p.slice(n).reduce((s, v) => s + v, 0);
    expect(relativeError(r.fullCongestion, p[n + q])).toBeLessThan(1e-12);
    expect(relativeError(r.timeCongestion, allBusy)).toBeLessThan(1e-12);
    // waiting probability over admitted calls (the simulation's denominator): P(N <= k < N + Q) / (1 − p_{N+Q})
    expect(relativeError(r.waitingProbability, waiting / (1 - p[n + q]))).toBeLessThan(1e-12);
    expect(relativeError(r.meanQueueLength, lq)).toBeLessThan(1e-12);
    // Little's law on admitted calls, in units of the holding time (here h = 2)
    expect(relativeError(r.meanWait, (2 * lq) / (a * (1 - p[n + q])))).toBeLessThan(1e-12);
  });
  it("Q = 0 is Erlang B; Q → ∞ with A < N tends to Erlang C (definitions)", () => {
    const zero = finiteQueue({ servers: 10, traffic: 8, waitingPositions: 0 });
    expect(zero.timeCongestion).toBe(erlangB(10, 8));
    expect(zero.fullCongestion).toBe(erlangB(10, 8));
    expect(zero.waitingProbability).toBe(0);
    const big = finiteQueue({ servers: 10, traffic: 8, waitingPositions: 5000 });
    const c = erlangC({ servers: 10, traffic: 8 });
    expect(relativeError(big.waitingProbability, c.waitingProbability)).toBeLessThan(1e-12);
    expect(relativeError(big.meanWait, c.meanWait)).toBeLessThan(1e-12);
  });
  it("overload with a long queue does not overflow: A = 2N, Q = 100 000", () => {
    const r = finiteQueue({ servers: 50, traffic: 100, waitingPositions: 100_000 });
    // in deep overload nearly half the offered calls are lost (carried ≈ N)
    expect(r.carriedTraffic).toBeCloseTo(50, 9);
    expect(r.fullCongestion).toBeCloseTo(0.5, 9);
  });
});
