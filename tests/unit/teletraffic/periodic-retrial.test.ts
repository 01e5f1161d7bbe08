// The exact periodic retrial chain (periodic-retrial.ts) against computations done here: the same
// (calls, orbit) chain written out state by state with its own orbit cap and solved by dense matrix
// exponentials (Van Loan block exponential, dense-chain.ts), with every measure counted from its
// flows directly rather than from the flow-balance identities the library uses; and, for a constant
// profile, the stationary retrial chain solved by level reduction (retrial-chain.ts).
import { describe, expect, it } from "vitest";
import { analyticOperations, periodicRetrialSystem, retrialLossSystem, TeletrafficInputError } from "../../../lib/teletraffic";
import { densePeriodic } from "./dense-chain";

type Profile = Array<{ duration: number; rate: number }>;
interface Case {
  servers: number;
  waitingPositions?: number;
  profile: Profile;
  meanHolding?: number;
  persistence: number;
  meanRetryDelay: number;
  meanPatience?: number;
}

/** The chain with the orbit capped at `cap` (a refused call finding it full is lost), measures from flows. */
function dense(c: Case, cap: number) {
  const n = c.servers;
  const kMax = n + (c.waitingPositions ?? 0);
  const mu = 1 / (c.meanHolding ?? 1);
  const alpha = c.meanPatience ? 1 / c.meanPatience : 0;
  const theta = 1 / c.meanRetryDelay;
  const p = c.persistence;
  const id = (k: number, o: number) => o * (kMax + 1) + k;
  const states = (kMax + 1) * (cap + 1);
  const { occupations } = densePeriodic(
    c.profile.map(({ duration, rate }) => {
      const t: Array<[number, number, number]> = [];
      for (let o = 0; o <= cap; o++)
        for (let k = 0; k <= kMax; k++) {
          const s = id(k, o);
          if (k < kMax) t.push([s, id(k + 1, o), rate]);
          else if (o < cap) t.push([s, id(k, o + 1), rate * p]);
          if (k > 0) t.push([s, id(k - 1, o), Math.min(k, n) * mu + Math.max(0, k - n) * alpha]);
          if (o > 0 && k < kMax) t.push([s, id(k + 1, o - 1), o * theta]);
          if (o > 0 && k === kMax) t.push([s, id(k, o - 1), o * theta * (1 - p)]);
        }
      return { duration, transitions: t };
    }),
    states,
  );
  let fresh = 0;
  let freshRefused = 0;
  let retries = 0;
  let retriesRefused = 0;
  let lost = 0;
  let admitted = 0;
  let toWait = 0;
  let queue = 0;
  let busy = 0;
  let orbit = 0;
  let allBusy = 0;
  const segments = c.profile.map(({ duration, rate }, s) => {
    const occ = occupations[s];
    let full = 0;
    let segmentOrbit = 0;
    let segmentQueue = 0;
    for (let o = 0; o <= cap; o++)
      for (let k = 0; k <= kMax; k++) {
        const x = occ[id(k, o)];
        const attempts = rate * x + o * theta * x;
        fresh += rate * x;
        retries += o * theta * x;
        busy += Math.min(k, n) * x;
        queue += Math.max(0, k - n) * x;
        orbit += o * x;
        segmentOrbit += o * x;
        segmentQueue += Math.max(0, k - n) * x;
        if (k >= n) allBusy += x;
        if (k === kMax) {
          full += x;
          freshRefused += rate * x;
          retriesRefused += o * theta * x;
          lost += (1 - p) * attempts + (o === cap ? p * rate * x : 0);
        } else {
          admitted += attempts;
          if (k >= n) toWait += attempts;
        }
      }
    return { firstAttemptBlocking: full / duration, meanOrbit: segmentOrbit / duration, meanQueueLength: segmentQueue / duration };
  });
  lost += alpha * queue;
  const cycle = c.profile.reduce((a, g) => a + g.duration, 0);
  return {
    segments,
    firstAttemptBlocking: freshRefused / fresh,
    attemptCongestion: (freshRefused + retriesRefused) / (fresh + retries),
    attemptsPerCall: (fresh + retries) / fresh,
    lossProbability: lost / fresh,
    meanOrbit: orbit / cycle,
    carriedTraffic: busy / cycle,
    timeCongestion: allBusy / cycle,
    waitingProbability: admitted > 0 ? toWait / admitted : 0,
    meanWait: admitted > 0 ? queue / admitted : 0,
    abandonmentProbability: admitted > 0 ? (alpha * queue) / admitted : 0,
  };
}

