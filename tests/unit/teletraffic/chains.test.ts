import { describe, expect, it } from "vitest";
import fc from "fast-check";
import {
  batchPoissonLossSystem,
  balancedHyperexponential,
  erlangB,
  kaufmanRoberts,
  mmppLossSystem,
  renewalLossSystem,
  TeletrafficInputError,
} from "../../../lib/teletraffic";
import { denseStationary, relativeError } from "./dense-chain";

/**
 * Dense CTMC of a phase-type renewal stream on N servers: state (j busy, interarrival phase i).
 * start[i]: phase a new interarrival starts in; move[i][l]: phase changes; exit[i]: rate at which
 * the interarrival ends in phase i (an arrival).
 */
function densePhaseTypeLoss(n: number, start: number[], move: number[][], exit: number[], mu: number) {
  const k = start.length;
  const idx = (j: number, i: number) => j * k + i;
  const t: Array<[number, number, number]> = [];
  for (let j = 0; j <= n; j++) {
    for (let i = 0; i < k; i++) {
      for (let l = 0; l < k; l++) if (move[i][l] > 0) t.push([idx(j, i), idx(j, l), move[i][l]]);
      for (let l = 0; l < k; l++) if (start[l] > 0) t.push([idx(j, i), idx(Math.min(j + 1, n), l), exit[i] * start[l]]);
      if (j > 0) t.push([idx(j, i), idx(j - 1, i), j * mu]);
    }
  }
  const p = denseStationary((n + 1) * k, t);
  let arrivals = 0;
  let blocked = 0;
  let full = 0;
  for (let j = 0; j <= n; j++) for (let i = 0; i < k; i++) {
    arrivals += p[idx(j, i)] * exit[i];
    if (j === n) {
      blocked += p[idx(j, i)] * exit[i];
      full += p[idx(j, i)];
    }
  }
  return { call: blocked / arrivals, time: full };
}

