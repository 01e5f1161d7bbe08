import { describe, expect, it } from "vitest";
import { analyticOperations } from "../../../lib/teletraffic";
import { analyticCommands } from "../../../lib/cli/analytic-commands";
import { denseStationary } from "./dense-chain";

/**
 * One field name, one meaning across the analytic operations (review of the analytic command
 * line, findings 2–5 and 8–10). Every number is checked against a chain or formula solved here.
 */

const relativeError = (x: number, y: number) => Math.abs(x - y) / Math.abs(y);
const run = (name: keyof typeof analyticOperations, input: unknown) => analyticOperations[name].evaluate(input) as Record<string, number>;

/** Stationary law of a birth–death chain on 0..K (product form, Kleinrock, Queueing Systems vol. 1, ch. 3). */
function birthDeath(top: number, birth: (k: number) => number, death: (k: number) => number): number[] {
  const w = [1];
  for (let k = 1; k <= top; k++) w.push((w[k - 1] * birth(k - 1)) / death(k));
  const total = w.reduce((s, v) => s + v, 0);
  return w.map((v) => v / total);
}
const sum = (p: number[], from: number, to: number) => p.slice(from, to).reduce((s, v) => s + v, 0);

describe("timeCongestion = all servers busy, fullCongestion = the whole system taken (finding 2)", () => {
  // M/M/N/N+Q, N = 4, A = 3, Q = 2, h = 1: birth rate 3, death min(k, 4)
  const p = birthDeath(6, () => 3, (k) => Math.min(k, 4));
  it("finite-queue and patience-queue (no patience) report the same two values under the same names", () => {
    for (const name of ["finite-queue", "patience-queue"] as const) {
      const r = run(name, { servers: 4, traffic: 3, waitingPositions: 2 });
      expect(relativeError(r.timeCongestion, sum(p, 4, 7)), name).toBeLessThan(1e-12); // 0.3751408
      expect(relativeError(r.fullCongestion, p[6]), name).toBeLessThan(1e-12); // 0.0912505
      expect(r).not.toHaveProperty("probabilityAllServersBusy");
    }
    expect(sum(p, 4, 7)).toBeCloseTo(0.3751408, 7); // the review's figure for patience-queue
    expect(p[6]).toBeCloseTo(0.0912505, 7); // and finite-queue's old "timeCongestion"
  });
});

describe("waitingProbability: one name, over admitted calls as the simulation counts it (finding 3)", () => {
  const p = birthDeath(6, () => 3, (k) => Math.min(k, 4));
  const overAdmitted = sum(p, 4, 6) / (1 - p[6]); // 0.3123967; over all arrivals it would be 0.2838903
  it("finite-queue and patience-queue agree with P(N <= k < N + Q) / P(k < N + Q)", () => {
    expect(overAdmitted).toBeCloseTo(0.3123967, 7);
    for (const name of ["finite-queue", "patience-queue"] as const) {
      const r = run(name, { servers: 4, traffic: 3, waitingPositions: 2 });
      expect(relativeError(r.waitingProbability, overAdmitted), name).toBeLessThan(1e-12);
      expect(r).not.toHaveProperty("probabilityOfWaiting");
    }
  });
  it("erlang-c reports C(N, A) as waitingProbability: 1 − Σ_{k<N} p_k of M/M/N (Erlang 1917), summed here", () => {
    // N = 5, A = 3: p_k ∝ A^k/k! below N, p_N Σ ρ^j above; C = p_N/(1 − ρ) normalised
    const a = 3;
    const n = 5;
    let below = 0;
    let term = 1;
    for (let k = 0; k < n; k++) {
      below += term;
      term *= a / (k + 1);
    }
    const tail = term / (1 - a / n);
    const r = run("erlang-c", { servers: n, traffic: a });
    expect(relativeError(r.waitingProbability, tail / (below + tail))).toBeLessThan(1e-13);
    expect(r).not.toHaveProperty("probabilityOfWaiting");
  });
  it("every operation with waiting positions states the denominators in its schema description (the CLI help header)", () => {
    const waiting = [
      "finite-queue",
      "patience-queue",
      "engset-queue",
      "retrial-loss",
      "mmpp-queue",
      "batch-loss",
      "renewal-queue",
      "overflow-loss",
      "periodic-queue",
      "periodic-retrial",
      "mmpp-retrial",
      "batch-retrial",
      "overflow-retrial",
      "renewal-retrial",
    ] as const;
    for (const name of waiting) {
      const description = analyticOperations[name].input.description ?? "";
      expect(description, name).toContain("waitingProbability and abandonmentProbability = shares of admitted attempts");
      expect(description, name).toContain("lossProbability = share of fresh calls");
      expect(description, name).toContain("timeCongestion = share of time all N servers are busy");
    }
    expect(analyticOperations["erlang-c"].input.description).toContain("waitingProbability = C(N, A)");
  });
});

