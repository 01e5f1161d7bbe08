import { describe, expect, it } from "vitest";
import { exceedsInteractiveLimit } from "../../../lib/analytic-pool/limits";
import { TeletrafficInputError, timeVaryingLoss, timeVaryingWork } from "../../../lib/teletraffic";
import {
  INTERACTIVE_TIME_VARYING_WORK,
  MAX_TIME_VARYING_WORK,
  TIME_VARYING_WORK_MEASURE,
  timeVaryingWorkParts,
} from "../../../lib/teletraffic/time-varying";

// Review finding 11: N = 100 000, 1000 segments of one holding time at 900/1100 erlangs ran 51 s, because every
// Erlang B evaluation walked the recursion to N in logs. The work is now counted in plain recursion steps.
const alternating = (segments: number, duration: number, low: number, high: number) =>
  Array.from({ length: segments }, (_, i) => ({ duration, rate: i % 2 === 0 ? low : high }));

describe("time-varying-loss work estimate (Erlang B steps)", () => {
  it("the review's case: 1000 segments × (8 nodes + 2) evaluations × (2 × 1100 + 932) steps", () => {
    expect(timeVaryingWorkParts(100_000, alternating(1000, 1, 900, 1100), 1)).toEqual({ evaluations: 10_000, stepsPerEvaluation: 3132, peakLoad: 1100, work: 31_320_000 });
    expect(timeVaryingWork(100_000, alternating(1000, 1, 900, 1100), 1)).toBe(31_320_000);
  });
  it("small groups walk N + 1 steps; long segments count 40 holding times; the load is rate × mean holding", () => {
    expect(timeVaryingWorkParts(10, [{ duration: 1000, rate: 5 }], 1)).toMatchObject({ evaluations: 8 * 40 + 2, stepsPerEvaluation: 11 });
    expect(timeVaryingWorkParts(100_000, [{ duration: 2.5, rate: 100 }], 0.5)).toMatchObject({ evaluations: 8 * 5 + 2, peakLoad: 50, stepsPerEvaluation: 1032 });
  });
  it("the per-evaluation bound holds: the plain recursion reaches B < 1e-280 within ⌈2A⌉ + 931 steps (walked here independently)", () => {
    for (const a of [1e-3, 0.5, 3, 40, 1000, 25_000, 100_000]) {
      let b = 1;
      let n = 0;
      while (b >= 1e-280) {
        n += 1;
        b = (a * b) / (n + a * b);
      }
      expect(n).toBeLessThanOrEqual(Math.ceil(2 * a) + 931);
    }
  });
});

describe("time-varying-loss refusal and the analytic pool's limit (one home: time-varying.ts)", () => {
  it("refuses above MAX_TIME_VARYING_WORK at once, naming the size that drives the cost", () => {
    const profile = alternating(1000, 3, 90_000, 110_000);
    let error: unknown;
    try {
      timeVaryingLoss({ servers: 100_000, profile });
    } catch (e) {
      error = e;
    }
    expect(error).toBeInstanceOf(TeletrafficInputError);
    expect((error as TeletrafficInputError).field).toBe("profile");
    expect((error as Error).message).toContain(
      "estimated work 2600026000 Erlang B steps (26000 evaluations over 1000 segments × 100001 steps each, the smaller of N + 1 = 100001 and 2 × peak load 110000 erlangs + 932) exceeds 2000000000",
    );
    expect(MAX_TIME_VARYING_WORK).toBe(2_000_000_000);
  });
  it("accepts a large group at moderate load that the old estimate (segments × nodes × (N + 1) = 2.05e9) refused, and answers 0", () => {
    const profile = alternating(64, 40, 900, 1100);
    expect(timeVaryingWork(100_000, profile, 1)).toBe(64 * 322 * 3132);
    const r = timeVaryingLoss({ servers: 100_000, profile });
    expect(r.segments).toHaveLength(64);
    expect(r.pointwiseCallCongestion).toBe(0);
    expect(r.modifiedLoadCallCongestion).toBe(0);
    expect(r.offeredTraffic).toBeCloseTo(1000, 9);
  });
  it("the pool refuses above 20 × the interactive work with the same estimate and measure, and leaves larger inputs to the schema", () => {
    const pooled = { servers: 100_000, profile: alternating(1000, 1, 9_000, 11_000) }; // 10 000 × 22 932 steps
    expect(timeVaryingWork(pooled.servers, pooled.profile, 1)).toBe(229_320_000);
    expect(exceedsInteractiveLimit("time-varying-loss", pooled)).toEqual({ measure: TIME_VARYING_WORK_MEASURE, size: 229_320_000, max: 20 * INTERACTIVE_TIME_VARYING_WORK });
    expect(TIME_VARYING_WORK_MEASURE).toMatch(/^the estimated work/);
    expect(exceedsInteractiveLimit("time-varying-loss", { servers: 100_000, profile: alternating(1000, 1, 900, 1100) })).toBeNull();
    expect(exceedsInteractiveLimit("time-varying-loss", { servers: 100_000, profile: alternating(1000, 3, 90_000, 110_000) })).toBeNull(); // schema refuses
  });
});
