import { describe, expect, it } from "vitest";
import {
  batchLossSystem,
  engset,
  engsetServers,
  erlangB,
  erlangC,
  erlangCServers,
  logErlangB,
  minServersForBlocking,
  mmppLossSystem,
  mmppQueueSystem,
  renewalLossSystem,
  streamPeakedness,
  timeVaryingLoss,
  transformOf,
  type BatchSizeLaw,
} from "../../../lib/teletraffic";
import { formatNumber } from "../../../lib/cli/command";
import { denseStationary, relativeError } from "./dense-chain";

/** Batch chain written out state by state: every batch size x from state i, dense solve. */
function denseBatch(n: number, q: number, batchRate: number, pmf: Map<number, number>, allOrNothing: boolean, alpha: number) {
  const cap = n + q;
  const transitions: Array<[number, number, number]> = [];
  for (let i = 0; i <= cap; i++) {
    for (const [x, p] of pmf) {
      const target = allOrNothing ? (i + x <= cap ? i + x : i) : Math.min(cap, i + x);
      if (target !== i) transitions.push([i, target, batchRate * p]);
    }
    if (i > 0) transitions.push([i, i - 1, Math.min(i, n) + Math.max(0, i - n) * alpha]);
  }
  const pi = denseStationary(cap + 1, transitions);
  let mean = 0;
  let refused = 0;
  let queue = 0;
  for (const [x, p] of pmf) mean += x * p;
  for (let i = 0; i <= cap; i++) {
    for (const [x, p] of pmf) refused += pi[i] * p * (allOrNothing ? (i + x > cap ? x : 0) : Math.max(0, i + x - cap));
    queue += Math.max(0, i - n) * pi[i];
  }
  return { callCongestion: refused / mean, timeCongestion: pi.slice(n).reduce((a, b) => a + b, 0), queue };
}

describe("batch arrivals with any batch-size law against a dense solve of the chain", () => {
  const laws: Array<[string, BatchSizeLaw, Map<number, number>]> = [
    ["fixed 3", { law: "fixed", value: 3 }, new Map([[3, 1]])],
    ["uniform 1..4", { law: "uniform", min: 1, max: 4 }, new Map([[1, 0.25], [2, 0.25], [3, 0.25], [4, 0.25]])],
    ["empirical {1: 0.5, 2: 0.2, 5: 0.3}", { law: "empirical", values: [1, 2, 5], probabilities: [0.5, 0.2, 0.3] }, new Map([[1, 0.5], [2, 0.2], [5, 0.3]])],
  ];
  for (const [name, law, pmf] of laws) {
    for (const admission of ["partial", "all-or-nothing"] as const) {
      it(`${name}, ${admission}, with and without a waiting room`, () => {
        const mean = [...pmf].reduce((s, [x, p]) => s + x * p, 0);
        for (const [q, patience] of [[0, undefined], [3, 2]] as const) {
          const r = batchLossSystem({ servers: 6, waitingPositions: q, traffic: 4, batchSize: law, admission, meanPatience: patience });
          const d = denseBatch(6, q, 4 / mean, pmf, admission === "all-or-nothing", patience ? 1 / patience : 0);
          expect(relativeError(r.callCongestion, d.callCongestion)).toBeLessThan(1e-10);
          expect(relativeError(r.timeCongestion, d.timeCongestion)).toBeLessThan(1e-10);
          if (q > 0) expect(relativeError(r.meanQueueLength, d.queue)).toBeLessThan(1e-10);
        }
      });
    }
  }
  it("geometric law through the general entry equals the O(N) recursion; fixed size 1 is Erlang B", () => {
    const g = batchLossSystem({ servers: 8, traffic: 5, batchSize: { law: "geometric", mean: 2 }, admission: "partial" });
    const h = batchLossSystem({ servers: 8, traffic: 5, meanBatchSize: 2, admission: "partial" });
    expect(g.callCongestion).toBe(h.callCongestion);
    const one = batchLossSystem({ servers: 8, traffic: 5, batchSize: { law: "fixed", value: 1 }, admission: "all-or-nothing" });
    expect(relativeError(one.callCongestion, erlangB(8, 5))).toBeLessThan(1e-12);
  });
});