describe("exact retrials under a time-varying load (periodic forward equations, bracketed)", () => {
  it("equals the dense matrix exponential of the same chain, counted from its flows", () => {
    const cases: Case[] = [
      { servers: 2, profile: [{ duration: 1.5, rate: 0.8 }, { duration: 1, rate: 4 }], persistence: 0.6, meanRetryDelay: 0.5 },
      { servers: 2, waitingPositions: 1, meanPatience: 0.8, profile: [{ duration: 1, rate: 3 }, { duration: 2, rate: 0.5 }, { duration: 0.5, rate: 0 }], persistence: 0.7, meanRetryDelay: 1 },
      // persistence 1 with a peak above the servers: no stable dominating chain, the cap comes from the periodic law itself
      { servers: 1, profile: [{ duration: 1, rate: 2.5 }, { duration: 3, rate: 0.2 }], meanHolding: 0.5, persistence: 1, meanRetryDelay: 0.4 },
    ];
    for (const c of cases) {
      const r = periodicRetrialSystem(c);
      const label = JSON.stringify(c);
      expect(r.neglectedMass, label).toBeLessThan(1e-12);
      expect(r.errorBound, label).toBeLessThan(1e-9);
      // The dense chain gets its own, larger cap: a cap too low in the library would show as a difference.
      const d = dense(c, r.orbitCap + 5);
      const allowed = 2 * r.errorBound + 1e-11;
      r.segments.forEach((s, i) => {
        expect(Math.abs(s.firstAttemptBlocking - d.segments[i].firstAttemptBlocking), label).toBeLessThan(allowed);
        expect(Math.abs(s.meanOrbit - d.segments[i].meanOrbit), label).toBeLessThan(allowed * 10);
      });
      for (const key of ["firstAttemptBlocking", "attemptCongestion", "lossProbability", "timeCongestion", "waitingProbability", "abandonmentProbability"] as const)
        expect(Math.abs(r[key] - d[key]), `${label} ${key}`).toBeLessThan(allowed * 10);
      for (const key of ["attemptsPerCall", "meanOrbit", "carriedTraffic", "meanWait"] as const) expect(Math.abs(r[key] - d[key]), `${label} ${key}`).toBeLessThan(allowed * 10 * Math.max(1, d[key]));
    }
  });

  it("a constant profile is the stationary retrial chain (level reduction), also with waiting positions and patience", () => {
    const r = periodicRetrialSystem({ servers: 6, waitingPositions: 2, meanPatience: 1.5, profile: [{ duration: 0.7, rate: 6.5 }, { duration: 1.3, rate: 6.5 }], persistence: 0.85, meanRetryDelay: 0.3 });
    const s = retrialLossSystem({ servers: 6, traffic: 6.5, waitingPositions: 2, meanPatience: 1.5, persistence: 0.85, meanRetryDelay: 0.3 });
    for (const key of ["firstAttemptBlocking", "attemptCongestion", "lossProbability", "timeCongestion", "waitingProbability", "abandonmentProbability"] as const)
      expect(Math.abs(r[key] - s[key]), key).toBeLessThan(1e-9);
    for (const key of ["attemptsPerCall", "meanOrbit", "carriedTraffic", "meanWait", "meanQueueLength"] as const) expect(Math.abs(r[key] - s[key]) / s[key], key).toBeLessThan(1e-9);
  });

  it("persistence 1 without patience loses no call: the orbit cap follows the orbit's build-up inside the cycle, not only at its end", () => {
    // A 12-unit peak at 3 calls per unit on one server (h = 0.5) builds an orbit that drains before the
    // cycle ends; checking the cap's tail only at the end kept a cap of 42 and lost 4.7e-6 of the calls.
    const r = periodicRetrialSystem({ servers: 1, meanHolding: 0.5, persistence: 1, meanRetryDelay: 0.4, profile: [{ duration: 12, rate: 3 }, { duration: 60, rate: 0.05 }] });
    expect(r.lossProbability).toBeLessThan(1e-9);
    expect(r.neglectedMass).toBeLessThan(1e-12);
  });

  it("each segment's mean queue is within the stated bound too (a short segment's interval is wider than the cycle's)", () => {
    const c: Case = { servers: 2, waitingPositions: 5, persistence: 0, meanRetryDelay: 1, profile: [{ duration: 0.02, rate: 9 }, { duration: 4, rate: 1.5 }] };
    const r = periodicRetrialSystem({ ...c, tolerance: 1e-3 });
    const d = dense(c, 0);
    r.segments.forEach((g, i) => expect(Math.abs(g.meanQueueLength - d.segments[i].meanQueueLength)).toBeLessThanOrEqual(r.errorBound * Math.max(1, g.meanQueueLength) + 1e-12));
  });

  it("refuses inputs it cannot answer with a message naming the field", () => {
    const bad = (input: Record<string, unknown>, field: string) => {
      try {
        periodicRetrialSystem(input as never);
        throw new Error("accepted");
      } catch (error) {
        expect(error).toBeInstanceOf(TeletrafficInputError);
        expect((error as TeletrafficInputError).field).toBe(field);
      }
    };
    // persistence 1, no patience, mean traffic (3 × 1 + 1 × 5)/2 = 4 erlangs on 4 servers: the orbit grows without bound
    bad({ servers: 4, profile: [{ duration: 1, rate: 3 }, { duration: 1, rate: 5 }], persistence: 1, meanRetryDelay: 1 }, "profile");
    bad({ servers: 4, profile: [{ duration: 1, rate: 3 }], persistence: 0.5, meanRetryDelay: 1, meanPatience: 2 }, "meanPatience");
    bad({ servers: 4, profile: [{ duration: 1, rate: 3 }], persistence: 1.5, meanRetryDelay: 1 }, "persistence");
    // patience drains the waiting room, not an orbit that never gives up: 3 calls per unit against N/h + Q/patience = 2
    bad({ servers: 1, waitingPositions: 1, meanPatience: 1, persistence: 1, meanRetryDelay: 0.5, profile: [{ duration: 1, rate: 3 }, { duration: 1, rate: 3 }] }, "profile");
    // far too much work for the cycle's length (segments of a millionth of a holding time), refused before any of it
    bad({ servers: 1, persistence: 0.5, meanRetryDelay: 1, profile: [{ duration: 1e-6, rate: 5 }, { duration: 1e-6, rate: 0.1 }] }, "profile");
    // the stationary model has the same limit
    expect(() => retrialLossSystem({ servers: 1, traffic: 3, waitingPositions: 1, meanPatience: 1, persistence: 1, meanRetryDelay: 0.5 })).toThrow(/N \+ Q × holding\/patience/);
    bad({ servers: 4, profile: [{ duration: 1, rate: 0 }], persistence: 0.5, meanRetryDelay: 1 }, "profile");
  });

  it("is offered as the analytic operation periodic-retrial, which validates its input by the same schema", () => {
    const r = analyticOperations["periodic-retrial"].evaluate({ servers: 3, profile: [{ duration: 1, rate: 1 }, { duration: 1, rate: 4 }], persistence: 0.5, meanRetryDelay: 1 });
    expect(r.firstAttemptBlocking).toBeGreaterThan(0);
    expect(() => analyticOperations["periodic-retrial"].evaluate({ servers: 3, profile: [], persistence: 0.5, meanRetryDelay: 1 })).toThrow(TeletrafficInputError);
  });
});
