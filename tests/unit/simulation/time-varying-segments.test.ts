// Per-segment estimates of time-varying runs (engine.ts counters, result.ts `segments`) against the
// exact periodic M(t)/M/N/N solution (lib/teletraffic/periodic-loss.ts, itself checked against a
// dense matrix exponential in tests/unit/teletraffic/periodic-loss.test.ts) and against PSA where
// PSA is accurate; the segments must add up to the cycle measures and fold like every other counter.
import { describe, expect, it } from "vitest";
import {
  aggregateReplications,
  buildResult,
  finishRun,
  InlineRunner,
  mergeAggregates,
  parseScenario,
  planRun,
  ReplicationJob,
  runChunk,
  referencesFor,
  type PartialAggregate,
  type ScenarioInput,
} from "../../../lib/simulation/node";
import { periodicLossSystem, periodicRetrialSystem, timeVaryingLoss } from "../../../lib/teletraffic";
import { coverageRegion, expectAgrees, simulateReference } from "./helpers";

const exp1 = { law: "exponential", mean: 1 } as const;
/** Segments of 1–2 holding times, one of them empty: PSA is far off here, the exact solution is not. */
const profile = [
  { duration: 2, rate: 4 },
  { duration: 1, rate: 14 },
  { duration: 1.5, rate: 0 },
  { duration: 1.5, rate: 9 },
];
const scenario = (seed: number, replications: number, horizon: number): ScenarioInput => ({
  servers: 10,
  arrivals: { process: "time-varying", profile },
  holding: exp1,
  run: { seed, replications, horizon, warmupTime: 30 },
});
const sum = (v: number[]) => v.reduce((a, b) => a + b, 0);