/** Dense MMPP chain with a waiting room: state (k, phase). */
function denseMmpp(n: number, q: number, rates: number[], switching: number[][], alpha: number) {
  const k = rates.length;
  const cap = n + q;
  const id = (j: number, i: number) => j * k + i;
  const t: Array<[number, number, number]> = [];
  for (let j = 0; j <= cap; j++)
    for (let i = 0; i < k; i++) {
      for (let l = 0; l < k; l++) if (l !== i && switching[i][l] > 0) t.push([id(j, i), id(j, l), switching[i][l]]);
      if (j < cap) t.push([id(j, i), id(j + 1, i), rates[i]]);
      if (j > 0) t.push([id(j, i), id(j - 1, i), Math.min(j, n) + Math.max(0, j - n) * alpha]);
    }
  const pi = denseStationary((cap + 1) * k, t);
  let arrivals = 0;
  let refused = 0;
  for (let j = 0; j <= cap; j++)
    for (let i = 0; i < k; i++) {
      arrivals += rates[i] * pi[id(j, i)];
      if (j === cap) refused += rates[i] * pi[id(j, i)];
    }
  return refused / arrivals;
}

describe("MMPP with up to 16 phases (the engine's limit) against a dense solve", () => {
  const k = 16;
  const rates = Array.from({ length: k }, (_, i) => 0.5 + (i % 5) * 1.3);
  // a ring with some chords: irreducible, not reversible
  const switching = Array.from({ length: k }, (_, i) => Array.from({ length: k }, (_, l) => (l === (i + 1) % k ? 0.7 : l === (i + 5) % k ? 0.2 : 0)));
  it("16 phases, loss system", () => {
    const r = mmppLossSystem({ servers: 6, rates, switching });
    expect(relativeError(r.callCongestion, denseMmpp(6, 0, rates, switching, 0))).toBeLessThan(1e-10);
  });
  it("16 phases with 3 waiting positions and patience", () => {
    const r = mmppQueueSystem({ servers: 4, waitingPositions: 3, rates, switching, meanPatience: 0.5 });
    expect(relativeError(r.callCongestion, denseMmpp(4, 3, rates, switching, 2))).toBeLessThan(1e-10);
  });
});

describe("GI/M/N/N for every interarrival law of the scenario file", () => {
  it("Weibull with shape 1 is exponential: Erlang B (numerical transform against the closed form)", () => {
    const r = renewalLossSystem({ servers: 12, interarrival: { law: "weibull", shape: 1, scale: 0.1 } });
    expect(relativeError(r.callCongestion, erlangB(12, 10))).toBeLessThan(1e-11);
  });
  it("lognormal and Pareto transforms against an independent Simpson integration in x", () => {
    // φ(s) = ∫ e^{−sx} f(x) dx by composite Simpson on a log grid (a different quadrature and variable)
    const lognormalDensity = (mean: number, cv: number) => {
      const s2 = Math.log1p(cv * cv);
      const m = Math.log(mean) - s2 / 2;
      return (x: number) => Math.exp(-((Math.log(x) - m) ** 2) / (2 * s2)) / (x * Math.sqrt(2 * Math.PI * s2));
    };
    const paretoDensity = (mean: number, a: number) => {
      const xm = (mean * (a - 1)) / a;
      return (x: number) => (x < xm ? 0 : (a * xm ** a) / x ** (a + 1));
    };
    const simpson = (f: (x: number) => number, s: number, lo: number, hi: number) => {
      const n = 200_000;
      const h = (Math.log(hi) - Math.log(lo)) / n;
      let sum = 0;
      for (let i = 0; i <= n; i++) {
        const u = Math.log(lo) + i * h;
        const x = Math.exp(u);
        const w = i === 0 || i === n ? 1 : i % 2 ? 4 : 2;
        sum += w * Math.exp(-s * x) * f(x) * x;
      }
      return (sum * h) / 3;
    };
    for (const s of [0.3, 2, 9]) {
      const ln = transformOf({ law: "lognormal", mean: 1, cv: 1.5 }).logs(s);
      expect(relativeError(Math.exp(ln.logPhi), simpson(lognormalDensity(1, 1.5), s, 1e-9, 1e4))).toBeLessThan(1e-8);
      // Pareto: the smoothing substitution's integrand falls off a cliff; the step is halved until it settles (1e-8 before that)
      const pa = transformOf({ law: "pareto", mean: 1, shape: 2.5 }).logs(s);
      expect(relativeError(Math.exp(pa.logPhi), simpson(paretoDensity(1, 2.5), s, 0.6, 1e7))).toBeLessThan(1e-11);
      expect(relativeError(Math.exp(ln.logPhi) + Math.exp(ln.logOneMinusPhi), 1)).toBeLessThan(1e-12);
    }
  });
  it("empirical samples all equal and a very narrow uniform law give the deterministic value", () => {
    const d = renewalLossSystem({ servers: 5, interarrival: { law: "deterministic", value: 0.25 } }).callCongestion;
    expect(relativeError(renewalLossSystem({ servers: 5, interarrival: { law: "empirical", samples: [0.25, 0.25, 0.25] } }).callCongestion, d)).toBeLessThan(1e-12);
    expect(relativeError(renewalLossSystem({ servers: 5, interarrival: { law: "uniform", min: 0.25 - 1e-9, max: 0.25 + 1e-9 } }).callCongestion, d)).toBeLessThan(1e-6);
  });
  it("a numerical law's transform is stable under halving the trapezoid step (stated accuracy 1e-12)", () => {
    const r1 = renewalLossSystem({ servers: 20, interarrival: { law: "lognormal", mean: 0.06, cv: 0.8 } });
    const r2 = renewalLossSystem({ servers: 20, interarrival: { law: "gamma", mean: 0.06, cv: 0.8 } });
    // different laws with the same two moments: close but not equal (a sanity check on scale)
    expect(relativeError(r1.callCongestion, r2.callCongestion)).toBeLessThan(0.2);
    expect(r1.transform).toMatch(/numerical/);
  });
});

