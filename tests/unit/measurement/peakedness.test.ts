import { describe, expect, it } from "vitest";
import seedrandom from "seedrandom";
import { characterise } from "../../../lib/measurement";
import type { CallRecordSet } from "../../../lib/measurement/records";
import { mmppOfferedMoments } from "../../../lib/teletraffic/peakedness";
import { gammaRenewalPeakedness } from "../../../lib/measurement/scenario";
import {
  exponentialKernelIntegral,
  onOffInterarrivalScv,
  onOffPeakedness,
  shapeOfFamily,
  survivalSquareIntegral,
  type HoldingShape,
} from "../../../lib/measurement/peakedness";

describe("peakedness of streams on an infinite group", () => {
  const m = 3;
  const exp = shapeOfFamily("exponential", { mean: m });
  it("the kernel integral I(a) is 1/(μ(a + μ)) for exponential holding and m² as a → 0 (closed forms)", () => {
    // relative error from the piecewise-linear survival on 2000 equal-probability nodes, O(1/N²) in the body, more in the last tail cells
    for (const a of [1e-3, 0.2, 1, 30]) expect(Math.abs(exponentialKernelIntegral(exp, a) * (1 / m) * (a + 1 / m) - 1)).toBeLessThan(2e-4);
    expect(survivalSquareIntegral(exp)).toBeCloseTo(m / 2, 5);
  });
  it("deterministic holding D: I(a) = 2 (D/a − (1 − e^{−aD})/a²), computed in the test", () => {
    const D = 2;
    // S = 1 on 200 cells up to D, then a drop to 0 within 1e-12 D (Simpson's error on each cell ~ (aD/200)⁴)
    const x = Float64Array.from({ length: 202 }, (_, i) => (i <= 200 ? (D * i) / 200 : D * (1 + 1e-12)));
    const shape: HoldingShape = { mean: D, x, s: Float64Array.from(x, (_, i) => (i <= 200 ? 1 : 0)) };
    for (const a of [0.01, 0.5, 4]) expect(exponentialKernelIntegral(shape, a)).toBeCloseTo(2 * (D / a - -Math.expm1(-a * D) / (a * a)), 9);
  });
  it("on-off with exponential holding matches Kuczura's Z = 1 + λω/((γ+ω)(γ+ω+μ)) (BSTJ 52, 1973)", () => {
    const s = { onRate: 7, meanOn: 0.8, meanOff: 2.5 };
    const [w, g, mu] = [1 / s.meanOn, 1 / s.meanOff, 1 / m];
    expect(onOffPeakedness(s, exp)).toBeCloseTo(1 + (7 * w) / ((g + w) * (g + w + mu)), 4);
    expect(onOffInterarrivalScv(s)).toBeCloseTo(1 + (2 * 7 * w) / (g + w) ** 2, 12);
  });
  it("on-off with exponential holding matches lib/teletraffic's MMPP moments (Heffes 1980 moment equations, an independent method)", () => {
    const s = { onRate: 4, meanOn: 1.7, meanOff: 0.6 };
    const { mean, variance } = mmppOfferedMoments([s.onRate, 0], [[0, 1 / s.meanOn], [1 / s.meanOff, 0]], m);
    expect(onOffPeakedness(s, exp)).toBeCloseTo(variance / mean, 4);
  });
  it("gamma renewal (lib/teletraffic renewalPeakedness): cv = 1 is Poisson (Z = 1); cv → 0 tends to the deterministic 1/(1 − e^{−1/A}) − A", () => {
    expect(gammaRenewalPeakedness(0.25, 1, m)).toBeCloseTo(1, 12);
    const A = m / 0.25;
    expect(gammaRenewalPeakedness(0.25, 1e-4, m)).toBeCloseTo(1 / (1 - Math.exp(-1 / A)) - A, 6);
    expect(gammaRenewalPeakedness(0.25, 0.5, m)).toBeLessThan(1);
    expect(gammaRenewalPeakedness(0.25, 2, m)).toBeGreaterThan(1);
  });
});

/** Ten days of Poisson calls (rate λ all day) with exponential holding, built without the CSV layer. */
function poissonDays(rate: number, meanHolding: number, seed: string): CallRecordSet {
  const u = seedrandom.alea(seed);
  const starts: number[] = [];
  const durations: number[] = [];
  const t0 = Date.UTC(2026, 0, 12);
  for (let t = t0 - Math.log(1 - u()) / rate * 1000; t < t0 + 10 * 86_400_000; t += (-Math.log(1 - u()) / rate) * 1000) {
    starts.push(t);
    durations.push(-meanHolding * Math.log(1 - u()));
  }
  const n = starts.length;
  return {
    kind: "call-records",
    count: n,
    start: Float64Array.from(starts),
    offset: new Int16Array(n),
    duration: Float64Array.from(durations),
    outcome: new Uint8Array(n),
    group: new Uint16Array(n),
    groups: [""],
    hasOutcome: false,
    hasGroup: false,
    offsets: [0],
  };
}

describe("measured busy-hour statistics of M/M/∞ traffic (λ = 0.05/s, m = 60 s, 10 days)", () => {
  const c = characterise(poissonDays(0.05, 60, "mm-inf"), { fit: { replicates: 0 } });
  const T = 10 * 3600;
  it("peakedness ≈ 1 within 4 standard errors, se = √(2m/T) (Gaussian approximation of the time-averaged squared deviation, exponential correlation e^{−t/m})", () => {
    const z = c.busy.peakedness!;
    expect(z.observedHours).toBe(10);
    expect(z.standardErrorIfPoisson).toBeCloseTo(Math.sqrt((2 * 60) / T), 3);
    expect(Math.abs(z.value - 1)).toBeLessThan(4 * z.standardErrorIfPoisson);
    // mean calls in progress = A = 3 erlangs; its time average has variance ≈ 2 A m / T
    expect(Math.abs(z.meanCalls - 3)).toBeLessThan(4 * Math.sqrt((2 * 3 * 60) / T));
  });
  it("index of dispersion ≈ 1 within 4 se, se = √(2/(windows − days)) (variance of a sample variance of normal counts)", () => {
    const d = c.busy.dispersion!;
    expect(d.windowSeconds).toBe(60);
    expect(Math.abs(d.value - 1)).toBeLessThan(4 * d.standardErrorIfPoisson);
  });
  it("interarrival scv ≈ 1 within 4 se, se = 2/√n (delta method: E[(x² − 4x + 2)²] = 4 for the unit exponential)", () => {
    expect(Math.abs(c.busy.interarrivalScv! - 1)).toBeLessThan((4 * 2) / Math.sqrt(c.busy.interarrivals));
  });
  it("busy-hour rate 180/h within 4 Poisson se √(λT)/T", () => {
    expect(Math.abs(c.busy.ratePerHour - 180)).toBeLessThan((4 * Math.sqrt(180 * 10)) / 10);
  });
});