describe("per-segment estimates of a time-varying run", () => {
  const input = scenario(71, 20, 3_000);
  const s = parseScenario(input);
  const refs = referencesFor(s);
  const r = simulateReference(input, refs);
  const exact = periodicLossSystem({ servers: 10, profile });

  it("every segment's call and time congestion agree with the exact periodic solution (99.9 % t bounds)", () => {
    expect(r.segments).toHaveLength(4);
    r.segments!.forEach((g, i) => {
      expect(g.exact).toBe(exact.segments[i].callCongestion);
      // Checks that PSA alone would fail here: after a change the group needs about a holding time to follow.
      expect(g.psa).toBe(timeVaryingLoss({ servers: 10, profile }).segments[i].pointwiseBlocking);
      expectAgrees(g.timeCongestion, exact.segments[i].timeCongestion, 20, `segment ${i + 1} time congestion`);
      if (g.rate > 0) expectAgrees(g.callCongestion!, exact.segments[i].callCongestion, 20, `segment ${i + 1} call congestion`);
      else expect(g.callCongestion).toBeUndefined();
    });
    // And the cycle figures agree with the exact cycle values.
    expectAgrees(r.callCongestionDirect, exact.callCongestion, 20, "cycle call congestion");
    expect(r.references.find((x) => x.method === "M(t)/M/N/N periodic exact solution")!.exact).toBe(true);
  });

  it("the segments add up to the cycle: calls and refusals exactly, estimates weighted by calls and by time", () => {
    const segments = r.segments!;
    expect(sum(segments.map((g) => g.calls))).toBe(r.calls);
    // Integer counts summed in any order are exact, so this ratio is the direct estimate bit for bit.
    expect(sum(segments.map((g) => g.refused)) / sum(segments.map((g) => g.calls))).toBe(r.callCongestionDirect.estimate);
    const byCalls = sum(segments.filter((g) => g.callCongestion).map((g) => g.calls * g.callCongestion!.estimate)) / r.calls;
    expect(Math.abs(byCalls - r.callCongestionDirect.estimate)).toBeLessThan(1e-15);
    // Segment times come from the measured period; their sum is the measured time up to rounding.
    const totalTime = sum(segments.map((g) => g.time));
    const byTime = sum(segments.map((g) => g.time * g.timeCongestion.estimate)) / totalTime;
    expect(Math.abs(byTime - r.timeCongestion.estimate)).toBeLessThan(1e-12);
    expect(segments.map((g) => [g.start, g.end])).toEqual([[0, 2], [2, 3], [3, 4.5], [4.5, 6]]);
  });

  it("an ordinary run carries no segment warning; a segment with no refusal gets a one-sided bound and one warning", () => {
    expect(r.warnings.filter((w) => w.measure?.startsWith("segments"))).toEqual([]);
    // 12, then 2, then 0.5 erlangs on 10 servers: the exact periodic call congestion of the last
    // segment is 5.6e-7 per call, so a few hundred calls see no refusal.
    const quietProfile = [{ duration: 10, rate: 12 }, { duration: 10, rate: 2 }, { duration: 10, rate: 0.5 }];
    expect(periodicLossSystem({ servers: 10, profile: quietProfile }).segments[2].callCongestion).toBeLessThan(1e-6);
    const quiet = simulateReference({
      servers: 10,
      arrivals: { process: "time-varying", profile: quietProfile },
      holding: exp1,
      run: { seed: 5, replications: 5, horizon: 400, warmupTime: 20 },
    });
    const last = quiet.segments![2];
    expect(last.calls).toBeGreaterThan(200);
    expect(last.callCongestion!.upperBoundOnly).toBe(true);
    expect(last.callCongestion!.ciLow).toBe(0);
    expect(last.callCongestion!.ciHigh).toBeCloseTo(1 - Math.pow(0.05, 1 / last.calls), 15);
    expect(quiet.segments![0].callCongestion!.upperBoundOnly).toBeUndefined();
    const warning = quiet.warnings.find((w) => w.measure === "segments.callCongestion");
    expect(warning?.message).toMatch(/segment 3 \(of 3\)/);
  });

  it("chunked runs fold the segment counters to bit-identical results (JSON round trip included)", async () => {
    const chunked = parseScenario({ ...input, run: { ...input.run, replications: 5, horizon: 300, chunkReplications: 2 } });
    const plan = planRun(chunked);
    const parts: PartialAggregate[] = [];
    for (const chunk of [0, 1, 2]) parts.push(JSON.parse(JSON.stringify(await runChunk(chunked, plan, chunk, { runner: new InlineRunner(), key: `tv${chunk}` }))));
    const stats = [0, 1, 2, 3, 4].map((i) => {
      const job = new ReplicationJob(chunked, i);
      while (!job.advance(Number.MAX_SAFE_INTEGER));
      return job.stats();
    });
    const whole = buildResult(chunked, aggregateReplications(stats, chunked.servers), refs);
    const folded = finishRun(chunked, parts, refs);
    expect(folded.segments).toEqual(whole.segments);
    expect(JSON.stringify(buildResult(chunked, mergeAggregates(parts), refs))).toBe(JSON.stringify(folded));
  });

  it("with waiting positions each segment's loss (by the call's arrival segment) adds up to the loss probability", () => {
    const waiting = simulateReference({ ...scenario(9, 6, 600), waitingPositions: 2, patience: { law: "exponential", mean: 0.5 } });
    const segments = waiting.segments!;
    const byCalls = sum(segments.filter((g) => g.lossProbability).map((g) => g.calls * g.lossProbability!.estimate)) / waiting.calls;
    expect(Math.abs(byCalls - waiting.lossProbability!.estimate)).toBeLessThan(1e-15);
    expect(segments[2].lossProbability).toBeUndefined(); // rate 0: no call offered there
  });
});