describe("peakedness of the offered stream", () => {
  it("Poisson renewal stream: Z = 1; deterministic: Z < 1; H2: Z > 1 (Takács's formula)", () => {
    const z = (law: Parameters<typeof renewalLossSystem>[0]["interarrival"]) => streamPeakedness({ stream: { process: "renewal", interarrival: law }, meanHolding: 1 }).peakedness;
    expect(z({ law: "exponential", mean: 0.2 })).toBeCloseTo(1, 12);
    expect(z({ law: "deterministic", value: 0.2 })).toBeLessThan(1);
    expect(z({ law: "hyperexponential", mean: 0.2, scv: 4 })).toBeGreaterThan(1);
  });
  it("Erlang-2 renewal stream: Z against the busy-server variance of a dense chain on a large group", () => {
    // Dense chain of an Erlang-2 arrival stream (2 phases of rate 2λ) on 60 servers with λ = 5:
    // blocking is below 1e-20, so the busy-server moments are the infinite group's.
    const lambda = 5;
    const n = 60;
    const id = (j: number, p: number) => j * 2 + p;
    const t: Array<[number, number, number]> = [];
    for (let j = 0; j <= n; j++) {
      t.push([id(j, 0), id(j, 1), 2 * lambda]);
      t.push([id(j, 1), id(Math.min(n, j + 1), 0), 2 * lambda]);
      if (j > 0) for (const p of [0, 1]) t.push([id(j, p), id(j - 1, p), j]);
    }
    const pi = denseStationary((n + 1) * 2, t);
    let m1 = 0;
    let m2 = 0;
    for (let j = 0; j <= n; j++) {
      const x = pi[id(j, 0)] + pi[id(j, 1)];
      m1 += j * x;
      m2 += j * j * x;
    }
    const r = streamPeakedness({ stream: { process: "renewal", interarrival: { law: "erlang", k: 2, mean: 1 / lambda } }, meanHolding: 1 });
    expect(relativeError(r.mean, m1)).toBeLessThan(1e-10);
    expect(relativeError(r.peakedness, (m2 - m1 * m1) / m1)).toBeLessThan(1e-9);
  });
});

describe("time-varying load: pointwise stationary and modified offered load", () => {
  it("a constant profile gives Erlang B for both", () => {
    const r = timeVaryingLoss({ servers: 10, profile: [{ duration: 3, rate: 8 }, { duration: 2, rate: 8 }] });
    expect(relativeError(r.pointwiseCallCongestion, erlangB(10, 8))).toBeLessThan(1e-13);
    expect(relativeError(r.modifiedLoadCallCongestion, erlangB(10, 8))).toBeLessThan(1e-12);
  });
  it("the modified offered load m(t) equals an RK4 integration of m' = λ(t) − m/h over many cycles", () => {
    const profile = [{ duration: 1.5, rate: 4 }, { duration: 0.5, rate: 14 }, { duration: 1, rate: 0 }];
    const r = timeVaryingLoss({ servers: 8, profile, meanHolding: 0.8 });
    let m = 0;
    const dt = 1e-3;
    for (let cycle = 0; cycle < 40; cycle++)
      for (const s of profile) {
        const f = (x: number) => s.rate - x / 0.8;
        for (let i = 0; i < Math.round(s.duration / dt); i++) {
          const k1 = f(m);
          const k2 = f(m + (dt / 2) * k1);
          const k3 = f(m + (dt / 2) * k2);
          const k4 = f(m + dt * k3);
          m += (dt / 6) * (k1 + 2 * k2 + 2 * k3 + k4);
        }
      }
    expect(relativeError(r.segments[0].loadAtStart, m)).toBeLessThan(1e-9);
  });
  it("with holding times short against the segments, MOL approaches PSA (the quasi-static limit)", () => {
    const r = timeVaryingLoss({ servers: 10, profile: [{ duration: 100, rate: 4 }, { duration: 100, rate: 12 }], meanHolding: 1e-3 });
    expect(relativeError(r.modifiedLoadCallCongestion, r.pointwiseCallCongestion)).toBeLessThan(1e-4);
  });
});

