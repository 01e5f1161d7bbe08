// Retrials on renewal arrivals (renewal-retrial.ts, embedded chain at arrivals) against: Poisson
// arrivals as the Poisson retrial model (retrial-chain.ts, a different chain and solver), and
// Erlang-2 arrivals as the continuous-time chain on (arrival phase, calls, orbit) enumerated and
// solved densely here with a generous orbit cap (dense-chain.ts).
import { describe, expect, it } from "vitest";
import { analyticOperations, renewalRetrialSystem, retrialLossSystem } from "../../../lib/teletraffic";
import { denseStationary, relativeError } from "./dense-chain";

/**
 * Phase-type arrivals as the continuous-time chain on (arrival phase, calls, orbit): N servers, no
 * waiting room, unit holding, persistence p, retry rate θ, orbit <= cap. `moves(ph)` lists the phase
 * changes, those that complete an interarrival time marked as arrivals.
 */
function densePhaseType(servers: number, phases: number, moves: (ph: number) => Array<{ to: number; rate: number; arrival: boolean }>, p: number, theta: number, cap: number) {
  const id = (ph: number, k: number, o: number) => (o * phases + ph) * (servers + 1) + k;
  const states = (cap + 1) * phases * (servers + 1);
  const t: Array<[number, number, number]> = [];
  for (let o = 0; o <= cap; o++)
    for (let ph = 0; ph < phases; ph++)
      for (let k = 0; k <= servers; k++) {
        const s = id(ph, k, o);
        for (const { to, rate: r, arrival } of moves(ph)) {
          if (!arrival) t.push([s, id(to, k, o), r]);
          else if (k < servers) t.push([s, id(to, k + 1, o), r]);
          else {
            if (o < cap) t.push([s, id(to, k, o + 1), r * p]);
            t.push([s, id(to, k, o), r * (o < cap ? 1 - p : 1)]);
          }
        }
        if (k > 0) t.push([s, id(ph, k - 1, o), k]);
        if (o > 0) t.push([s, k < servers ? id(ph, k + 1, o - 1) : id(ph, k, o - 1), k < servers ? o * theta : o * theta * (1 - p)]);
      }
  const pi = denseStationary(states, t);
  let arrivals = 0;
  let refused = 0;
  let orbit = 0;
  for (let o = 0; o <= cap; o++)
    for (let ph = 0; ph < phases; ph++)
      for (let k = 0; k <= servers; k++) {
        const x = pi[id(ph, k, o)];
        orbit += o * x;
        const rate = moves(ph).reduce((sum, m) => sum + (m.arrival ? m.rate : 0), 0);
        arrivals += x * rate;
        if (k === servers) refused += x * rate;
      }
  return { firstAttemptBlocking: refused / arrivals, meanOrbit: orbit };
}

/** Erlang-2 arrivals: two phases of rate r, the second completing the interarrival time. */
const denseErlang2 = (servers: number, r: number, p: number, theta: number, cap: number) =>
  densePhaseType(servers, 2, (ph) => [{ to: 1 - ph, rate: r, arrival: ph === 1 }], p, theta, cap);

/** Hyperexponential arrivals, balanced means (Whitt 1982: p₁ = (1 + √((c² − 1)/(c² + 1)))/2, branch means m/(2pᵢ)): the phase is the current branch. */
function denseH2(servers: number, mean: number, scv: number, p: number, theta: number, cap: number) {
  const p1 = (1 + Math.sqrt((scv - 1) / (scv + 1))) / 2;
  const branch = [p1, 1 - p1];
  const rate = branch.map((b) => (2 * b) / mean);
  return densePhaseType(servers, 2, (ph) => branch.map((b, next) => ({ to: next, rate: rate[ph] * b, arrival: true })), p, theta, cap);
}

describe("retrials on renewal arrivals (embedded chain at arrivals on calls and orbit)", () => {
  it("Poisson arrivals give the Poisson retrial model, every measure, with and without a waiting room", () => {
    const a = renewalRetrialSystem({ servers: 3, interarrival: { law: "exponential", mean: 0.5 }, persistence: 0.7, meanRetryDelay: 0.5 });
    const b = retrialLossSystem({ servers: 3, traffic: 2, persistence: 0.7, meanRetryDelay: 0.5 });
    for (const key of ["firstAttemptBlocking", "lossProbability", "attemptsPerCall", "attemptCongestion", "meanOrbit", "timeCongestion", "carriedTraffic"] as const)
      expect(relativeError(a[key], b[key]), key).toBeLessThan(1e-11);
    const c = renewalRetrialSystem({ servers: 2, waitingPositions: 1, meanPatience: 1, interarrival: { law: "exponential", mean: 0.8 }, persistence: 0.6, meanRetryDelay: 0.5 });
    const d = retrialLossSystem({ servers: 2, waitingPositions: 1, meanPatience: 1, traffic: 1.25, persistence: 0.6, meanRetryDelay: 0.5 });
    for (const key of ["firstAttemptBlocking", "lossProbability", "meanWait", "waitingProbability", "abandonmentProbability", "meanOrbit"] as const)
      expect(relativeError(c[key], d[key]), key).toBeLessThan(1e-11);
  });
  it("Erlang-2 arrivals equal the dense (phase, calls, orbit) chain", () => {
    // Mean interarrival 0.5 (two phases of rate 4), 2 servers, persistence 0.6, retry rate 2.
    const r = renewalRetrialSystem({ servers: 2, interarrival: { law: "erlang", k: 2, mean: 0.5 }, persistence: 0.6, meanRetryDelay: 0.5 });
    const d = denseErlang2(2, 4, 0.6, 2, 60);
    expect(r.neglectedMass).toBeLessThan(1e-11);
    expect(relativeError(r.firstAttemptBlocking, d.firstAttemptBlocking)).toBeLessThan(1e-10);
    expect(relativeError(r.meanOrbit, d.meanOrbit)).toBeLessThan(1e-10);
  });
  it("a long-tailed law (hyperexponential, scv 25) against slow retries equals the dense (branch, calls, orbit) chain: the series ends where the group has emptied", () => {
    const law = { law: "hyperexponential", mean: 0.5, scv: 25 } as const;
    const r = renewalRetrialSystem({ servers: 3, interarrival: law, persistence: 0.7, meanRetryDelay: 4 });
    // The series ends where the group has emptied (about 1 900 terms); summing the weights down to 1e-13 took 6 490.
    expect(r.terms).toBeLessThan(4_000);
    const d = denseH2(3, 0.5, 25, 0.7, 0.25, r.orbitCap + 30);
    expect(r.neglectedMass).toBeLessThan(1e-11);
    expect(relativeError(r.firstAttemptBlocking, d.firstAttemptBlocking)).toBeLessThan(1e-9);
    expect(relativeError(r.meanOrbit, d.meanOrbit)).toBeLessThan(1e-9);
  });
  it("is an analytic operation; bad input is refused by field", () => {
    expect(analyticOperations["renewal-retrial"].evaluate({ servers: 2, interarrival: { law: "deterministic", value: 0.5 }, persistence: 0.5, meanRetryDelay: 1 }).method).toMatch(/embedded chain/);
    expect(() => renewalRetrialSystem({ servers: 2, interarrival: { law: "deterministic", value: 0.5 }, persistence: 0.5, meanRetryDelay: 1, meanPatience: 1 })).toThrow(/meanPatience/);
    expect(() => renewalRetrialSystem({ servers: 2, interarrival: { law: "exponential", mean: 0.25 }, persistence: 1, meanRetryDelay: 1 })).toThrow(/persistence/);
  });
});