describe("abandonment with retrials: per admitted attempt, as the engine counts it (finding 4)", () => {
  it("retrial-loss N = 4, A = 3, p = 0.5, retry delay 0.1, Q = 2, patience 2 against a dense solve of the (calls, orbit) chain", () => {
    // State (k, o): k calls at the group (0..6), o in orbit (cut at 40; the orbit mass there is far below 1e-15).
    // Fresh 3, retries 10 o, service min(k, 4), abandonment 0.5 (k − 4)⁺; a refused attempt joins
    // (or stays in) the orbit with probability 0.5 (Falin & Templeton 1997, ch. 1).
    const K = 6;
    const cap = 40;
    const id = (k: number, o: number) => o * (K + 1) + k;
    const t: Array<[number, number, number]> = [];
    for (let o = 0; o <= cap; o++)
      for (let k = 0; k <= K; k++) {
        if (k < K) t.push([id(k, o), id(k + 1, o), 3]);
        else if (o < cap) t.push([id(k, o), id(k, o + 1), 3 * 0.5]);
        if (o > 0 && k < K) t.push([id(k, o), id(k + 1, o - 1), 10 * o]);
        if (o > 0 && k === K) t.push([id(k, o), id(k, o - 1), 10 * o * 0.5]);
        if (k > 0) t.push([id(k, o), id(k - 1, o), Math.min(k, 4) + 0.5 * Math.max(0, k - 4)]);
      }
    const pi = denseStationary((cap + 1) * (K + 1), t);
    let admittedAttempts = 0;
    let queue = 0;
    for (let o = 0; o <= cap; o++)
      for (let k = 0; k <= K; k++) {
        const x = pi[id(k, o)];
        if (k < K) admittedAttempts += (3 + 10 * o) * x;
        queue += Math.max(0, k - 4) * x;
      }
    const r = run("retrial-loss", { servers: 4, traffic: 3, persistence: 0.5, meanRetryDelay: 0.1, waitingPositions: 2, meanPatience: 2 });
    expect(relativeError(r.abandonmentProbability, (0.5 * queue) / admittedAttempts)).toBeLessThan(1e-9); // 0.0469552
    expect(r.abandonmentProbability).toBeCloseTo(0.0469552, 7);
    // per fresh call it would be 0.0441713: a different basis, which the description now names
    expect((0.5 * queue) / 3).toBeCloseTo(0.0441713, 7);
    expect(analyticOperations["retrial-loss"].input.description).toContain("with retrials repeated attempts count too");
  });
});

