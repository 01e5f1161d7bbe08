// Waiting with abandonment, retrials, time-varying arrivals, warm-up and peakedness, each against
// an exact birth-death or two-dimensional chain solved here, or a closed form.
import { describe, expect, it } from "vitest";
import { erlangB } from "../../../lib/teletraffic";
import { parseScenario, runReplication } from "../../../lib/simulation";
import { batchPeakedness, mmppOfferedMoments } from "../../../lib/simulation/references";
import { expectAgrees, simulate } from "./helpers";

/** Stationary law of a finite CTMC given its off-diagonal rates, by dense Gaussian elimination. */
function stationary(states: number, rates: (i: number) => Array<[number, number]>): Float64Array {
  const a = Array.from({ length: states }, () => new Float64Array(states + 1));
  for (let i = 0; i < states; i++) {
    for (const [j, r] of rates(i)) {
      a[j][i] += r; // column i of Q^T: inflow to j
      a[i][i] -= r;
    }
  }
  for (let j = 0; j <= states; j++) a[states - 1][j] = 1; // normalisation replaces one balance row
  for (let c = 0; c < states; c++) {
    let p = c;
    for (let r = c + 1; r < states; r++) if (Math.abs(a[r][c]) > Math.abs(a[p][c])) p = r;
    [a[c], a[p]] = [a[p], a[c]];
    for (let r = 0; r < states; r++) {
      if (r === c || a[r][c] === 0) continue;
      const f = a[r][c] / a[c][c];
      for (let j = c; j <= states; j++) a[r][j] -= f * a[c][j];
    }
  }
  return Float64Array.from(a, (row, i) => row[states] / row[i]);
}

describe("M/M/N/N+Q with exponential patience (Palm 1943 / Erlang-A, finite waiting room): birth-death chain", () => {
  it("refusals, abandonments, waiting and all-busy time match the chain", async () => {
    const n = 8, q = 6, lambda = 9, theta = 1 / 0.7; // holding mean 1, patience mean 0.7
    const p = stationary(n + q + 1, (k) => {
      const out: Array<[number, number]> = [];
      if (k < n + q) out.push([k + 1, lambda]);
      if (k > 0) out.push([k - 1, Math.min(k, n) + Math.max(0, k - n) * theta]);
      return out;
    });
    const full = p[n + q];
    let allBusy = 0, waiting = 0;
    for (let k = n; k <= n + q; k++) {
      allBusy += p[k];
      waiting += (k - n) * p[k];
    }
    const admittedRate = lambda * (1 - full);
    const r = await simulate({
      servers: n, waitingPositions: q, patience: { law: "exponential", mean: 0.7 },
      arrivals: { process: "poisson", rate: lambda }, holding: { law: "exponential", mean: 1 },
      run: { seed: 31, replications: 20, callsPerReplication: 50_000, warmupCalls: 2_000 },
    });
    expectAgrees(r.callCongestion, full, 20, "refused share vs P(N+Q) (PASTA)");
    expectAgrees(r.timeCongestion, allBusy, 20, "all servers busy");
    expectAgrees(r.meanWaiting!, waiting, 20, "mean number waiting");
    expectAgrees(r.abandonmentProbability!, (theta * waiting) / admittedRate, 20, "abandonments per admitted call (rate balance)");
    expectAgrees(r.meanWait!, waiting / admittedRate, 20, "mean wait per admitted call (Little)");
    expectAgrees(r.waitingProbability!, (allBusy - full) / (1 - full), 20, "admitted calls that wait (PASTA)");
    expectAgrees(r.lossProbability!, full + ((1 - full) * theta * waiting) / admittedRate, 20, "refused or abandoned");
  });
});

describe("retrials: M/M/N/N with an orbit and persistence (Cohen 1957; Falin & Templeton 1997): truncated 2-D chain", () => {
  it("first-attempt blocking, loss, attempts per call and mean orbit match the chain", async () => {
    const n = 5, lambda = 4, nu = 1 / 0.8, persistence = 0.7, orbitCap = 80;
    // state (busy k, orbit m) -> k + (n+1) m
    const id = (k: number, m: number) => k + (n + 1) * m;
    const p = stationary((n + 1) * (orbitCap + 1), (s) => {
      const k = s % (n + 1), m = Math.floor(s / (n + 1));
      const out: Array<[number, number]> = [];
      if (k < n) out.push([id(k + 1, m), lambda]);
      else if (m < orbitCap) out.push([id(k, m + 1), lambda * persistence]);
      if (k > 0) out.push([id(k - 1, m), k]);
      if (m > 0) {
        if (k < n) out.push([id(k + 1, m - 1), m * nu]);
        else out.push([id(k, m - 1), m * nu * (1 - persistence)]);
      }
      return out;
    });
    let blocked = 0, orbit = 0, orbitWhenFull = 0, tail = 0;
    for (let s = 0; s < p.length; s++) {
      const k = s % (n + 1), m = Math.floor(s / (n + 1));
      if (k === n) {
        blocked += p[s];
        orbitWhenFull += m * p[s];
      }
      orbit += m * p[s];
      if (m >= orbitCap - 10) tail += p[s];
    }
    expect(tail, "truncation negligible").toBeLessThan(1e-12);
    const lossRate = lambda * blocked * (1 - persistence) + nu * orbitWhenFull * (1 - persistence);
    const r = await simulate({
      servers: n, arrivals: { process: "poisson", rate: lambda }, holding: { law: "exponential", mean: 1 },
      retrials: { persistence, delay: { law: "exponential", mean: 0.8 } },
      run: { seed: 41, replications: 20, callsPerReplication: 50_000, warmupCalls: 2_000 },
    });
    expectAgrees(r.firstAttemptBlocking!, blocked, 20, "first-attempt blocking = P(k = N) (PASTA)");
    expectAgrees(r.lossProbability!, lossRate / lambda, 20, "fresh calls finally lost");
    expectAgrees(r.attemptsPerCall!, 1 + (nu * orbit) / lambda, 20, "attempts per fresh call");
    expectAgrees(r.meanRetrying!, orbit, 20, "mean orbit size");
    expect(Math.abs(blocked - erlangB(n, lambda)) / erlangB(n, lambda), "retrials raise blocking well above Erlang B").toBeGreaterThan(0.2);
  });

  it("maxAttempts = 1 loses every refused call: Erlang B", async () => {
    const r = await simulate({
      servers: 10, arrivals: { process: "poisson", rate: 8 }, holding: { law: "weibull", mean: 1, cv: 0.5 },
      retrials: { persistence: 0.9, delay: { law: "exponential", mean: 1 }, maxAttempts: 1 },
      run: { seed: 42, replications: 20, callsPerReplication: 50_000, warmupCalls: 2_000 },
    });
    expectAgrees(r.lossProbability!, erlangB(10, 8), 20, "loss vs Erlang B");
    expect(r.attemptsPerCall!.estimate).toBe(1);
  });
});

