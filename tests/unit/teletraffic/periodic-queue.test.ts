// The exact periodic M(t)/M/N/N+Q (+M) solution (periodic-loss.ts, periodicQueueSystem) against
// computations done here: a dense matrix exponential of the same forward equations built
// separately (dense-chain.ts), the stationary M/M/N/N+Q chain for a constant profile (solved by
// level reduction in markov-systems.ts, a different method), and the loss system on N + Q servers
// when patience equals the holding time.
import { describe, expect, it } from "vitest";
import { analyticOperations, patienceQueue, periodicLossSystem, periodicQueueSystem, periodicRetrialSystem, TeletrafficInputError } from "../../../lib/teletraffic";
import { densePeriodic, relativeError } from "./dense-chain";

type Profile = Array<{ duration: number; rate: number }>;

/** The same chain written out state by state: calls 0..N+Q, arrivals below N+Q, departures min(k,N)/h + (k−N)⁺ α. */
function dense(servers: number, waiting: number, profile: Profile, meanHolding: number, alpha: number) {
  const k = servers + waiting;
  const { occupations } = densePeriodic(
    profile.map(({ duration, rate }) => {
      const t: Array<[number, number, number]> = [];
      for (let j = 0; j <= k; j++) {
        if (j < k) t.push([j, j + 1, rate]);
        if (j > 0) t.push([j, j - 1, Math.min(j, servers) / meanHolding + Math.max(0, j - servers) * alpha]);
      }
      return { duration, transitions: t };
    }),
    k + 1,
  );
  let offered = 0;
  let refused = 0;
  let admitted = 0;
  let waited = 0;
  let queue = 0;
  let busy = 0;
  const segments = profile.map(({ duration, rate }, s) => {
    const occ = occupations[s];
    const allBusy = occ.slice(servers).reduce((a, b) => a + b, 0);
    offered += rate * duration;
    refused += rate * occ[k];
    admitted += rate * (duration - occ[k]);
    waited += rate * (allBusy - occ[k]);
    occ.forEach((x, j) => {
      queue += Math.max(0, j - servers) * x;
      busy += Math.min(j, servers) * x;
    });
    return { call: occ[k] / duration, time: allBusy / duration };
  });
  const cycle = profile.reduce((a, p) => a + p.duration, 0);
  return { segments, call: refused / offered, waiting: waited / admitted, meanWait: queue / admitted, abandonment: (alpha * queue) / admitted, loss: (refused + alpha * queue) / offered, carried: busy / cycle };
}