describe("one input name for waiting positions, one name for the sizing check figure (finding 5)", () => {
  it("finite-queue takes waitingPositions (and --waiting-positions on the command line); queuePositions is no longer a field", async () => {
    const cli = analyticCommands.find((c) => c.name === "finite-queue")!;
    const out = (await cli.run(["--servers", "4", "--traffic", "3", "--waiting-positions", "2"])).json as Record<string, number>;
    expect(out.waitingPositions).toBe(2);
    expect(out).not.toHaveProperty("queuePositions");
    expect(() => run("finite-queue", { servers: 4, traffic: 3, queuePositions: 2 })).toThrow(/waitingPositions/);
  });
  it("erlang-b, erlang-c-servers, engset-servers and retrial-servers all report measureOneLess, the measure at N − 1", () => {
    // Erlang B recursion B(n) = A B(n−1)/(n + A B(n−1)) (Erlang 1917)
    const erlangB = (n: number, a: number) => {
      let b = 1;
      for (let k = 1; k <= n; k++) b = (a * b) / (k + a * b);
      return b;
    };
    const b = run("erlang-b", { traffic: 20, target: 0.01 });
    expect(b.servers).toBe(30);
    expect(relativeError(b.measureOneLess, erlangB(29, 20))).toBeLessThan(1e-13);

    const c = run("erlang-c-servers", { traffic: 8, target: 0.2 });
    const erlangC = (n: number, a: number) => (n * erlangB(n, a)) / (n - a * (1 - erlangB(n, a)));
    expect(relativeError(c.measureOneLess, erlangC(c.servers - 1, 8))).toBeLessThan(1e-13);
    expect(erlangC(c.servers - 1, 8)).toBeGreaterThan(0.2);

    // Engset call congestion = time congestion with S − 1 sources, truncated binomial (Engset 1918)
    const engsetTime = (s: number, n: number, beta: number) => {
      const w: number[] = [1];
      for (let j = 1; j <= n; j++) w.push((w[j - 1] * (s - j + 1) * beta) / j);
      return w[n] / w.reduce((x, y) => x + y, 0);
    };
    const e = run("engset-servers", { sources: 20, idleRate: 0.2, target: 0.01 });
    expect(relativeError(e.measureOneLess, engsetTime(19, e.servers - 1, 0.2))).toBeLessThan(1e-12);

    const r = run("retrial-servers", { traffic: 8, persistence: 0.7, meanRetryDelay: 0.5, target: 0.01 });
    const below = run("retrial-loss", { servers: r.servers - 1, traffic: 8, persistence: 0.7, meanRetryDelay: 0.5 });
    expect(r.measureOneLess).toBe(below.lossProbability);

    for (const x of [b, c, e, r]) for (const old of ["blockingOneLess", "congestionOneLess", "valueOneLess"]) expect(x).not.toHaveProperty(old);
  });
  it("erlang-c-servers with one server fewer unstable: measureOneLess is 1 for a probability (every call waits), never Infinity", () => {
    const c = run("erlang-c-servers", { traffic: 0.5, target: 0.9 });
    expect(c.servers).toBe(1);
    expect(c.measureOneLess).toBe(1);
    expect(JSON.parse(JSON.stringify(c))).toEqual(c);
  });
});

describe("finite sources: never more servers than sources; the full system only when it can fill (finding 8)", () => {
  it("engset-servers S = 5, γ = 10, time target 1e-6 gives N = 5 (no call refused), not 6", () => {
    const r = run("engset-servers", { sources: 5, idleRate: 10, target: 1e-6, measure: "time" });
    expect(r.servers).toBe(5);
    expect(r.callCongestion).toBe(0);
    expect(String(r.method)).toMatch(/no call is ever refused/);
    // E_5(5) = (β/(1+β))^5 = (10/11)^5 = 0.62092132 (all five sources busy), E_5(4) from the truncated binomial
    expect(relativeError(r.timeCongestion, (10 / 11) ** 5)).toBeLessThan(1e-13);
    const w = [1, 5 * 10, 10 * 100, 10 * 1000, 5 * 10000];
    expect(relativeError(r.measureOneLess, w[4] / w.reduce((x, y) => x + y, 0))).toBeLessThan(1e-13);
  });
  it("engset-queue S = 5, γ = 1, N = 2, Q = 10, patience 0.5: 12 places never fill (fullCongestion 0); P(all 5 sources in) is allSourcesBusy", () => {
    // birth (5 − k) γ, death min(k, 2) + 2 (k − 2)⁺ on 0..5 (Iversen, handbook, machine-repair model)
    const p = birthDeath(5, (k) => 5 - k, (k) => Math.min(k, 2) + 2 * Math.max(0, k - 2));
    const r = run("engset-queue", { sources: 5, idleRate: 1, servers: 2, waitingPositions: 10, meanPatience: 0.5 });
    expect(r.fullCongestion).toBe(0);
    expect(relativeError(r.allSourcesBusy, p[5])).toBeLessThan(1e-12); // the 0.0119 the review saw as "fullCongestion"
    expect(r.allSourcesBusy).toBeCloseTo(0.0119, 4);
    expect(relativeError(r.timeCongestion, sum(p, 2, 6))).toBeLessThan(1e-12);
    expect(r.firstAttemptBlocking).toBe(0);
  });
  it("engset-queue with S = N + Q: the system can fill, fullCongestion = P(k = N + Q) = allSourcesBusy", () => {
    const p = birthDeath(5, (k) => 5 - k, (k) => Math.min(k, 2));
    const r = run("engset-queue", { sources: 5, idleRate: 1, servers: 2, waitingPositions: 3 });
    expect(relativeError(r.fullCongestion, p[5])).toBeLessThan(1e-12);
    expect(r.allSourcesBusy).toBe(r.fullCongestion);
  });
});

