// GI/M/N/N+Q by the embedded chain at arrivals (renewal-queue.ts) against computations done here or
// by other methods: with no waiting room the Palm–Takács formula (renewal.ts, a different formula on
// the Laplace–Stieltjes transform); Poisson arrivals the M/M/N/N+Q chain with patience
// (markov-systems.ts); Erlang-k and hyperexponential arrivals the continuous-time chain on
// (arrival phase, calls) enumerated and solved densely here (dense-chain.ts).
import { describe, expect, it } from "vitest";
import { analyticOperations, type InterarrivalLaw, patienceQueue, renewalLossSystem, renewalQueueSystem, TeletrafficInputError } from "../../../lib/teletraffic";
import { denseStationary, relativeError } from "./dense-chain";

/**
 * Phase-type arrivals as a CTMC: an arrival starts phase i with probability start[i]; phase i moves
 * to i + 1 (or completes, last phase of an Erlang) at rate rates[i]; `chain` false makes every phase
 * complete at once (a hyperexponential). States (phase, calls 0..K).
 */
function densePhaseType(servers: number, waiting: number, start: number[], rates: number[], chain: boolean, alpha: number) {
  const kMax = servers + waiting;
  const phases = rates.length;
  const id = (ph: number, k: number) => ph * (kMax + 1) + k;
  const t: Array<[number, number, number]> = [];
  for (let ph = 0; ph < phases; ph++)
    for (let k = 0; k <= kMax; k++) {
      if (k > 0) t.push([id(ph, k), id(ph, k - 1), Math.min(k, servers) + Math.max(0, k - servers) * alpha]);
      if (chain && ph + 1 < phases) {
        t.push([id(ph, k), id(ph + 1, k), rates[ph]]);
        continue;
      }
      // completion: an arrival (admitted if k < K), the next interarrival starts in phase j
      start.forEach((pj, j) => t.push([id(ph, k), id(j, Math.min(k + 1, kMax)), rates[ph] * pj]));
    }
  const pi = denseStationary(phases * (kMax + 1), t);
  let arrivals = 0;
  let refused = 0;
  let allBusy = 0;
  let queue = 0;
  for (let ph = 0; ph < phases; ph++)
    for (let k = 0; k <= kMax; k++) {
      const x = pi[id(ph, k)];
      if (k >= servers) allBusy += x;
      queue += Math.max(0, k - servers) * x;
      if (chain && ph + 1 < phases) continue;
      arrivals += x * rates[ph];
      if (k === kMax) refused += x * rates[ph];
    }
  return { callCongestion: refused / arrivals, timeCongestion: allBusy, meanWait: queue / (arrivals - refused) };
}

describe("GI/M/N/N+Q embedded chain at arrivals", () => {
  it("with no waiting room equals Palm–Takács for every law with an accurate transform", () => {
    const laws: InterarrivalLaw[] = [
      { law: "exponential", mean: 0.2 },
      { law: "erlang", k: 3, mean: 0.2 },
      { law: "gamma", mean: 0.2, cv: 1.7 },
      { law: "hyperexponential", mean: 0.2, scv: 4 },
      { law: "deterministic", value: 0.2 },
      { law: "uniform", min: 0.05, max: 0.35 },
      { law: "empirical", samples: [0.1, 0.2, 0.3, 0.05, 0.35] },
      { law: "lognormal", mean: 0.2, cv: 1.8 },
      { law: "weibull", mean: 0.2, cv: 0.6 },
    ];
    for (const law of laws) {
      const q = renewalQueueSystem({ servers: 6, interarrival: law });
      const b = renewalLossSystem({ servers: 6, interarrival: law });
      expect(relativeError(q.callCongestion, b.callCongestion), law.law).toBeLessThan(1e-11);
      expect(relativeError(q.timeCongestion, b.timeCongestion), law.law).toBeLessThan(1e-11);
      expect(relativeError(q.carriedTraffic, b.carriedTraffic), law.law).toBeLessThan(1e-11);
    }
    // Pareto too, now that the shared trapezoid rule halves its step until it settles (they agreed to only 4e-8 before)
    const pareto = { law: "pareto", mean: 0.2, shape: 2.5 } as const;
    expect(relativeError(renewalQueueSystem({ servers: 6, interarrival: pareto }).callCongestion, renewalLossSystem({ servers: 6, interarrival: pareto }).callCongestion)).toBeLessThan(1e-11);
  });

  it("Poisson arrivals give the M/M/N/N+Q chain with patience, every measure", () => {
    const e = renewalQueueSystem({ servers: 5, waitingPositions: 3, meanPatience: 2, interarrival: { law: "exponential", mean: 0.2 } });
    const p = patienceQueue({ servers: 5, traffic: 5, waitingPositions: 3, meanPatience: 2 });
    expect(relativeError(e.callCongestion, p.firstAttemptBlocking)).toBeLessThan(1e-11);
    for (const key of ["timeCongestion", "waitingProbability", "meanWait", "abandonmentProbability", "lossProbability", "carriedTraffic", "meanQueueLength"] as const)
      expect(relativeError(e[key], p[key]), key).toBeLessThan(1e-11);
  });

  it("Erlang-3 and hyperexponential arrivals equal the dense (phase, calls) chain", () => {
    // Erlang-3 with mean 0.25: three phases of rate 12 in series.
    const erlang = renewalQueueSystem({ servers: 3, waitingPositions: 2, interarrival: { law: "erlang", k: 3, mean: 0.25 } });
    const dErlang = densePhaseType(3, 2, [1, 0, 0], [12, 12, 12], true, 0);
    // Two exponential branches, means 0.1 and 0.7 with probabilities 0.75 / 0.25 (mean 0.25), patience 1.
    const hyper = renewalQueueSystem({ servers: 3, waitingPositions: 2, meanPatience: 1, interarrival: { law: "hyperexponential", probabilities: [0.75, 0.25], means: [0.1, 0.7] } });
    const dHyper = densePhaseType(3, 2, [0.75, 0.25], [10, 1 / 0.7], false, 1);
    for (const [r, d] of [[erlang, dErlang], [hyper, dHyper]] as const) {
      expect(relativeError(r.callCongestion, d.callCongestion)).toBeLessThan(1e-10);
      expect(relativeError(r.timeCongestion, d.timeCongestion)).toBeLessThan(1e-10);
      expect(relativeError(r.meanWait, d.meanWait)).toBeLessThan(1e-10);
    }
  });

  it("is an analytic operation with bad input refused by field", () => {
    const out = analyticOperations["renewal-queue"].evaluate({ servers: 4, waitingPositions: 2, interarrival: { law: "deterministic", value: 0.3 } });
    expect(out.method).toMatch(/embedded chain/);
    expect(() => renewalQueueSystem({ servers: 4, waitingPositions: 0, meanPatience: 1, interarrival: { law: "deterministic", value: 0.3 } })).toThrow(/meanPatience/);
    expect(() => renewalQueueSystem({ servers: 0, interarrival: { law: "deterministic", value: 0.3 } })).toThrow(TeletrafficInputError);
  });
});
