import { readFileSync } from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { mean as ssMean } from "simple-statistics";
import { characterise, makeScenario, readMeasurementCsv, type CallRecordSet } from "../../../lib/measurement";
import { DEMO_CSV_PATH, DEMO_TRAFFIC, demoCsv, demoLognormal } from "../../../lib/measurement/demo";
import { FAMILIES } from "../../../lib/measurement/laws";
import { onOffPeakedness, shapeOfFamily } from "../../../lib/measurement/peakedness";
import { scenarioSchema } from "../../../lib/simulation/scenario";
import { erlangB } from "../../../lib/teletraffic";

/*
 * The demo file is drawn from known parameters (lib/measurement/demo.ts). Every bound below is
 * 4 standard errors of the estimator at this sample size (two-sided normal tail 6e-5), the
 * standard error derived in the comment beside it. The file is fixed (seeded), so the checks
 * repeat exactly.
 */
const csvText = readFileSync(path.resolve(__dirname, "../../..", DEMO_CSV_PATH), "utf8");
const mapping = { kind: "call-records", start: "call_start", duration: "duration_s", outcome: "outcome", group: "route" } as const;

describe("demo call-record file", async () => {
  const data = (await readMeasurementCsv(new TextEncoder().encode(csvText), mapping)) as CallRecordSet;
  const c = characterise(data, { fit: { replicates: 49 } });
  const answeredShare = DEMO_TRAFFIC.outcomes.answered;
  const { onRatePerMinute: lambdaOn, meanOnMinutes, meanOffMinutes } = DEMO_TRAFFIC.onOff;
  const a = 1 / meanOnMinutes + 1 / meanOffMinutes; // per minute
  const p = meanOnMinutes / (meanOnMinutes + meanOffMinutes);

  it("is what the seeded generator writes, and stays under 1 MB", () => {
    expect(csvText).toBe(demoCsv());
    expect(csvText.length).toBeLessThan(1024 * 1024);
  });

  it("finds the busy hour 10:00–11:00 on all ten days", () => {
    expect(c.busyHour.label).toBe("10:00–11:00");
    expect(c.busyHour.days).toHaveLength(DEMO_TRAFFIC.days);
    expect(c.period.days).toBe(DEMO_TRAFFIC.days);
  });

  it("recovers the daily profile: each hour's mean rate within 4 se (Poisson: se = √(λ·days)/days per hour)", () => {
    for (let h = 0; h < 24; h++) {
      const rate = (c.profile.ratePerHour.slice(h * 4, h * 4 + 4).reduce((s, r) => s + r, 0) / 4);
      const lambda = DEMO_TRAFFIC.hourlyRate[h];
      // busy hour (on-off): Var N(T) = λ̄T + 2K[T/a − (1 − e^{−aT})/a²], K = λ_on² p(1 − p) (covariance density of the two-state modulation)
      const variance = h === DEMO_TRAFFIC.busyHourStart ? lambda + 2 * lambdaOn ** 2 * p * (1 - p) * (60 / a - -Math.expm1(-a * 60) / a ** 2) : lambda;
      expect(Math.abs(rate - lambda), `hour ${h}`).toBeLessThan((4 * Math.sqrt(variance * DEMO_TRAFFIC.days)) / DEMO_TRAFFIC.days);
    }
  });

  it("recovers the holding law: lognormal ranks first; mean within 4·m·cv/√n; μ̂, σ̂ within 4σ/√n, 4σ/√(2n)", () => {
    const h = c.holding!;
    const { mu, sigma } = demoLognormal();
    expect(h.fits[0].family).toBe("lognormal");
    expect(h.resolution).toBe(0.1);
    expect(Math.abs(c.meanHoldingSeconds! - DEMO_TRAFFIC.holding.meanSeconds)).toBeLessThan((4 * DEMO_TRAFFIC.holding.meanSeconds * DEMO_TRAFFIC.holding.cv) / Math.sqrt(h.n));
    const fit = h.fits[0].parameters;
    // rounding to 0.1 s moves ln x by at most 0.05/x: negligible against σ/√n for x ≳ 1 s
    expect(Math.abs(fit.mu - mu)).toBeLessThan((4 * sigma) / Math.sqrt(h.n));
    expect(Math.abs(fit.sigma - sigma)).toBeLessThan((4 * sigma) / Math.sqrt(2 * h.n));
    expect(h.fits[0].ksPValue!).toBeGreaterThan(0.01);
    expect(h.fits.find((f) => f.family === "exponential")!.ksPValue).toBe(1 / 50);
  });

  it("recovers the busy-hour arrival rate (150/h) within 4 se of the on-off count variance", () => {
    const lambda = 150;
    const variance = lambda + 2 * lambdaOn ** 2 * p * (1 - p) * (60 / a - -Math.expm1(-a * 60) / a ** 2);
    expect(Math.abs(c.busy.ratePerHour - lambda)).toBeLessThan((4 * Math.sqrt(variance * DEMO_TRAFFIC.days)) / DEMO_TRAFFIC.days);
  });

  it("recovers the interarrival scv 1 + 2λ_on ω/a² = 3.5 (Kuczura 1973) within 4 plug-in delta-method se", () => {
    // the gaps, recomputed here: consecutive attempts inside each day's 10:00–11:00 (UTC+1)
    const gaps: number[] = [];
    for (let d = 0; d < DEMO_TRAFFIC.days; d++) {
      const w0 = Date.parse(`${DEMO_TRAFFIC.firstDay}T10:00:00+01:00`) + d * 86_400_000;
      const inWindow = Array.from(data.start).filter((t) => t >= w0 && t < w0 + 3_600_000);
      for (let i = 1; i < inWindow.length; i++) gaps.push((inWindow[i] - inWindow[i - 1]) / 1000);
    }
    expect(gaps.length).toBe(c.busy.interarrivals);
    const m = ssMean(gaps);
    const s2 = gaps.reduce((s, g) => s + (g - m) ** 2, 0) / gaps.length;
    // influence function of c² = σ²/μ²: ((x − μ)² − σ²)/μ² − 2σ²(x − μ)/μ³
    const influence = gaps.map((g) => ((g - m) ** 2 - s2) / m ** 2 - (2 * s2 * (g - m)) / m ** 3);
    const se = Math.sqrt(influence.reduce((s, v) => s + v * v, 0) / gaps.length / gaps.length);
    const expected = 1 + (2 * lambdaOn * (1 / meanOnMinutes)) / a ** 2;
    expect(expected).toBe(3.5);
    expect(Math.abs(c.busy.interarrivalScv! - expected)).toBeLessThan(4 * se);
  });

  it("recovers the peakedness of the answered calls: 1 + q(Z − 1) for thinning with q = 0.97, within 4 se", () => {
    const { mu, sigma } = demoLognormal();
    const holdingMinutes = shapeOfFamily("lognormal", { mu: mu - Math.log(60), sigma });
    const z = onOffPeakedness({ onRate: lambdaOn, meanOn: meanOnMinutes, meanOff: meanOffMinutes }, holdingMinutes);
    const expected = 1 + answeredShare * (z - 1);
    // se: Gaussian approximation var(Ẑ) ≈ 4 Z² ∫₀^∞ r(t)² dt / T, with r the autocorrelation of the
    // Poisson part, r(t) = (1/m) ∫_t^∞ S(u) du (M/G/∞); the on-off part decorrelates faster (rate a = 2/min
    // against 1/m = 0.4/min). ∫ r² computed on a grid to 30 mean holding times.
    const mSec = DEMO_TRAFFIC.holding.meanSeconds;
    const dt = 1;
    let tail = 0;
    let r2 = 0;
    for (let t = 30 * mSec; t >= 0; t -= dt) {
      tail += FAMILIES.lognormal.survival({ mu, sigma }, t) * dt;
      r2 += (tail / mSec) ** 2 * dt;
    }
    const se = Math.sqrt((4 * expected ** 2 * r2) / (DEMO_TRAFFIC.days * 3600));
    expect(Math.abs(c.busy.peakedness!.value - expected)).toBeLessThan(4 * se);
    expect(c.busy.peakedness!.value - 1).toBeGreaterThan(c.busy.peakedness!.poissonTolerance); // clearly not Poisson
  });

  it("recovers the index of dispersion of counts in 150 s windows: 1 + 2λ_on(1 − p)[1/a − (1 − e^{−aτ})/(a²τ)], within 4 se ≈ 4 I √(2/(windows − days))", () => {
    const d = c.busy.dispersion!;
    const tau = d.windowSeconds / 60;
    const expected = 1 + 2 * lambdaOn * (1 - p) * (1 / a - -Math.expm1(-a * tau) / (a * a * tau));
    expect(Math.abs(d.value - expected)).toBeLessThan(4 * expected * Math.sqrt(2 / (d.windows - DEMO_TRAFFIC.days)));
  });

  it("makes a busy-hour scenario: on-off matched to the measured peakedness and scv, valid for the engine, sized by Erlang B", () => {
    const made = makeScenario(c);
    expect(scenarioSchema.safeParse(made.scenario).success).toBe(true);
    expect(made.scenario.arrivals.process).toBe("on-off");
    expect(made.arrivals.fitted!).toBeCloseTo(c.busy.peakedness!.value, 6);
    expect(made.arrivals.interarrivalScv!.fitted).toBeCloseTo(c.busy.interarrivalScv!, 6);
    expect(made.scenario.holding.law).toBe("lognormal");
    const n = made.scenario.servers;
    expect(erlangB(n, made.offeredTraffic)).toBeLessThanOrEqual(0.01);
    expect(erlangB(n - 1, made.offeredTraffic)).toBeGreaterThan(0.01);
  });

  it("makes a daily-profile scenario with 96 quarter-hour segments and an empirical-law variant", () => {
    const day = makeScenario(c, { source: "daily-profile" });
    expect(day.scenario.arrivals.process).toBe("time-varying");
    if (day.scenario.arrivals.process === "time-varying") expect(day.scenario.arrivals.profile).toHaveLength(96);
    const empirical = makeScenario(c, { holding: "empirical" });
    expect(empirical.scenario.holding.law).toBe("empirical");
    expect(scenarioSchema.safeParse(empirical.scenario).success).toBe(true);
  });
});
