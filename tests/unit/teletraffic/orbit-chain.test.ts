// Retrials on MMPP and batch arrivals (orbit-chain.ts) against computations done here: the same
// chains enumerated state by state with a generous orbit cap and solved densely (dense-chain.ts),
// and the limits that reduce to other exact methods of the library (one phase or batches of one:
// the Poisson retrial model of retrial-chain.ts, a different solver; persistence 0: the MMPP and
// batch chains without retrials).
import { describe, expect, it } from "vitest";
import { analyticOperations, batchLossSystem, batchRetrialSystem, mmppLossSystem, mmppQueueSystem, mmppRetrialSystem, retrialLossSystem, TeletrafficConvergenceError, TeletrafficInputError } from "../../../lib/teletraffic";
import { denseStationary, relativeError } from "./dense-chain";

/**
 * Dense chain on (phase, k, o), o <= cap: MMPP arrivals (batch sizes by `sizes`, each refused call
 * of a batch joining the orbit with probability p independently), written from the model's
 * description, without bands or orderings.
 */
function dense(opts: { servers: number; waiting: number; rates: number[]; switching: number[][]; sizes?: number[]; allOrNothing?: boolean; p: number; theta: number; alpha: number; cap: number }) {
  const { servers: n, waiting, rates, switching, p, theta, alpha, cap } = opts;
  const kMax = n + waiting;
  const phases = rates.length;
  const sizes = opts.sizes ?? [0, 1];
  const id = (e: number, k: number, o: number) => (o * phases + e) * (kMax + 1) + k;
  const states = (cap + 1) * phases * (kMax + 1);
  const t: Array<[number, number, number]> = [];
  const choose = (r: number, j: number) => {
    let c = 1;
    for (let i = 1; i <= j; i++) c = (c * (r - j + i)) / i;
    return c;
  };
  for (let o = 0; o <= cap; o++)
    for (let e = 0; e < phases; e++)
      for (let k = 0; k <= kMax; k++) {
        const s = id(e, k, o);
        for (let e2 = 0; e2 < phases; e2++) if (e2 !== e) t.push([s, id(e2, k, o), switching[e][e2]]);
        sizes.forEach((px, x) => {
          if (x === 0 || px === 0) return;
          const room = kMax - k;
          const admitted = opts.allOrNothing ? (x <= room ? x : 0) : Math.min(x, room);
          const refused = x - admitted;
          for (let j = 0; j <= refused; j++) {
            const pj = choose(refused, j) * p ** j * (1 - p) ** (refused - j);
            t.push([s, id(e, k + admitted, Math.min(cap, o + j)), rates[e] * px * pj]);
          }
        });
        if (k > 0) t.push([s, id(e, k - 1, o), Math.min(k, n) + Math.max(0, k - n) * alpha]);
        if (o > 0) t.push([s, k < kMax ? id(e, k + 1, o - 1) : id(e, k, o - 1), k < kMax ? o * theta : o * theta * (1 - p)]);
      }
  const pi = denseStationary(states, t);
  let fresh = 0;
  let refusedFresh = 0;
  let orbit = 0;
  let queue = 0;
  for (let o = 0; o <= cap; o++)
    for (let e = 0; e < phases; e++)
      for (let k = 0; k <= kMax; k++) {
        const x = pi[id(e, k, o)];
        orbit += o * x;
        queue += Math.max(0, k - n) * x;
        sizes.forEach((px, size) => {
          if (size === 0) return;
          const taken = opts.allOrNothing ? (size <= kMax - k ? size : 0) : Math.min(size, kMax - k);
          fresh += x * rates[e] * px * size;
          refusedFresh += x * rates[e] * px * (size - taken);
        });
      }
  return { firstAttemptBlocking: refusedFresh / fresh, meanOrbit: orbit, meanQueueLength: queue };
}

describe("retrials on MMPP arrivals (exact chain on phase, calls, orbit)", () => {
  it("equals a dense solve of the same chain with a generous orbit cap", () => {
    const rates = [6, 0.5];
    const switching = [[0, 0.8], [1.2, 0]];
    const r = mmppRetrialSystem({ servers: 2, waitingPositions: 1, meanPatience: 2, rates, switching, persistence: 0.6, meanRetryDelay: 0.5 });
    const d = dense({ servers: 2, waiting: 1, rates, switching, p: 0.6, theta: 2, alpha: 0.5, cap: 40 });
    expect(r.neglectedMass).toBeLessThanOrEqual(1e-12);
    // The dense cap of 40 leaves out far less than 1e-12 here (the orbit mass falls by about 3 per level).
    expect(relativeError(r.firstAttemptBlocking, d.firstAttemptBlocking)).toBeLessThan(1e-9);
    expect(relativeError(r.meanOrbit, d.meanOrbit)).toBeLessThan(1e-9);
    expect(relativeError(r.meanQueueLength, d.meanQueueLength)).toBeLessThan(1e-9);
  });
  it("one phase is the Poisson retrial model; persistence 0 is the MMPP chain without retrials", () => {
    const a = mmppRetrialSystem({ servers: 5, rates: [4], switching: [[0]], persistence: 0.7, meanRetryDelay: 0.5 });
    const b = retrialLossSystem({ servers: 5, traffic: 4, persistence: 0.7, meanRetryDelay: 0.5 });
    for (const key of ["firstAttemptBlocking", "lossProbability", "attemptsPerCall", "meanOrbit", "timeCongestion", "carriedTraffic"] as const) expect(relativeError(a[key], b[key]), key).toBeLessThan(1e-11);
    const c = mmppRetrialSystem({ servers: 5, waitingPositions: 2, rates: [8, 1], switching: [[0, 1], [2, 0]], persistence: 0, meanRetryDelay: 1 });
    const q = mmppQueueSystem({ servers: 5, waitingPositions: 2, rates: [8, 1], switching: [[0, 1], [2, 0]] });
    expect(relativeError(c.firstAttemptBlocking, q.callCongestion)).toBeLessThan(1e-12);
    expect(relativeError(c.meanWait, q.meanWait)).toBeLessThan(1e-12);
    const l = mmppLossSystem({ servers: 4, rates: [8, 1], switching: [[0, 1], [2, 0]] });
    expect(relativeError(mmppRetrialSystem({ servers: 4, rates: [8, 1], switching: [[0, 1], [2, 0]], persistence: 0, meanRetryDelay: 1 }).timeCongestion, l.timeCongestion)).toBeLessThan(1e-12);
  });
});

