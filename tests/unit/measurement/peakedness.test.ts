import { describe, expect, it } from "vitest";
import seedrandom from "seedrandom";
import { characterise } from "../../../lib/measurement";
import type { CallRecordSet } from "../../../lib/measurement/records";
import { mmppOfferedMoments } from "../../../lib/teletraffic/peakedness";
import { gammaRenewalPeakedness } from "../../../lib/measurement/scenario";
import {
  exponentialKernelIntegral,
  measuredPeakedness,
  onOffInterarrivalScv,
  onOffPeakedness,
  shapeOfFamily,
  survivalSquareIntegral,
  type HoldingShape,
  windowMeanFactor,
  withinWindowVariance,
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
    // corrected for the window means (exponential holding, m = 60 s, 1 h windows: f = 0.967) and its se:
    // √((2m/T)(1 + 1/A))/f less the share the window means take, between 0.8 and 1 of that
    expect(z.windowFactor).toBeCloseTo(exponentialFactor(60, 3600), 2);
    const plain = Math.sqrt(((2 * 60) / T) * (1 + 1 / z.meanCalls)) / z.windowFactor;
    expect(z.standardErrorIfPoisson / plain).toBeGreaterThan(0.8);
    expect(z.standardErrorIfPoisson / plain).toBeLessThanOrEqual(1);
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

/** 1 − (2m/T)(1 − (m/T)(1 − e^{−T/m})): the window-mean factor for exponential holding, derived independently in the test. */
const exponentialFactor = (m: number, T: number) => 1 - ((2 * m) / T) * (1 - (m / T) * -Math.expm1(-T / m));

describe("window-mean correction of the measured peakedness (M/G/∞ correlation of the calls in progress)", () => {
  const T = 3600;
  it("the factor for exponential holding (quantiles of the law as the sample) matches the closed form; the within-window variance terms match the exponential correlation", () => {
    for (const m of [60, 180, 300, 600]) {
      const n = 200_000;
      const x = Float64Array.from({ length: n }, (_, i) => -m * Math.log(1 - (i + 0.5) / n));
      // the quantile sample's mean and tail differ from the law by O(ln n / n)
      expect(windowMeanFactor(x, T)).toBeCloseTo(exponentialFactor(m, T), 3);
      // within-window variance terms against the exponential correlation e^{−τ/m}, by the midpoint rule here:
      // ⟨ρ²⟩ = (2/T²)∫₀^T (T − τ) e^{−2τ/m} dτ, c(s) = m(2 − e^{−s/m} − e^{−(T−s)/m})/T
      const steps = 20_000;
      let rhoSquare = 0;
      let cSquare = 0;
      for (let k = 0; k < steps; k++) {
        const t = ((k + 0.5) * T) / steps;
        rhoSquare += (T - t) * Math.exp((-2 * t) / m);
        cSquare += ((m * (2 - Math.exp(-t / m) - Math.exp(-(T - t) / m))) / T) ** 2;
      }
      rhoSquare *= 2 / (T * steps);
      cSquare /= steps;
      const cBar = 1 - exponentialFactor(m, T);
      const v = withinWindowVariance(x, T);
      expect(v.gaussian / (2 * rhoSquare)).toBeCloseTo(1, 3);
      expect(v.share).toBeCloseTo((rhoSquare - 2 * cSquare + cBar ** 2) / rhoSquare, 3);
      expect(v.gaussian * T).toBeCloseTo(2 * m * (1 - m / (2 * T) * -Math.expm1((-2 * T) / m)), 0); // → 2m as T/m grows
    }
    expect(exponentialFactor(300, T)).toBeCloseTo(0.8472, 4);
  });
  it("deterministic holding D: the factor equals 1 − (2/T²)∫₀^T (T − τ)(1 − τ/D)⁺ dτ by the trapezoid rule in the test; ⟨ρ²⟩ in closed form", () => {
    for (const D of [100, 1800, 3600, 9000]) {
      const steps = 200_000;
      let integral = 0;
      for (let k = 0; k <= steps; k++) {
        const tau = (k * T) / steps;
        integral += (k === 0 || k === steps ? 0.5 : 1) * (T - tau) * Math.max(0, 1 - tau / D);
      }
      integral *= T / steps;
      expect(windowMeanFactor([D, D, D], T)).toBeCloseTo(1 - (2 / T ** 2) * integral, 6);
      if (D <= T) expect(withinWindowVariance([D, D], T).gaussian).toBeCloseTo((2 * 2 * (D / 3 - D ** 2 / (12 * T))) / T, 9); // (2/T²)∫₀^D (T − τ)(1 − τ/D)² dτ
    }
    expect(windowMeanFactor([], T)).toBe(1);
  });

  /**
   * Independent one-hour windows of an infinite group in steady state: arrivals from −warm (long
   * enough that no earlier call is still in progress, e^{−20}), on-off modulated when `onOff` is given.
   * Returns the sums the characterisation accumulates and each window's uncorrected peakedness.
   */
  function windows(count: number, seed: string, meanHolding: number, rate: number, onOff?: { meanOn: number; meanOff: number }) {
    const u = seedrandom.alea(seed);
    const exp = (mean: number) => -mean * Math.log(1 - u());
    const warm = 20 * meanHolding;
    let integralN = 0;
    let withinSquares = 0;
    const holdingSeconds: number[] = [];
    const perWindow: Array<{ integral: number; within: number }> = [];
    for (let w = 0; w < count; w++) {
      const events: Array<[number, number]> = [];
      let on = onOff ? u() < onOff.meanOn / (onOff.meanOn + onOff.meanOff) : true;
      let switchAt = onOff ? -warm + exp(on ? onOff.meanOn : onOff.meanOff) : Infinity;
      let t = -warm;
      while (t < T) {
        if (!on) {
          t = switchAt;
          on = true;
          switchAt = t + exp(onOff!.meanOn);
          continue;
        }
        const next = t + exp(1 / rate);
        if (next >= switchAt) {
          t = switchAt;
          on = false;
          switchAt = t + exp(onOff!.meanOff);
          continue;
        }
        t = next;
        if (t >= T) break;
        const d = exp(meanHolding);
        if (t + d <= 0) continue;
        if (t >= 0) holdingSeconds.push(d);
        events.push([Math.max(t, 0), 1], [Math.min(t + d, T), -1]);
      }
      events.sort((a, b) => a[0] - b[0]);
      let n = 0;
      let last = 0;
      let s1 = 0;
      let s2 = 0;
      for (const [at, step] of events) {
        s1 += n * (at - last);
        s2 += n * n * (at - last);
        last = at;
        n += step;
      }
      s1 += n * (T - last);
      s2 += n * n * (T - last);
      integralN += s1;
      withinSquares += s2 - (s1 * s1) / T;
      perWindow.push({ integral: s1, within: s2 - (s1 * s1) / T });
    }
    const z = measuredPeakedness({ integralN, withinSquares, observedSeconds: count * T, windowSeconds: T, holdingSeconds })!;
    // standard error of the pooled uncorrected value from the spread of the windows (they are independent)
    const values = perWindow.map((p) => p.within / T / z.meanCalls);
    const mean = values.reduce((s, v) => s + v, 0) / count;
    const sd = Math.sqrt(values.reduce((s, v) => s + (v - mean) ** 2, 0) / (count - 1));
    return { z, seUncorrected: sd / Math.sqrt(count) };
  }

  it("Poisson arrivals, exponential holding (20 erl, m = 300 s, 1 000 hours): Z within the stated tolerance of 1; uncorrected it is the biased 0.847", () => {
    const { z, seUncorrected } = windows(1000, "poisson-windows", 300, 20 / 300);
    const f = exponentialFactor(300, T);
    expect(Math.abs(z.windowFactor - f)).toBeLessThan(0.01); // empirical law of ~240 000 holding times
    expect(Math.abs(z.value - 1)).toBeLessThanOrEqual(z.poissonTolerance);
    expect(Math.abs(z.value - 1)).toBeLessThan((4 * seUncorrected) / z.windowFactor);
    // the bias the correction removes: E[uncorrected] = f, about 10 standard errors below 1 here
    expect(Math.abs(z.uncorrected - f)).toBeLessThan(4 * seUncorrected);
    expect(1 - z.uncorrected).toBeGreaterThan(z.poissonTolerance);
    // the stated standard error against the spread of the windows: the sample sd of 1 000 windows has a relative
    // standard error √((κ − 1)/(4·1000)) ≈ 0.03 (κ the kurtosis of a window's value, about 4), so ±15 % is 5 of them
    const ratio = (z.standardErrorIfPoisson * z.windowFactor) / seUncorrected;
    expect(ratio).toBeGreaterThan(0.85);
    expect(ratio).toBeLessThan(1.15);
  });

  it("on-off arrivals (on 240 s at 0.1/s, off 60 s; m = 180 s; 1 000 hours): the correction moves Z towards the true 1.758 (Kuczura)", () => {
    const [lambdaOn, meanOn, meanOff, m] = [0.1, 240, 60, 180];
    const { z, seUncorrected } = windows(1000, "onoff-windows", m, lambdaOn, { meanOn, meanOff });
    // true Z (Kuczura, BSTJ 52, 1973): 1 + λω/((γ + ω)(γ + ω + μ))
    const [omega, gamma, mu] = [1 / meanOn, 1 / meanOff, 1 / m];
    const trueZ = 1 + (lambdaOn * omega) / ((gamma + omega) * (gamma + omega + mu));
    expect(trueZ).toBeCloseTo(1.758, 3);
    // Expected uncorrected value from the exact covariance of N for this stream:
    // R(τ) = λ̄m e^{−μτ} + K J(τ), K = λ_on² p(1 − p), a = ω + γ,
    // J(τ) = [e^{−μτ}/(2μ) − e^{−aτ}/(a + μ)]/(a − μ) + e^{−μτ}/(2μ(a + μ)) (J(0) = 1/(μ(a + μ))),
    // and E[within-window variance] = R(0) − (2/T²)∫₀^T (T − τ) R(τ) dτ with (2/T²)∫₀^T (T − τ)e^{−cτ} dτ = W(c).
    const p = meanOn / (meanOn + meanOff);
    const a = omega + gamma;
    const [lambdaBar, K] = [lambdaOn * p, lambdaOn ** 2 * p * (1 - p)];
    const W = (c: number) => (2 / T ** 2) * (T / c + Math.expm1(-c * T) / c ** 2);
    const windowPart = lambdaBar * m * W(mu) + K * ((W(mu) / (2 * mu) - W(a) / (a + mu)) / (a - mu) + W(mu) / (2 * mu * (a + mu)));
    const expectedUncorrected = (trueZ * lambdaBar * m - windowPart) / (lambdaBar * m);
    expect(expectedUncorrected).toBeCloseTo(1.572, 3);
    expect(Math.abs(z.uncorrected - expectedUncorrected)).toBeLessThan(4 * seUncorrected);
    // corrected: expected ≈ 1.737, the first-order residual ~1 % of Z
    const expectedCorrected = expectedUncorrected / exponentialFactor(m, T);
    expect(Math.abs(expectedCorrected - trueZ)).toBeLessThan(0.03);
    expect(Math.abs(z.value - expectedCorrected)).toBeLessThan((4 * seUncorrected) / z.windowFactor);
    expect(Math.abs(z.value - trueZ)).toBeLessThan(Math.abs(z.uncorrected - trueZ));
    expect(z.value - 1).toBeGreaterThan(z.poissonTolerance);
  });
});
