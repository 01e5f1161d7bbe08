// Retrials on overflow traffic (orbit-chain.ts with the primary groups as the phase process)
// against computations done here: the same chain enumerated state by state from the model's
// description (busy servers per primary, calls at the final group, calls in orbit) and solved
// densely (dense-chain.ts), and the limits that reduce to other exact methods of the library
// (persistence 0: the overflow network of overflow-chain.ts, a different solver; one primary group
// without servers: the Poisson retrial model of retrial-chain.ts).
import { describe, expect, it } from "vitest";
import { analyticOperations, overflowLossSystem, overflowRetrialSystem, retrialLossSystem, TeletrafficInputError } from "../../../lib/teletraffic";
import { denseStationary, relativeError } from "./dense-chain";

/** Dense chain, two primary groups (a, b busy), final group k = 0..N+Q, orbit o <= cap; rates per unit time with mean holding h. */
function dense(opts: { primaries: [{ traffic: number; servers: number }, { traffic: number; servers: number }]; servers: number; waiting: number; h: number; p: number; theta: number; alpha: number; cap: number }) {
  const { primaries: [g1, g2], servers: n, waiting, h, p, theta, alpha, cap } = opts;
  const kMax = n + waiting;
  const id = (a: number, b: number, k: number, o: number) => (((o * (g2.servers + 1) + b) * (g1.servers + 1) + a) * (kMax + 1)) + k;
  const states = (cap + 1) * (g1.servers + 1) * (g2.servers + 1) * (kMax + 1);
  const t: Array<[number, number, number]> = [];
  for (let o = 0; o <= cap; o++)
    for (let b = 0; b <= g2.servers; b++)
      for (let a = 0; a <= g1.servers; a++)
        for (let k = 0; k <= kMax; k++) {
          const s = id(a, b, k, o);
          // A call to a primary takes a server there if one is free, else overflows to the final group.
          const overflowRate = (a === g1.servers ? g1.traffic / h : 0) + (b === g2.servers ? g2.traffic / h : 0);
          if (a < g1.servers) t.push([s, id(a + 1, b, k, o), g1.traffic / h]);
          if (b < g2.servers) t.push([s, id(a, b + 1, k, o), g2.traffic / h]);
          if (a > 0) t.push([s, id(a - 1, b, k, o), a / h]);
          if (b > 0) t.push([s, id(a, b - 1, k, o), b / h]);
          if (k < kMax) t.push([s, id(a, b, k + 1, o), overflowRate]);
          else if (o < cap) t.push([s, id(a, b, k, o + 1), overflowRate * p]);
          if (k > 0) t.push([s, id(a, b, k - 1, o), Math.min(k, n) / h + Math.max(0, k - n) * alpha]);
          if (o > 0) t.push([s, k < kMax ? id(a, b, k + 1, o - 1) : id(a, b, k, o - 1), k < kMax ? o * theta : o * theta * (1 - p)]);
        }
  const pi = denseStationary(states, t);
  let fresh = 0;
  let refusedFresh = 0;
  let retries = 0;
  let orbit = 0;
  let queue = 0;
  for (let o = 0; o <= cap; o++)
    for (let b = 0; b <= g2.servers; b++)
      for (let a = 0; a <= g1.servers; a++)
        for (let k = 0; k <= kMax; k++) {
          const x = pi[id(a, b, k, o)];
          const overflowRate = (a === g1.servers ? g1.traffic / h : 0) + (b === g2.servers ? g2.traffic / h : 0);
          fresh += x * overflowRate;
          if (k === kMax) refusedFresh += x * overflowRate;
          retries += x * o * theta;
          orbit += o * x;
          queue += Math.max(0, k - n) * x;
        }
  return { firstAttemptBlocking: refusedFresh / fresh, attemptsPerCall: (fresh + retries) / fresh, meanOrbit: orbit, meanQueueLength: queue, overflowTraffic: fresh * h };
}