describe("GI/M/N/N by the Palm–Takács formula (Takács 1962, Introduction to the Theory of Queues; Cohen 1957)", () => {
  it("exponential interarrivals give Erlang B, call = time congestion (property)", () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 300 }), fc.double({ min: 0.3, max: 3, noNaN: true }), (n, load) => {
        const a = n * load;
        const r = renewalLossSystem({ servers: n, interarrival: { law: "exponential", mean: 1 / a } });
        const b = erlangB(n, a);
        return relativeError(r.callCongestion, b) < 1e-11 && relativeError(r.timeCongestion, b) < 1e-11;
      }),
      { seed: 42, numRuns: 150 },
    );
  });
  it.each([
    [4, 3, 2.5],
    [6, 2, 5],
    [3, 5, 1.5],
  ])("Erlang-k (N = %i, k = %i, A = %f) against a dense solve of the phase-type chain", (n, k, a) => {
    const rate = k * a; // each phase lasts 1/(k λ), λ = A with unit holding
    const move = Array.from({ length: k }, (_, i) => Array.from({ length: k }, (_, l) => (l === i + 1 ? rate : 0)));
    const exit = Array.from({ length: k }, (_, i) => (i === k - 1 ? rate : 0));
    const start = Array.from({ length: k }, (_, i) => (i === 0 ? 1 : 0));
    const d = densePhaseTypeLoss(n, start, move, exit, 1);
    const r = renewalLossSystem({ servers: n, interarrival: { law: "erlang", k, mean: 1 / a } });
    expect(relativeError(r.callCongestion, d.call)).toBeLessThan(1e-10);
    expect(relativeError(r.timeCongestion, d.time)).toBeLessThan(1e-10);
    // smooth input: arrivals see less congestion than the time average
    expect(r.callCongestion).toBeLessThan(r.timeCongestion);
    // gamma with cv = 1/√k is the same law
    const g = renewalLossSystem({ servers: n, interarrival: { law: "gamma", mean: 1 / a, cv: 1 / Math.sqrt(k) } });
    expect(relativeError(g.callCongestion, r.callCongestion)).toBeLessThan(1e-12);
  });
  it.each([
    [5, 4, 3, 0.5],
    [8, 6, 10, 2],
  ])("hyperexponential (N = %i, A = %f, scv = %f, holding %f) against a dense solve", (n, a, scv, h) => {
    const mean = h / a;
    const { probabilities, means } = balancedHyperexponential(mean, scv);
    const exit = means.map((m) => 1 / m);
    const d = densePhaseTypeLoss(n, probabilities, [[0, 0], [0, 0]], exit, 1 / h);
    const r = renewalLossSystem({ servers: n, interarrival: { law: "hyperexponential", mean, scv }, meanHolding: h });
    expect(relativeError(r.callCongestion, d.call)).toBeLessThan(1e-10);
    expect(relativeError(r.timeCongestion, d.time)).toBeLessThan(1e-10);
    expect(r.callCongestion).toBeGreaterThan(r.timeCongestion); // peaked input
    const explicit = renewalLossSystem({ servers: n, interarrival: { law: "hyperexponential", probabilities, means }, meanHolding: h });
    expect(relativeError(explicit.callCongestion, r.callCongestion)).toBeLessThan(1e-12);
    // balanced-means fit reproduces the requested moments (Whitt 1982)
    const m1 = probabilities[0] * means[0] + probabilities[1] * means[1];
    const m2 = 2 * (probabilities[0] * means[0] ** 2 + probabilities[1] * means[1] ** 2);
    expect(relativeError(m1, mean)).toBeLessThan(1e-14);
    expect(relativeError(m2 / m1 ** 2 - 1, scv)).toBeLessThan(1e-12);
  });
  it("one server: call congestion is φ(μ) for any law (the call is blocked iff the previous one is still held); deterministic gives e^{-d/h}", () => {
    const r = renewalLossSystem({ servers: 1, interarrival: { law: "deterministic", value: 0.7 }, meanHolding: 2 });
    expect(relativeError(r.callCongestion, Math.exp(-0.35))).toBeLessThan(1e-14);
  });
  it("deterministic is the k → ∞ limit of Erlang-k (convergence check at N = 10, A = 8)", () => {
    const d = renewalLossSystem({ servers: 10, interarrival: { law: "deterministic", value: 1 / 8 } }).callCongestion;
    const e1 = Math.abs(renewalLossSystem({ servers: 10, interarrival: { law: "erlang", k: 100, mean: 1 / 8 } }).callCongestion - d);
    const e2 = Math.abs(renewalLossSystem({ servers: 10, interarrival: { law: "erlang", k: 10_000, mean: 1 / 8 } }).callCongestion - d);
    expect(e2).toBeLessThan(e1 / 50);
  });
  it("no overflow in log space for N in the thousands", () => {
    const r = renewalLossSystem({ servers: 5000, interarrival: { law: "hyperexponential", mean: 1 / 4900, scv: 9 } });
    expect(r.callCongestion).toBeGreaterThan(0);
    expect(r.callCongestion).toBeLessThan(1);
    expect(r.timeCongestion).toBeGreaterThan(0);
    expect(r.callCongestion).toBeGreaterThan(erlangB(5000, 4900)); // peaked input is blocked more than Poisson
  });
});

function denseMmpp(n: number, rates: number[], switching: number[][], mu: number) {
  const k = rates.length;
  const idx = (j: number, i: number) => j * k + i;
  const t: Array<[number, number, number]> = [];
  for (let j = 0; j <= n; j++) for (let i = 0; i < k; i++) {
    for (let l = 0; l < k; l++) if (l !== i) t.push([idx(j, i), idx(j, l), switching[i][l]]);
    if (j < n) t.push([idx(j, i), idx(j + 1, i), rates[i]]);
    if (j > 0) t.push([idx(j, i), idx(j - 1, i), j * mu]);
  }
  const p = denseStationary((n + 1) * k, t);
  let time = 0;
  let blocked = 0;
  let arrivals = 0;
  for (let j = 0; j <= n; j++) for (let i = 0; i < k; i++) {
    arrivals += rates[i] * p[idx(j, i)];
    if (j === n) {
      time += p[idx(j, i)];
      blocked += rates[i] * p[idx(j, i)];
    }
  }
  return { time, call: blocked / arrivals };
}