describe("retrials on batch arrivals (exact chain on calls and orbit, binomial orbit jumps)", () => {
  it("equals a dense solve of the same chain, partial and all-or-nothing", () => {
    for (const admission of ["partial", "all-or-nothing"] as const) {
      // Sizes 1 or 3 with probabilities 0.6 / 0.4: mean 1.8; batch rate 1.5, so 2.7 erlangs.
      const r = batchRetrialSystem({ servers: 3, traffic: 2.7, batchSize: { law: "empirical", values: [1, 3], probabilities: [0.6, 0.4] }, admission, persistence: 0.5, meanRetryDelay: 0.5 });
      const d = dense({ servers: 3, waiting: 0, rates: [1.5], switching: [[0]], sizes: [0, 0.6, 0, 0.4], allOrNothing: admission === "all-or-nothing", p: 0.5, theta: 2, alpha: 0, cap: 60 });
      expect(relativeError(r.firstAttemptBlocking, d.firstAttemptBlocking), admission).toBeLessThan(1e-9);
      expect(relativeError(r.meanOrbit, d.meanOrbit), admission).toBeLessThan(1e-9);
    }
  });
  it("batches of one are the Poisson retrial model; persistence 0 is the batch chain without retrials", () => {
    const a = batchRetrialSystem({ servers: 5, waitingPositions: 2, meanPatience: 1, traffic: 4, batchSize: { law: "fixed", value: 1 }, admission: "partial", persistence: 0.7, meanRetryDelay: 0.5 });
    const b = retrialLossSystem({ servers: 5, waitingPositions: 2, meanPatience: 1, traffic: 4, persistence: 0.7, meanRetryDelay: 0.5 });
    for (const key of ["firstAttemptBlocking", "lossProbability", "meanWait", "abandonmentProbability", "meanOrbit", "carriedTraffic"] as const) expect(relativeError(a[key], b[key]), key).toBeLessThan(1e-11);
    for (const admission of ["partial", "all-or-nothing"] as const) {
      const g = batchRetrialSystem({ servers: 5, waitingPositions: 1, traffic: 4, batchSize: { law: "geometric", mean: 2 }, admission, persistence: 0, meanRetryDelay: 0.5 });
      const h = batchLossSystem({ servers: 5, waitingPositions: 1, traffic: 4, batchSize: { law: "geometric", mean: 2 }, admission });
      expect(relativeError(g.firstAttemptBlocking, h.callCongestion), admission).toBeLessThan(1e-12);
      expect(relativeError(g.batchCongestion!, h.batchCongestion), admission).toBeLessThan(1e-12);
      expect(relativeError(g.meanWait, h.meanWait), admission).toBeLessThan(1e-12);
    }
  });
  it("are analytic operations with bad input refused by field", () => {
    expect(analyticOperations["mmpp-retrial"].evaluate({ servers: 3, rates: [4, 0], switching: [[0, 1], [1, 0]], persistence: 0.5, meanRetryDelay: 1 }).method).toMatch(/MMPP/);
    expect(analyticOperations["batch-retrial"].evaluate({ servers: 3, traffic: 2, batchSize: { law: "uniform", min: 1, max: 3 }, admission: "partial", persistence: 0.5, meanRetryDelay: 1 }).method).toMatch(/batches/);
    expect(() => mmppRetrialSystem({ servers: 3, rates: [4, 0], switching: [[0, 1]], persistence: 0.5, meanRetryDelay: 1 })).toThrow(/switching/);
    expect(() => batchRetrialSystem({ servers: 3, traffic: 4, batchSize: { law: "fixed", value: 1 }, admission: "partial", persistence: 1, meanRetryDelay: 1 })).toThrow(TeletrafficInputError);
  });
  it("an orbit too large for the banded solve says where it stopped and why", () => {
    // Load 39.8 on 40 servers, persistence 1, retries after 50 holding times: the orbit holds hundreds of calls.
    let caught: unknown;
    try {
      mmppRetrialSystem({ servers: 40, rates: [39.8, 39.8], switching: [[0, 1], [1, 0]], persistence: 1, meanRetryDelay: 50 });
    } catch (error) {
      caught = error;
    }
    expect(caught).toBeInstanceOf(TeletrafficConvergenceError);
    expect((caught as Error).message).toMatch(/at an orbit cap of 512 calls the orbit's law is not yet falling off, and a cap of 1024 needs \d+ band entries, more than 10000000/);
  });
});
