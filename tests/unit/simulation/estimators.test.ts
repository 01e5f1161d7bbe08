import { describe, expect, it } from "vitest";
import tQuantile from "@stdlib/stats-base-dists-t-quantile";
import { mser5, ratioInterval, Random } from "../../../lib/simulation";

describe("ratio estimator (Cochran 1977, ch. 6; Law 2015, ch. 9)", () => {
  it("with equal denominators it is the t interval on the per-replication ratios", () => {
    const y = [12, 15, 9, 14, 11, 13];
    const x = [100, 100, 100, 100, 100, 100];
    const ratios = y.map((v) => v / 100);
    const mean = ratios.reduce((a, b) => a + b, 0) / ratios.length;
    const sd = Math.sqrt(ratios.reduce((s, r) => s + (r - mean) ** 2, 0) / (ratios.length - 1));
    const ci = ratioInterval(y, x, 0.95);
    expect(ci.estimate).toBeCloseTo(mean, 14);
    expect(ci.standardError).toBeCloseTo(sd / Math.sqrt(6), 14);
    expect(ci.halfWidth).toBeCloseTo(tQuantile(0.975, 5) * (sd / Math.sqrt(6)), 14);
  });

  it("with unequal denominators it is sum(y)/sum(x), not the mean of ratios, with the delta-method SE", () => {
    const y = [1, 30];
    const x = [10, 100];
    const ci = ratioInterval(y, x, 0.9);
    expect(ci.estimate).toBeCloseTo(31 / 110, 14);
    const r = 31 / 110;
    const se = Math.sqrt(((1 - r * 10) ** 2 + (30 - r * 100) ** 2) / 2) / 55;
    expect(ci.standardError).toBeCloseTo(se, 14);
  });
});

describe("MSER-5 truncation (White 1997; Franklin & White 2008)", () => {
  it("removes an initial transient and keeps most of a stationary series", () => {
    const rng = new Random(5, 0, 0);
    const noise = () => rng.normal();
    const transient = Array.from({ length: 5_000 }, (_, i) => 20 * Math.exp(-i / 150) + noise());
    const d = mser5(transient);
    // The bias 20 e^(-i/150) falls below 0.05 sd after i = 150 ln 400 ~ 900.
    expect(d).toBeGreaterThan(300);
    expect(d).toBeLessThan(1_500);
    const stationary = Array.from({ length: 5_000 }, noise);
    expect(mser5(stationary)).toBeLessThan(1_000);
  });

  it("is a multiple of 5 and never beyond half the series", () => {
    const rising = Array.from({ length: 1_000 }, (_, i) => i);
    const d = mser5(rising);
    expect(d % 5).toBe(0);
    expect(d).toBeLessThanOrEqual(500);
  });
});