describe("MMPP/M/N/N exact chain (level reduction: Gaver, Jacobs & Latouche 1984)", () => {
  it.each([
    [6, [5, 1], [[0, 0.3], [0.7, 0]], 1],
    [5, [8, 0], [[0, 1], [2, 0]], 0.5],
    [7, [1, 4, 12], [[0, 0.5, 0.1], [0.2, 0, 0.4], [1, 0.3, 0]], 1],
    [4, [3, 0, 6, 2], [[0, 1, 0, 0], [0, 0, 1, 0], [0, 0, 0, 1], [1, 0, 0, 0]], 2],
  ])("N = %i, rates %j against a dense solve of the full generator", (n, rates, switching, h) => {
    const r = mmppLossSystem({ servers: n, rates, switching, meanHolding: h });
    const d = denseMmpp(n, rates, switching, 1 / h);
    expect(relativeError(r.timeCongestion, d.time)).toBeLessThan(1e-10);
    expect(relativeError(r.callCongestion, d.call)).toBeLessThan(1e-10);
  });
  it("equal phase rates give Erlang B (property)", () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 200 }), fc.double({ min: 0.3, max: 3, noNaN: true }), fc.double({ min: 0.01, max: 10, noNaN: true }), (n, load, s) => {
        const a = n * load;
        const r = mmppLossSystem({ servers: n, rates: [a, a, a], switching: [[0, s, 0], [0, 0, 2 * s], [s, s, 0]] });
        const b = erlangB(n, a);
        return relativeError(r.timeCongestion, b) < 1e-9 && relativeError(r.callCongestion, b) < 1e-9;
      }),
      { seed: 42, numRuns: 100 },
    );
  });
  it("equal phase rates at N = 2000 still give Erlang B to 1e-9: levels span e^±1000 yet no digits are lost (stability of the subtraction-free elimination)", () => {
    for (const a of [1500, 1900, 2100]) {
      const r = mmppLossSystem({ servers: 2000, rates: [a, a], switching: [[0, 0.5], [2, 0]] });
      expect(relativeError(r.timeCongestion, erlangB(2000, a))).toBeLessThan(1e-9);
    }
  });
  it("bursty on-off input: arrivals see more congestion than the time average, and more than Erlang B at the same mean", () => {
    const r = mmppLossSystem({ servers: 10, rates: [16, 0], switching: [[0, 1], [1, 0]] });
    expect(r.callCongestion).toBeGreaterThan(1.5 * r.timeCongestion);
    expect(r.callCongestion).toBeGreaterThan(erlangB(10, 8));
    // carried = mean busy (Little)
    expect(relativeError(r.carriedTraffic, r.meanBusy)).toBeLessThan(1e-11);
  });
  it("2 phases, N = 2000: finite, consistent (carried = mean busy)", () => {
    const r = mmppLossSystem({ servers: 2000, rates: [2400, 1600], switching: [[0, 1], [1, 0]] });
    expect(r.timeCongestion).toBeGreaterThan(0);
    expect(r.callCongestion).toBeGreaterThan(r.timeCongestion);
    expect(relativeError(r.carriedTraffic, r.meanBusy)).toBeLessThan(1e-9);
  });
  it("rejects a reducible phase process and oversize chains naming the field", () => {
    const field = (f: () => unknown) => {
      try {
        f();
      } catch (e) {
        return e instanceof TeletrafficInputError ? e.field : "other";
      }
      return "none";
    };
    expect(field(() => mmppLossSystem({ servers: 5, rates: [1, 2], switching: [[0, 1], [0, 0]] }))).toBe("switching");
    expect(field(() => mmppLossSystem({ servers: 5, rates: [1, 2], switching: [[0, 1]] }))).toBe("switching");
    expect(field(() => mmppLossSystem({ servers: 60_000, rates: [1, 2, 3, 4], switching: [[0, 1, 0, 0], [0, 0, 1, 0], [0, 0, 0, 1], [1, 0, 0, 0]] }))).toBe("servers");
  });
});

function denseBatch(n: number, a: number, m: number, rule: "partial" | "all-or-nothing") {
  const q = 1 - 1 / m;
  const lambda = a / m;
  const t: Array<[number, number, number]> = [];
  // batch sizes truncated where the geometric tail is below 1e-18
  const maxK = m === 1 ? 1 : Math.ceil(Math.log(1e-18) / Math.log(q)) + n;
  const pk = (k: number) => (1 - q) * q ** (k - 1);
  let lostCalls = 0;
  const lossByState: number[] = new Array(n + 1).fill(0);
  for (let j = 0; j <= n; j++) {
    if (j > 0) t.push([j, j - 1, j]);
    for (let k = 1; k <= maxK; k++) {
      const fits = j + k <= n;
      const to = fits ? j + k : rule === "partial" ? n : j;
      if (to !== j) t.push([j, to, lambda * pk(k)]);
      if (!fits) lossByState[j] += pk(k) * (rule === "partial" ? j + k - n : k);
    }
  }
  const p = denseStationary(n + 1, t);
  for (let j = 0; j <= n; j++) lostCalls += p[j] * lossByState[j];
  return { time: p[n], call: lostCalls / m };
}

