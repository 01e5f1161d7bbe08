// Overflow traffic with waiting positions at the final group (overflow-chain.ts) against
// computations done here: the network enumerated state by state and solved densely
// (dense-chain.ts), a direct Poisson stream (a primary of 0 servers) as the M/M/N/N+Q chain with
// patience (markov-systems.ts), and patience equal to the holding time as the loss network on N + Q
// servers (every call at the final group then leaves at rate 1).
import { describe, expect, it } from "vitest";
import { overflowLossSystem, patienceQueue } from "../../../lib/teletraffic";
import { denseStationary, relativeError } from "./dense-chain";

/** Two primaries (a_i on n_i) overflowing to N servers + Q waiting positions, unit holding, patience rate α. */
function dense(primaries: Array<{ traffic: number; servers: number }>, n: number, q: number, alpha: number) {
  const [p1, p2] = primaries;
  const kMax = n + q;
  const id = (x: number, y: number, j: number) => (x * (p2.servers + 1) + y) * (kMax + 1) + j;
  const states = (p1.servers + 1) * (p2.servers + 1) * (kMax + 1);
  const t: Array<[number, number, number]> = [];
  for (let x = 0; x <= p1.servers; x++)
    for (let y = 0; y <= p2.servers; y++)
      for (let j = 0; j <= kMax; j++) {
        const s = id(x, y, j);
        if (x < p1.servers) t.push([s, id(x + 1, y, j), p1.traffic]);
        else if (j < kMax) t.push([s, id(x, y, j + 1), p1.traffic]);
        if (y < p2.servers) t.push([s, id(x, y + 1, j), p2.traffic]);
        else if (j < kMax) t.push([s, id(x, y, j + 1), p2.traffic]);
        if (x > 0) t.push([s, id(x - 1, y, j), x]);
        if (y > 0) t.push([s, id(x, y - 1, j), y]);
        if (j > 0) t.push([s, id(x, y, j - 1), Math.min(j, n) + Math.max(0, j - n) * alpha]);
      }
  const pi = denseStationary(states, t);
  let offered = 0;
  let refused = 0;
  let queue = 0;
  for (let x = 0; x <= p1.servers; x++)
    for (let y = 0; y <= p2.servers; y++)
      for (let j = 0; j <= kMax; j++) {
        const v = pi[id(x, y, j)];
        const rate = (x === p1.servers ? p1.traffic : 0) + (y === p2.servers ? p2.traffic : 0);
        offered += v * rate;
        if (j === kMax) refused += v * rate;
        queue += Math.max(0, j - n) * v;
      }
  return { blocking: refused / offered, meanWait: queue / (offered - refused), loss: (refused + alpha * queue) / offered };
}

describe("overflow traffic with waiting positions at the final group", () => {
  it("equals a dense solve of the network, with and without patience", () => {
    const primaries = [{ traffic: 4, servers: 3 }, { traffic: 2, servers: 1 }];
    for (const meanPatience of [undefined, 0.5]) {
      const r = overflowLossSystem({ primaries, servers: 2, waitingPositions: 2, meanPatience });
      const d = dense(primaries, 2, 2, meanPatience ? 1 / meanPatience : 0);
      expect(relativeError(r.blocking, d.blocking)).toBeLessThan(1e-11);
      expect(relativeError(r.waiting!.meanWait, d.meanWait)).toBeLessThan(1e-11);
      expect(relativeError(r.waiting!.lossProbability, d.loss)).toBeLessThan(1e-11);
    }
  });
  it("a direct Poisson stream is the M/M/N/N+Q chain; patience equal to the holding time is the loss network on N + Q servers", () => {
    const poisson = overflowLossSystem({ primaries: [{ traffic: 3.5, servers: 0 }], servers: 4, waitingPositions: 3, meanPatience: 2 });
    const p = patienceQueue({ servers: 4, traffic: 3.5, waitingPositions: 3, meanPatience: 2 });
    expect(relativeError(poisson.blocking, p.firstAttemptBlocking)).toBeLessThan(1e-12);
    expect(relativeError(poisson.waiting!.meanWait, p.meanWait)).toBeLessThan(1e-12);
    expect(relativeError(poisson.waiting!.abandonmentProbability, p.abandonmentProbability)).toBeLessThan(1e-12);
    const primaries = [{ traffic: 5, servers: 4 }, { traffic: 1, servers: 0 }];
    const w = overflowLossSystem({ primaries, servers: 3, waitingPositions: 2, meanPatience: 1 });
    const l = overflowLossSystem({ primaries, servers: 5 });
    expect(relativeError(w.blocking, l.blocking)).toBeLessThan(1e-12);
    expect(w.waiting).toBeDefined();
    expect(l.waiting).toBeUndefined();
  });
  it("beyond the direct solve's size Gauss–Seidel answers with waiting positions too: patience equal to the holding time is still the loss network on N + Q servers", () => {
    // K = 13 × 11 × 9 = 1287 primary states: (N + Q + 1) K³ ≈ 1.3e10 > MAX_OVERFLOW_WORK, so both sides take the iterative path
    const primaries = [{ traffic: 9, servers: 12 }, { traffic: 7, servers: 10 }, { traffic: 5, servers: 8 }];
    const w = overflowLossSystem({ primaries, servers: 3, waitingPositions: 2, meanPatience: 1 });
    const l = overflowLossSystem({ primaries, servers: 5 });
    expect(w.method).toContain("Gauss–Seidel");
    expect(relativeError(w.blocking, l.blocking)).toBeLessThan(1e-9);
    // without patience, refusal lies between the loss system on N + Q servers (waiting calls served
    // at once) and the loss system on N (no waiting room): a sandwich any wrong solve would leave
    const q = overflowLossSystem({ primaries, servers: 3, waitingPositions: 4 });
    expect(q.method).toContain("Gauss–Seidel");
    expect(q.waiting!.abandonmentProbability).toBe(0);
    expect(q.blocking).toBeGreaterThan(overflowLossSystem({ primaries, servers: 7 }).blocking);
    expect(q.blocking).toBeLessThan(overflowLossSystem({ primaries, servers: 3 }).blocking);
  });
});