describe("sizing inverses", () => {
  it("Erlang C: the smallest N meets the target and N − 1 does not (checked with erlangC)", () => {
    for (const [measure, target, waitLimit] of [["waiting-probability", 0.2, undefined], ["mean-wait", 0.05, undefined], ["wait-beyond-limit", 0.1, 0.2]] as const) {
      const r = erlangCServers({ traffic: 25, target, measure, waitLimit });
      const value = (n: number) => {
        const c = erlangC({ servers: n, traffic: 25, waitLimit });
        return measure === "waiting-probability" ? c.waitingProbability : measure === "mean-wait" ? c.meanWait : 1 - c.probabilityWaitWithinLimit!;
      };
      expect(value(r.servers)).toBeLessThanOrEqual(target * (1 + 1e-12));
      expect(value(r.servers - 1)).toBeGreaterThan(target);
    }
  });
  it("Engset: the smallest N for time and call congestion (checked with the truncated binomial)", () => {
    for (const measure of ["time", "call"] as const) {
      const r = engsetServers({ sources: 200, idleRate: 0.05, target: 0.01, measure });
      const value = (n: number) => {
        const e = engset({ sources: 200, servers: n, idleRate: 0.05 });
        return measure === "time" ? e.timeCongestion : e.callCongestion;
      };
      expect(value(r.servers)).toBeLessThanOrEqual(0.01);
      expect(value(r.servers - 1)).toBeGreaterThan(0.01);
    }
  });
});

describe("smallest-servers inverse in the deep tail (targets below 1e-280, log-space branch)", () => {
  /** ln B(N, A) = N ln A − ln N! − ln Σ_{k<=N} A^k/k!, summed in log space: independent of the recursion. */
  function logErlangBDirect(n: number, a: number): number {
    let logTerm = 0;
    let max = 0;
    const terms = [0];
    for (let k = 1; k <= n; k++) {
      logTerm += Math.log(a) - Math.log(k);
      terms.push(logTerm);
      max = Math.max(max, logTerm);
    }
    const logSum = max + Math.log(terms.reduce((s, t) => s + Math.exp(t - max), 0));
    return terms[n] - logSum;
  }
  it.each([
    [10, 1e-300],
    [2, 1e-290],
    [50, 1e-305],
  ])("A = %f, target %e: B(N) <= target < B(N − 1), so no server short", (a, target) => {
    const r = minServersForBlocking({ traffic: a, target });
    expect(logErlangBDirect(r.servers, a)).toBeLessThanOrEqual(Math.log(target) + 1e-9);
    expect(logErlangBDirect(r.servers - 1, a)).toBeGreaterThan(Math.log(target));
    expect(Math.abs(logErlangB(r.servers, a) - logErlangBDirect(r.servers, a))).toBeLessThan(1e-9);
  });
});

describe("CLI number formatting keeps every digit it shows, at every magnitude", () => {
  it("parses back to the value within its stated precision from 1e-320 to 1e308, both signs", () => {
    for (let e = -320; e <= 308; e++) {
      for (const mantissa of [1, 1.2345678, 9.87654321, 5]) {
        for (const sign of [1, -1]) {
          const v = sign * mantissa * 10 ** e;
          if (!Number.isFinite(v) || v === 0) continue;
          const text = formatNumber(v);
          const back = Number(text);
          // 8 significant digits (toPrecision) or 7 (toExponential(6)); integers exactly
          const tolerance = Number.isInteger(v) ? 0 : 5e-7;
          expect(Math.abs(back - v) / Math.abs(v), `${v} printed as ${text}`).toBeLessThanOrEqual(tolerance);
        }
      }
    }
  });
  it("an Erlang C mean wait of 12 345 680 prints as 12345680, not 1234568", () => {
    expect(formatNumber(12_345_680)).toBe("12345680");
    expect(formatNumber(12_345_680.4)).toBe("12345680");
    expect(formatNumber(1234.5)).toBe("1234.5");
  });
});
