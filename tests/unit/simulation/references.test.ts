import { describe, expect, it } from "vitest";
import { parseScenario, referenceSchema, referencesFor, type ScenarioInput } from "../../../lib/simulation";
import { referenceRules } from "../../../lib/simulation/references";
import { erlangB, overflowRetrialSystem, retrialLossSystem } from "../../../lib/teletraffic";

const run = { seed: 1, replications: 2, callsPerReplication: 1000 };
const exponential = (mean: number) => ({ law: "exponential" as const, mean });

const arrivals: Array<ScenarioInput["arrivals"]> = [
  { process: "poisson", rate: 4 },
  { process: "mmpp", rates: [6, 1, 3], switching: [[0, 1, 0], [0, 0, 1], [1, 0, 0]] },
  { process: "on-off", onRate: 8, meanOn: 1, meanOff: 1 },
  { process: "renewal", interarrival: { law: "weibull", mean: 0.25, cv: 0.6 } },
  { process: "batch", rate: 1.5, batchSize: { law: "empirical", values: [1, 3], probabilities: [0.6, 0.4] }, admission: "partial" },
  { process: "overflow", primaries: [{ traffic: 5, servers: 4 }, { traffic: 1, servers: 0 }] },
  { process: "finite-source", sources: 12, idleRate: 0.4 },
  { process: "time-varying", profile: [{ duration: 2, rate: 2 }, { duration: 1, rate: 9 }] },
];
const features: Array<[string, Partial<ScenarioInput>]> = [
  ["loss", {}],
  ["waiting", { waitingPositions: 2 }],
  ["waiting + exponential patience", { waitingPositions: 2, patience: exponential(1) }],
  ["waiting + lognormal patience", { waitingPositions: 2, patience: { law: "lognormal", mean: 1, cv: 1 } }],
  ["retrials", { retrials: { persistence: 0.6, delay: exponential(0.5) } }],
  ["retrials with an attempt limit", { retrials: { persistence: 0.6, delay: exponential(0.5), maxAttempts: 3 } }],
  ["retrials with deterministic delays", { retrials: { persistence: 0.6, delay: { law: "deterministic", value: 0.5 } } }],
];