describe("retrials on overflow traffic (exact chain on primary states, calls at the final group, orbit)", () => {
  it("equals a dense solve of the same chain with a generous orbit cap", () => {
    const primaries: [{ traffic: number; servers: number }, { traffic: number; servers: number }] = [
      { traffic: 1.5, servers: 1 },
      { traffic: 2, servers: 2 },
    ];
    // Mean holding 2, retry delay 0.5 (θ = 2), patience 1.5 (α = 2/3).
    const r = overflowRetrialSystem({ primaries, servers: 2, waitingPositions: 1, meanPatience: 1.5, meanHolding: 2, persistence: 0.6, meanRetryDelay: 0.5 });
    const d = dense({ primaries, servers: 2, waiting: 1, h: 2, p: 0.6, theta: 2, alpha: 1 / 1.5, cap: 30 });
    expect(r.neglectedMass).toBeLessThanOrEqual(1e-12);
    // The library's own cap and estimate say how fast the orbit mass falls: its cap (32) leaves out
    // less than 1e-12, and the dense cap of 30 two levels fewer, far below the 1e-9 compared here.
    expect(r.orbitCap).toBeLessThanOrEqual(32);
    for (const key of ["firstAttemptBlocking", "attemptsPerCall", "meanOrbit", "meanQueueLength"] as const) expect(relativeError(r[key], d[key]), key).toBeLessThan(1e-9);
    expect(relativeError(r.offeredTraffic, d.overflowTraffic)).toBeLessThan(1e-9);
  });

  it("persistence 0 is the overflow network without retrials (loss and waiting room)", () => {
    const primaries = [
      { traffic: 3, servers: 3 },
      { traffic: 1.2, servers: 1 },
      { traffic: 0.7, servers: 0 },
    ];
    const a = overflowRetrialSystem({ primaries, servers: 4, persistence: 0, meanRetryDelay: 1 });
    const b = overflowLossSystem({ primaries, servers: 4 });
    expect(relativeError(a.firstAttemptBlocking, b.blocking)).toBeLessThan(1e-12);
    expect(relativeError(a.lossProbability, b.blocking)).toBeLessThan(1e-12);
    expect(relativeError(a.timeCongestion, b.timeCongestion)).toBeLessThan(1e-12);
    expect(relativeError(a.offeredTraffic, b.overflowOffered)).toBeLessThan(1e-12);
    // With a waiting room and patience, both in the same time unit (meanHolding 3).
    const c = overflowRetrialSystem({ primaries, servers: 3, waitingPositions: 2, meanHolding: 3, meanPatience: 1.5, persistence: 0, meanRetryDelay: 1 });
    const w = overflowLossSystem({ primaries, servers: 3, waitingPositions: 2, meanHolding: 3, meanPatience: 1.5 }).waiting!;
    expect(relativeError(c.lossProbability, w.lossProbability)).toBeLessThan(1e-12);
    expect(relativeError(c.waitingProbability, w.waitingProbability)).toBeLessThan(1e-12);
    expect(relativeError(c.abandonmentProbability, w.abandonmentProbability)).toBeLessThan(1e-12);
    expect(relativeError(c.meanWait, w.meanWait)).toBeLessThan(1e-12);
  });

  it("one primary group without servers is the Poisson retrial model", () => {
    const a = overflowRetrialSystem({ primaries: [{ traffic: 4, servers: 0 }], servers: 5, waitingPositions: 1, meanPatience: 2, persistence: 0.7, meanRetryDelay: 0.5 });
    const b = retrialLossSystem({ servers: 5, waitingPositions: 1, meanPatience: 2, traffic: 4, persistence: 0.7, meanRetryDelay: 0.5 });
    for (const key of ["firstAttemptBlocking", "lossProbability", "attemptsPerCall", "meanOrbit", "timeCongestion", "carriedTraffic", "meanWait"] as const)
      expect(relativeError(a[key], b[key]), key).toBeLessThan(1e-11);
  });

  it("refuses an unstable orbit and a chain beyond the band limit, naming the field; is offered as an analytic operation", () => {
    // Overflow of 10 E on 2 servers is 10 B(2, 10) ≈ 8.2 E, above the 5 final servers.
    expect(() => overflowRetrialSystem({ primaries: [{ traffic: 10, servers: 2 }], servers: 5, persistence: 1, meanRetryDelay: 1 })).toThrow(/persistence/);
    let error: unknown;
    try {
      overflowRetrialSystem({ primaries: [{ traffic: 10, servers: 30 }, { traffic: 10, servers: 30 }], servers: 20, persistence: 0.5, meanRetryDelay: 1 });
    } catch (e) {
      error = e;
    }
    expect(error).toBeInstanceOf(TeletrafficInputError);
    expect(String((error as Error).message)).toMatch(/servers/);
    const op = analyticOperations["overflow-retrial"];
    const out = op.evaluate({ primaries: [{ traffic: 2, servers: 2 }], servers: 3, persistence: 0.5, meanRetryDelay: 1 });
    expect(out.firstAttemptBlocking).toBeGreaterThan(0);
    expect(out.large).toBe(false);
  });
});