describe("exact periodic M(t)/M/N/N+Q with exponential patience (forward equations)", () => {
  it("equals the dense matrix exponential of the same chain, with and without patience, also when a segment overloads the room", () => {
    const cases: Array<{ servers: number; waitingPositions: number; profile: Profile; meanHolding: number; meanPatience?: number }> = [
      { servers: 3, waitingPositions: 2, profile: [{ duration: 1.5, rate: 2 }, { duration: 0.5, rate: 9 }, { duration: 1, rate: 0 }], meanHolding: 1, meanPatience: 1 / 0.7 },
      { servers: 2, waitingPositions: 3, profile: [{ duration: 0.3, rate: 1 }, { duration: 0.2, rate: 6 }], meanHolding: 0.8 },
      { servers: 1, waitingPositions: 1, profile: [{ duration: 2, rate: 0.5 }, { duration: 3, rate: 3 }], meanHolding: 2, meanPatience: 0.5 },
      // λ = 8 against N μ = 2 for a while: the weighted distance grows there, and the bound says so.
      { servers: 2, waitingPositions: 4, profile: [{ duration: 1, rate: 8 }, { duration: 2, rate: 0.5 }], meanHolding: 1 },
    ];
    for (const c of cases) {
      const r = periodicQueueSystem(c);
      const d = dense(c.servers, c.waitingPositions, c.profile, c.meanHolding, c.meanPatience ? 1 / c.meanPatience : 0);
      const label = JSON.stringify(c);
      // The library's bound plus the dense method's rounding (about 1e-14 here); ratios divide by an admitted share >= 0.3.
      expect(r.errorBound, label).toBeLessThan(1e-9);
      const allowed = 4 * r.errorBound + 1e-12;
      r.segments.forEach((s, i) => {
        expect(Math.abs(s.callCongestion - d.segments[i].call), label).toBeLessThan(allowed);
        expect(Math.abs(s.timeCongestion - d.segments[i].time), label).toBeLessThan(allowed);
      });
      expect(Math.abs(r.callCongestion - d.call), label).toBeLessThan(allowed);
      expect(Math.abs(r.waitingProbability - d.waiting), label).toBeLessThan(allowed);
      expect(Math.abs(r.meanWait - d.meanWait), label).toBeLessThan(allowed * 10);
      expect(Math.abs(r.abandonmentProbability - d.abandonment), label).toBeLessThan(allowed * 10);
      expect(Math.abs(r.lossProbability - d.loss), label).toBeLessThan(allowed * 10);
      expect(Math.abs(r.carriedTraffic - d.carried), label).toBeLessThan(allowed * 10);
    }
  });

  it("a large room overloaded most of the cycle without patience: where the contraction bound stays loose the bracketed solution answers, and the two agree within their bounds", () => {
    // Q = 400: the geometric weights span so many orders that the contraction bound stalls near 3e-4.
    const wide = periodicQueueSystem({ servers: 2, waitingPositions: 400, profile: [{ duration: 10, rate: 3 }, { duration: 2, rate: 0.5 }] });
    expect(wide.method).toMatch(/bracketed/);
    // absolute over a mean queue of about 400 calls, i.e. about 1e-10 relative (the contraction bound stalled at 3e-4)
    expect(wide.errorBound).toBeLessThan(1e-7);
    // Q = 120: both methods reach a tight bound (1.9e-9 by contraction); the bracketed one, asked directly, must agree.
    const c = { servers: 1, waitingPositions: 120, profile: [{ duration: 3, rate: 3 }, { duration: 1, rate: 0.2 }] };
    const byContraction = periodicQueueSystem(c);
    expect(byContraction.method).not.toMatch(/bracketed/);
    const byBracket = periodicRetrialSystem({ ...c, persistence: 0, meanRetryDelay: 1, tolerance: 1e-10 });
    const allowed = byContraction.errorBound + byBracket.errorBound;
    expect(Math.abs(byContraction.callCongestion - byBracket.firstAttemptBlocking)).toBeLessThan(allowed);
    expect(Math.abs(byContraction.timeCongestion - byBracket.timeCongestion)).toBeLessThan(allowed);
    byContraction.segments.forEach((g, i) => expect(Math.abs(g.callCongestion - byBracket.segments[i].firstAttemptBlocking)).toBeLessThan(allowed));
    expect(Math.abs(byContraction.meanQueueLength - byBracket.meanQueueLength) / byBracket.meanQueueLength).toBeLessThan(10 * allowed);
  });

  it("a constant profile is the stationary M/M/N/N+Q with patience (level reduction in markov-systems.ts)", () => {
    const r = periodicQueueSystem({ servers: 6, waitingPositions: 4, meanPatience: 2, profile: [{ duration: 0.7, rate: 5.5 }, { duration: 2.3, rate: 5.5 }] });
    const s = patienceQueue({ servers: 6, traffic: 5.5, waitingPositions: 4, meanPatience: 2 });
    expect(relativeError(r.callCongestion, s.firstAttemptBlocking)).toBeLessThan(1e-10);
    expect(relativeError(r.timeCongestion, s.timeCongestion)).toBeLessThan(1e-10);
    expect(relativeError(r.waitingProbability, s.waitingProbability)).toBeLessThan(1e-10);
    expect(relativeError(r.meanWait, s.meanWait)).toBeLessThan(1e-10);
    expect(relativeError(r.abandonmentProbability, s.abandonmentProbability)).toBeLessThan(1e-10);
    expect(relativeError(r.lossProbability, s.lossProbability)).toBeLessThan(1e-10);
    expect(relativeError(r.carriedTraffic, s.carriedTraffic)).toBeLessThan(1e-10);
  });

  it("patience equal to the holding time makes every call leave at rate μ: the loss system on N + Q servers, exactly", () => {
    // Departures min(k, N) μ + (k − N)⁺ μ = k μ: the same birth–death chain as M(t)/M/K/K with K = N + Q.
    const profile = [{ duration: 1, rate: 3 }, { duration: 2, rate: 9 }, { duration: 0.4, rate: 0 }];
    const loss = periodicLossSystem({ servers: 7, profile, meanHolding: 0.6 });
    const r = periodicQueueSystem({ servers: 5, waitingPositions: 2, profile, meanHolding: 0.6, meanPatience: 0.6 });
    const allowed = r.errorBound + loss.errorBound + 1e-13;
    expect(Math.abs(r.callCongestion - loss.callCongestion)).toBeLessThan(allowed);
    r.segments.forEach((s, i) => expect(Math.abs(s.callCongestion - loss.segments[i].callCongestion)).toBeLessThan(allowed));
    // Carried traffic on K servers = calls served + calls waiting: the two systems' mean counts agree.
    expect(Math.abs(r.carriedTraffic + r.meanQueueLength - loss.carriedTraffic)).toBeLessThan(10 * allowed);
  });

  it("is an analytic operation with bad input refused by field", () => {
    const op = analyticOperations["periodic-queue"];
    const out = op.evaluate({ servers: 3, waitingPositions: 2, profile: [{ duration: 1, rate: 2 }, { duration: 1, rate: 5 }], meanPatience: 1 });
    expect(out.method).toMatch(/N\+Q with exponential patience periodic/);
    expect(() => op.evaluate({ servers: 3, waitingPositions: 0, profile: [{ duration: 1, rate: 2 }] })).toThrow(TeletrafficInputError);
    expect(() => op.evaluate({ servers: 3, waitingPositions: 2, profile: [{ duration: 1, rate: 2 }], meanPatience: 0 })).toThrow(/meanPatience/);
  });
});