describe("time-varying Poisson arrivals (exact inversion of the integrated rate)", () => {
  it("a profile with one rate everywhere is Poisson: Erlang B", async () => {
    const r = await simulate({
      servers: 10, arrivals: { process: "time-varying", profile: [{ duration: 0.3, rate: 8 }, { duration: 1.1, rate: 8 }] },
      holding: { law: "exponential", mean: 1 }, run: { seed: 51, replications: 20, callsPerReplication: 50_000, warmupCalls: 2_000 },
    });
    expectAgrees(r.callCongestion, erlangB(10, 8), 20, "call congestion vs Erlang B");
  });

  it("the call count over a long horizon matches the profile's mean rate within 5 Poisson SE", () => {
    // rates 4 for 1 time unit, 0 for 0.5, 12 for 2.5: mean (4 + 30) / 4 = 8.5
    const s = parseScenario({
      servers: 100, arrivals: { process: "time-varying", profile: [{ duration: 1, rate: 4 }, { duration: 0.5, rate: 0 }, { duration: 2.5, rate: 12 }] },
      holding: { law: "exponential", mean: 0.1 }, run: { seed: 52, replications: 2, horizon: 20_000 },
    });
    const stats = runReplication(s, 0);
    const expected = 8.5 * stats.time; // horizon is a whole number of cycles
    expect(Math.abs(stats.calls - expected)).toBeLessThan(5 * Math.sqrt(expected));
  });
});

describe("run control", () => {
  it("horizon runs with a warm-up time agree with Erlang B (ratio estimator with varying call counts)", async () => {
    const r = await simulate({
      servers: 10, arrivals: { process: "poisson", rate: 8 }, holding: { law: "gamma", mean: 1, cv: 0.5 },
      run: { seed: 61, replications: 20, horizon: 6_000, warmupTime: 50 },
    });
    expectAgrees(r.callCongestion, erlangB(10, 8), 20, "call congestion vs Erlang B");
    expectAgrees(r.timeCongestion, erlangB(10, 8), 20, "time congestion vs Erlang B");
  });

  it('warmup "auto" (MSER-5) discards an initial transient from an empty start and agrees with Erlang B', async () => {
    const r = await simulate({
      servers: 100, arrivals: { process: "poisson", rate: 95 }, holding: { law: "deterministic", value: 1 },
      run: { seed: 62, replications: 20, callsPerReplication: 30_000, warmup: "auto" },
    });
    // An empty 100-server group fills in about one holding time (~95 calls); MSER-5 cuts at least that.
    expect(r.warmupCalls.min).toBeGreaterThan(0);
    expect(r.warmupCalls.max).toBeLessThan(15_000);
    expectAgrees(r.timeCongestion, erlangB(100, 95), 20, "time congestion vs Erlang B");
  });
});

describe("peakedness of the streams used for equivalent random / Hayward", () => {
  it("MMPP moment equations reproduce the interrupted Poisson closed form Z = 1 + λ a / ((a + b)(a + b + μ)) (from memory; Kuczura 1973)", () => {
    const lambda = 16, a = 0.7, b = 1.3, mu = 1 / 2; // a: on->off, b: off->on, mean holding 2
    const m = mmppOfferedMoments([lambda, 0], [[0, a], [b, 0]], 2);
    const meanRate = (lambda * b) / (a + b);
    expect(m.mean).toBeCloseTo(meanRate * 2, 10);
    expect(m.variance / m.mean).toBeCloseTo(1 + (lambda * a) / ((a + b) * (a + b + mu)), 10);
  });

  it("Poisson (one phase) has peakedness 1; batches follow Z = (1 + E[X²]/E[X]) / 2", () => {
    const m = mmppOfferedMoments([5], [[0]], 1.5);
    expect(m.variance / m.mean).toBeCloseTo(1, 12);
    expect(batchPeakedness({ law: "fixed", value: 3 })).toBeCloseTo(2, 12);
    expect(batchPeakedness({ law: "geometric", mean: 1 })).toBeCloseTo(1, 12);
    expect(batchPeakedness({ law: "geometric", mean: 2 })).toBeCloseTo(2, 12);
  });
});