describe("offered traffic echoed as given (finding 9)", () => {
  it.each([
    ["patience-queue", { servers: 4, traffic: 3, waitingPositions: 2 }, 3], // was 3.0000000000000004
    ["patience-queue", { servers: 5, traffic: 3, waitingPositions: 10, meanPatience: 0.5, meanHolding: 3 }, 3], // was 3.000000000000001
    ["retrial-loss", { servers: 10, traffic: 9.9, persistence: 1, meanRetryDelay: 0.5 }, 9.9],
    ["retrial-servers", { traffic: 8.1, persistence: 0.7, meanRetryDelay: 0.5, target: 0.01 }, 8.1],
    ["batch-retrial", { servers: 4, traffic: 3.3, batchSize: { law: "uniform", min: 1, max: 3 }, admission: "partial", persistence: 0.6, meanRetryDelay: 0.5 }, 3.3],
    // two phases switching at equal rates spend half the time in each: (6 + 1)/2
    ["mmpp-retrial", { servers: 4, rates: [6, 1], switching: [[0, 1], [1, 0]], persistence: 0.6, meanRetryDelay: 0.5 }, 3.5],
  ] as const)("%s", (name, input, offered) => {
    const r = run(name, input);
    expect(r.offeredTraffic).toBe(offered);
    expect(r.freshRate).toBe(offered / (("meanHolding" in input && input.meanHolding) || 1));
  });
});

describe("overflow-loss patience in time units like every other operation (finding 10)", () => {
  it("one primary of 0 servers (its traffic goes straight on) is M/M/N/N+Q with patience: against the birth–death chain in time units", () => {
    // A = 3 E, h = 2, N = 3, Q = 2, mean patience 1.4: λ = 1.5, μ = 0.5, α = 1/1.4
    const lambda = 1.5;
    const mu = 0.5;
    const alpha = 1 / 1.4;
    const p = birthDeath(5, () => lambda, (k) => Math.min(k, 3) * mu + Math.max(0, k - 3) * alpha);
    const queue = p.reduce((s, v, k) => s + Math.max(0, k - 3) * v, 0);
    const admitted = lambda * (1 - p[5]);
    const o = run("overflow-loss", { primaries: [{ traffic: 3, servers: 0 }], servers: 3, waitingPositions: 2, meanPatience: 1.4, meanHolding: 2 });
    const r = { timeCongestion: o.timeCongestion, waiting: o.waiting as unknown as Record<string, number> };
    expect(relativeError(r.waiting.waitingProbability, sum(p, 3, 5) / (1 - p[5]))).toBeLessThan(1e-12);
    expect(relativeError(r.waiting.abandonmentProbability, (alpha * queue) / admitted)).toBeLessThan(1e-12);
    expect(relativeError(r.waiting.meanWait, queue / admitted)).toBeLessThan(1e-12); // Little, in time units
    expect(relativeError(r.timeCongestion, sum(p, 3, 6))).toBeLessThan(1e-12);
    expect(analyticOperations["overflow-loss"].input.description).not.toMatch(/in mean holding times/);
    const patience = (analyticOperations["overflow-loss"].input as unknown as { shape: Record<string, { description?: string }> }).shape.meanPatience.description;
    expect(patience).not.toMatch(/mean holding times/);
  });
});