describe("references registry", () => {
  it("every scenario kind with exponential holding has an exact reference or a stated reason why not", () => {
    for (const a of arrivals)
      for (const [name, extra] of features) {
        const scenario = parseScenario({ servers: 5, arrivals: a, holding: exponential(1), run, ...extra });
        const refs = referencesFor(scenario);
        for (const r of refs) expect(() => referenceSchema.parse(r)).not.toThrow();
        const exact = refs.filter((r) => r.exact && !r.unavailable);
        const reason = refs.find((r) => r.method === "exact reference");
        expect(exact.length > 0 || (reason?.unavailable ?? "").length > 20, `${a.process} / ${name}`).toBe(true);
        expect(refs[0].method).toBe("Erlang B");
      }
  });
  it("which combinations are exact (the README table states the same)", () => {
    const exactFor = (a: ScenarioInput["arrivals"], extra: Partial<ScenarioInput>) =>
      referencesFor(parseScenario({ servers: 5, arrivals: a, holding: exponential(1), run, ...extra })).some((r) => r.exact && !r.unavailable);
    expect(exactFor(arrivals[0], features[4][1])).toBe(true); // Poisson retrials
    expect(exactFor(arrivals[6], features[4][1])).toBe(true); // finite-source retrials
    expect(exactFor(arrivals[1], features[2][1])).toBe(true); // MMPP waiting with patience
    expect(exactFor(arrivals[4], features[2][1])).toBe(true); // any batch law with waiting and patience
    expect(exactFor(arrivals[3], features[0][1])).toBe(true); // Weibull renewal
    expect(exactFor(arrivals[3], features[2][1])).toBe(true); // Weibull renewal with waiting and patience (GI/M/N/N+Q)
    expect(exactFor(arrivals[3], features[4][1])).toBe(true); // Weibull renewal with retrials (cv 0.6: a short tail)
    expect(exactFor({ process: "renewal", interarrival: { law: "lognormal", mean: 0.25, cv: 2 } }, features[4][1])).toBe(true); // long tail: the series ends once the group has emptied
    expect(exactFor(arrivals[1], features[4][1])).toBe(true); // MMPP retrials
    expect(exactFor(arrivals[2], { ...features[4][1], ...features[2][1] })).toBe(true); // on-off retrials with waiting and patience
    expect(exactFor(arrivals[4], features[4][1])).toBe(true); // batch retrials
    expect(exactFor(arrivals[5], features[4][1])).toBe(true); // overflow retrials
    expect(exactFor(arrivals[5], { ...features[4][1], ...features[2][1] })).toBe(true); // overflow retrials with waiting and patience
    expect(exactFor(arrivals[5], features[2][1])).toBe(true); // overflow with waiting and patience
    expect(exactFor(arrivals[0], features[5][1])).toBe(false); // attempt limit
    expect(exactFor(arrivals[0], features[6][1])).toBe(false); // non-exponential retry delay
    expect(exactFor(arrivals[7], features[0][1])).toBe(true); // time-varying: the exact periodic solution
    expect(exactFor(arrivals[7], features[1][1])).toBe(true); // time-varying with waiting positions: the exact periodic N + Q chain
    expect(exactFor(arrivals[7], features[2][1])).toBe(true); // … and with exponential patience
    expect(exactFor(arrivals[7], features[4][1])).toBe(true); // time-varying with retrials: the periodic retrial chain
    expect(exactFor(arrivals[7], { ...features[4][1], ...features[2][1] })).toBe(true); // … also with waiting and patience
    expect(exactFor(arrivals[7], features[5][1])).toBe(false); // … but not with an attempt limit
  });
  it("non-exponential holding: Erlang B and Engset stay exact (insensitivity), the chains do not", () => {
    const lognormal = { law: "lognormal" as const, mean: 1, cv: 2 };
    const poisson = referencesFor(parseScenario({ servers: 5, arrivals: arrivals[0], holding: lognormal, run }));
    expect(poisson.find((r) => r.method === "Erlang B")!.exact).toBe(true);
    const retrial = referencesFor(parseScenario({ servers: 5, arrivals: arrivals[0], holding: lognormal, run, ...features[4][1] }));
    expect(retrial.find((r) => r.method === "retrial model exact chain")!.exact).toBe(false);
    expect(retrial.find((r) => r.method === "exact reference")!.unavailable).toMatch(/holding times are not exponential/);
  });
  it("overflow retrials: the exact chain's value, background when large, a stated memory limit beyond the band", () => {
    const scenario = (primaries: Array<{ traffic: number; servers: number }>, servers: number) =>
      parseScenario({ servers, arrivals: { process: "overflow", primaries }, holding: exponential(2), run, retrials: { persistence: 0.6, delay: exponential(0.5) } });
    const small = referencesFor(scenario([{ traffic: 5, servers: 4 }, { traffic: 1, servers: 0 }], 5)).find((r) => r.method === "overflow retrial exact chain")!;
    const exact = overflowRetrialSystem({ primaries: [{ traffic: 5, servers: 4 }, { traffic: 1, servers: 0 }], servers: 5, meanHolding: 2, persistence: 0.6, meanRetryDelay: 0.5 });
    expect(small.exact).toBe(true);
    expect(small.callCongestion).toBe(exact.firstAttemptBlocking);
    expect(small.lossProbability).toBe(exact.lossProbability);
    // 2 primaries of 10 servers: 121 phases × 11 final states = 1331 per level, and
    // (32 + 1) × 1331 × (2 × 1331 + 1) ≈ 1.2e8 band entries > 1e7, so the reason names the memory limit.
    const huge = referencesFor(scenario([{ traffic: 8, servers: 10 }, { traffic: 8, servers: 10 }], 10), { interactive: true });
    expect(huge.find((r) => r.method === "exact reference")!.unavailable).toMatch(/beyond the banded solve/);
    // 1 primary of 12 servers, 8 final: 117 per level, (33 × 117) × 117 × 117 ≈ 5.3e7 work units, above the interactive 2e7.
    const large = referencesFor(scenario([{ traffic: 10, servers: 12 }], 8), { interactive: true });
    const flagged = large.find((r) => r.method === "overflow retrial exact chain")!;
    expect(flagged.background).toBe(true);
    expect(large.some((r) => r.method === "exact reference")).toBe(false);
  });
  it("the retrial reference is the exact model's value, with extended Erlang B beside it as an approximation", () => {
    const refs = referencesFor(parseScenario({ servers: 5, arrivals: arrivals[0], holding: exponential(1), run, ...features[4][1] }));
    const exact = retrialLossSystem({ servers: 5, traffic: 4, persistence: 0.6, meanRetryDelay: 0.5 });
    const ref = refs.find((r) => r.method === "retrial model exact chain")!;
    expect(ref.callCongestion).toBe(exact.firstAttemptBlocking);
    expect(ref.lossProbability).toBe(exact.lossProbability);
    expect(ref.truncationBound).toBeLessThanOrEqual(1e-12);
    expect(refs.find((r) => r.method === "extended Erlang B")!.exact).toBe(false);
  });
  it("time-varying load: PSA and MOL per segment beside the cycle values; a constant profile gives Erlang B", () => {
    const refs = referencesFor(parseScenario({ servers: 5, arrivals: arrivals[7], holding: exponential(1), run }));
    const mol = refs.find((r) => r.method === "modified offered load approximation")!;
    expect(mol.segments).toHaveLength(2);
    const flat = referencesFor(parseScenario({ servers: 5, arrivals: { process: "time-varying", profile: [{ duration: 1, rate: 3 }] }, holding: exponential(1), run }));
    expect(flat.find((r) => r.method === "pointwise stationary approximation")!.callCongestion).toBeCloseTo(erlangB(5, 3), 14);
  });
  it("time-varying load with exponential holding: the exact periodic solution is the exact reference, per segment too", () => {
    const refs = referencesFor(parseScenario({ servers: 5, arrivals: arrivals[7], holding: exponential(1), run }));
    const exact = refs.find((r) => r.method === "M(t)/M/N/N periodic exact solution")!;
    expect(exact.exact).toBe(true);
    expect(exact.segments).toHaveLength(2);
    expect(exact.truncationBound).toBeLessThanOrEqual(1e-12);
    // Offered calls 2 × 2 and 9 × 1 per cycle: the cycle's call congestion is their weighted mean of the segments'.
    expect(exact.callCongestion).toBeCloseTo((4 * exact.segments![0].callCongestion + 9 * exact.segments![1].callCongestion) / 13, 14);
    expect(refs.some((r) => r.method === "exact reference")).toBe(false);
    const flat = referencesFor(parseScenario({ servers: 5, arrivals: { process: "time-varying", profile: [{ duration: 1, rate: 3 }] }, holding: exponential(1), run }));
    expect(flat.find((r) => r.method === "M(t)/M/N/N periodic exact solution")!.callCongestion).toBeCloseTo(erlangB(5, 3), 13);
    // Out of equilibrium the holding law matters beyond its mean: no exact reference, and the reason says why.
    const lognormal = referencesFor(parseScenario({ servers: 5, arrivals: arrivals[7], holding: { law: "lognormal", mean: 1, cv: 2 }, run }));
    expect(lognormal.some((r) => r.method === "M(t)/M/N/N periodic exact solution")).toBe(false);
    expect(lognormal.find((r) => r.method === "exact reference")!.unavailable).toMatch(/no insensitivity/);
  });
  it("time-varying load with retrials: the periodic retrial chain's first-attempt blocking per segment and its loss beside extended Erlang B's", () => {
    const refs = referencesFor(parseScenario({ servers: 5, arrivals: arrivals[7], holding: exponential(1), run, ...features[4][1] }));
    const exact = refs.find((r) => r.method === "periodic retrial exact chain")!;
    expect(exact.exact).toBe(true);
    expect(exact.segments).toHaveLength(2);
    expect(exact.truncationBound).toBeLessThanOrEqual(1e-9);
    // First attempts see the segment's time average (PASTA within a segment): the cycle value is their call-weighted mean.
    expect(exact.callCongestion).toBeCloseTo((4 * exact.segments![0].callCongestion + 9 * exact.segments![1].callCongestion) / 13, 9);
    expect(exact.lossProbability).toBeGreaterThan(0);
    expect(exact.attemptsPerCall).toBeGreaterThan(1);
    expect(refs.some((r) => r.method === "exact reference")).toBe(false);
  });
  it("an interactive caller gets large cases flagged as background work, not computed", () => {
    const k = 16;
    const rates = Array.from({ length: k }, (_, i) => 100 + i);
    const switching = Array.from({ length: k }, (_, i) => Array.from({ length: k }, (_, l) => (l === (i + 1) % k ? 1 : 0)));
    const scenario = parseScenario({ servers: 10_000, arrivals: { process: "mmpp", rates, switching }, holding: exponential(100), run });
    const interactive = referencesFor(scenario, { interactive: true }).find((r) => r.method === "MMPP/M/N/N exact chain")!;
    expect(interactive.background).toBe(true);
    expect(interactive.callCongestion).toBeUndefined();
    expect(interactive.unavailable).toMatch(/interactive/);
  });
  it("every rule states its size limits", () => {
    for (const rule of referenceRules) expect(rule.limits.length).toBeGreaterThan(10);
  });
});