describe("coverage of the per-segment intervals", () => {
  it("95 % intervals of each segment's call and time congestion cover the exact periodic values in 100 fixed-seed runs", () => {
    // Each count is Binomial(100, 0.95) for honest intervals; coverageRegion gives the acceptance
    // region an honest engine leaves with probability below 0.002 per count (seven counts: 0.014).
    const runs = 100;
    const { low, high } = coverageRegion(runs);
    const exact = periodicLossSystem({ servers: 10, profile });
    const call = [0, 0, 0, 0];
    const time = [0, 0, 0, 0];
    const covers = (ci: { ciLow: number; ciHigh: number }, value: number) => ci.ciLow <= value && value <= ci.ciHigh;
    for (let run = 0; run < runs; run++) {
      const r = simulateReference(scenario(40_000 + run, 10, 600));
      r.segments!.forEach((g, i) => {
        if (g.callCongestion && covers(g.callCongestion, exact.segments[i].callCongestion)) call[i]++;
        if (covers(g.timeCongestion, exact.segments[i].timeCongestion)) time[i]++;
      });
    }
    const counts = [...[0, 1, 3].map((i) => [`segment ${i + 1} call congestion`, call[i]] as const), ...time.map((c, i) => [`segment ${i + 1} time congestion`, c] as const)];
    for (const [what, count] of counts) {
      expect(count, `${what}: ${count} of ${runs}`).toBeGreaterThanOrEqual(low);
      expect(count, `${what}: ${count} of ${runs}`).toBeLessThanOrEqual(high);
    }
  }, 120_000);

  it("with retrials, 95 % intervals of first-attempt blocking per segment, loss, attempts per call and mean orbit cover the exact periodic retrial chain in 100 fixed-seed runs", () => {
    // The exact values: lib/teletraffic/periodic-retrial.ts, checked against a dense matrix
    // exponential in tests/unit/teletraffic/periodic-retrial.test.ts. Same acceptance region as above
    // (seven counts: an honest engine fails with probability below 0.014).
    const runs = 100;
    const { low, high } = coverageRegion(runs);
    const retrials = { persistence: 0.7, delay: { law: "exponential", mean: 0.5 } } as const;
    const exact = periodicRetrialSystem({ servers: 10, profile, persistence: 0.7, meanRetryDelay: 0.5 });
    const call = [0, 0, 0, 0];
    let loss = 0;
    let attempts = 0;
    let orbit = 0;
    const covers = (ci: { ciLow: number; ciHigh: number } | undefined, value: number) => ci !== undefined && ci.ciLow <= value && value <= ci.ciHigh;
    for (let run = 0; run < runs; run++) {
      const r = simulateReference({ ...scenario(60_000 + run, 10, 600), retrials });
      r.segments!.forEach((g, i) => {
        if (covers(g.callCongestion, exact.segments[i].firstAttemptBlocking)) call[i]++;
      });
      if (covers(r.lossProbability, exact.lossProbability)) loss++;
      if (covers(r.attemptsPerCall, exact.attemptsPerCall)) attempts++;
      if (covers(r.meanRetrying, exact.meanOrbit)) orbit++;
    }
    const counts = [...[0, 1, 3].map((i) => [`segment ${i + 1} first-attempt blocking`, call[i]] as const), ["loss", loss], ["attempts per call", attempts], ["mean orbit", orbit]] as const;
    for (const [what, count] of counts) {
      expect(count, `${what}: ${count} of ${runs}`).toBeGreaterThanOrEqual(low);
      expect(count, `${what}: ${count} of ${runs}`).toBeLessThanOrEqual(high);
    }
  }, 120_000);

  it("with segments long against the holding time the intervals also cover PSA, because PSA is then accurate", () => {
    // The group forgets its state at rate at least 1/h (the coupling of periodic-loss.ts: E[D(t)] <=
    // D(0) e^{-t/h}), so after a rate change the transient lasts a few holding times and occupies
    // O(h/d) of a segment of length d; with d = 1000 h PSA differs from the exact value by 0.2 % of
    // the blocking in the light segment and 0.05 % in the heavy one.
    const long = [{ duration: 1000, rate: 6 }, { duration: 1000, rate: 11 }];
    const input: ScenarioInput = { servers: 10, arrivals: { process: "time-varying", profile: long }, holding: exp1, run: { seed: 17, replications: 10, horizon: 8_000, warmupTime: 50 } };
    const r = simulateReference(input, referencesFor(parseScenario(input)));
    const exact = periodicLossSystem({ servers: 10, profile: long });
    r.segments!.forEach((g, i) => {
      // PSA's bias b must be small against the sampling error: with b <= SE / 4 the 99.9 % check
      // below fails with probability P(|Z + 1/4| > 3.9) < 2e-4 instead of 1e-4 (normal approximation).
      expect(Math.abs(g.psa! - exact.segments[i].callCongestion)).toBeLessThan(0.25 * g.callCongestion!.standardError);
      expect(Math.abs(g.psa! - exact.segments[i].timeCongestion)).toBeLessThan(0.25 * g.timeCongestion.standardError);
      expectAgrees(g.callCongestion!, g.psa!, 10, `segment ${i + 1} call congestion vs PSA`);
      expectAgrees(g.timeCongestion, g.psa!, 10, `segment ${i + 1} time congestion vs PSA`);
    });
  });
});