describe("batch Poisson arrivals with geometric batches (exact chain; batch-arrival loss systems, e.g. Iversen, Teletraffic Engineering, multi-dimensional chapter)", () => {
  it.each([
    [6, 4, 2.5, "partial"],
    [6, 4, 2.5, "all-or-nothing"],
    [10, 7, 1.7, "partial"],
    [10, 7, 1.7, "all-or-nothing"],
  ] as const)("N = %i, A = %f, m = %f, %s: against a dense solve with explicit batch jumps", (n, a, m, rule) => {
    const r = batchPoissonLossSystem({ servers: n, traffic: a, meanBatchSize: m, admission: rule });
    const d = denseBatch(n, a, m, rule);
    expect(relativeError(r.timeCongestion, d.time)).toBeLessThan(1e-10);
    expect(relativeError(r.callCongestion, d.call)).toBeLessThan(1e-10);
  });
  it("mean batch size 1 is Erlang B for both rules (property)", () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 500 }), fc.double({ min: 0.3, max: 3, noNaN: true }), (n, load) => {
        const a = n * load;
        const b = erlangB(n, a);
        return (["partial", "all-or-nothing"] as const).every((admission) => {
          const r = batchPoissonLossSystem({ servers: n, traffic: a, meanBatchSize: 1, admission });
          return relativeError(r.timeCongestion, b) < 1e-11 && relativeError(r.callCongestion, b) < 1e-11;
        });
      }),
      { seed: 42, numRuns: 100 },
    );
  });
  it("large groups do not overflow: N = 100 000", () => {
    const r = batchPoissonLossSystem({ servers: 100_000, traffic: 99_000, meanBatchSize: 3, admission: "all-or-nothing" });
    expect(r.callCongestion).toBeGreaterThan(0);
    expect(r.callCongestion).toBeLessThan(1);
  });
});

describe("Kaufman–Roberts multi-rate recursion (Kaufman 1981, IEEE Trans. Commun. 29; Roberts 1981)", () => {
  it("one class of width 1 is Erlang B (property)", () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 1000 }), fc.double({ min: 0.3, max: 3, noNaN: true }), (c, load) => {
        const a = c * load;
        return relativeError(kaufmanRoberts({ capacity: c, classes: [{ traffic: a, bandwidth: 1 }] }).classes[0].blocking, erlangB(c, a)) < 1e-11;
      }),
      { seed: 42, numRuns: 100 },
    );
  });
  it("two classes against a dense solve of the two-dimensional chain (complete sharing)", () => {
    const c = 12;
    const classes = [
      { traffic: 4, bandwidth: 1 },
      { traffic: 1.5, bandwidth: 3 },
    ];
    const states: Array<[number, number]> = [];
    for (let x = 0; x * 1 <= c; x++) for (let y = 0; x + 3 * y <= c; y++) states.push([x, y]);
    const index = new Map(states.map((s, i) => [s.join(","), i]));
    const t: Array<[number, number, number]> = [];
    states.forEach(([x, y], i) => {
      if (x + 1 + 3 * y <= c) t.push([i, index.get(`${x + 1},${y}`)!, 4]);
      if (x + 3 * (y + 1) <= c) t.push([i, index.get(`${x},${y + 1}`)!, 1.5]);
      if (x > 0) t.push([i, index.get(`${x - 1},${y}`)!, x]);
      if (y > 0) t.push([i, index.get(`${x},${y - 1}`)!, y]);
    });
    const p = denseStationary(states.length, t);
    const blocked = (b: number) => states.reduce((s, [x, y], i) => s + (x + 3 * y > c - b ? p[i] : 0), 0);
    const r = kaufmanRoberts({ capacity: c, classes });
    expect(relativeError(r.classes[0].blocking, blocked(1))).toBeLessThan(1e-11);
    expect(relativeError(r.classes[1].blocking, blocked(3))).toBeLessThan(1e-11);
  });
  it("capacity 100 000 stays finite (normalised as it goes)", () => {
    const r = kaufmanRoberts({ capacity: 100_000, classes: [{ traffic: 60_000, bandwidth: 1 }, { traffic: 4_500, bandwidth: 10 }] });
    expect(r.classes[1].blocking).toBeGreaterThan(r.classes[0].blocking);
    expect(r.classes[1].blocking).toBeLessThan(1);
    expect(r.classes[0].blocking).toBeGreaterThan(0);
  });
});
