import { describe, expect, it } from "vitest";
import seedrandom from "seedrandom";
import { characterise, makeScenario, readMeasurementCsv } from "../../../lib/measurement";
import type { CallRecordSet } from "../../../lib/measurement/records";
import { gammaRenewalPeakedness } from "../../../lib/measurement/scenario";
import { scenarioSchema } from "../../../lib/simulation/scenario";

/** Ten days of calls with renewal interarrivals (Erlang-k, k exponential phases; k = 1 is Poisson) and exponential holding. */
function renewalDays(rate: number, k: number, meanHolding: number, seed: string): CallRecordSet {
  const u = seedrandom.alea(seed);
  const gap = () => {
    let s = 0;
    for (let j = 0; j < k; j++) s -= Math.log(1 - u());
    return (s / (k * rate)) * 1000;
  };
  const starts: number[] = [];
  const durations: number[] = [];
  const t0 = Date.UTC(2026, 0, 12);
  for (let t = t0 + gap(); t < t0 + 10 * 86_400_000; t += gap()) {
    starts.push(t);
    durations.push(-meanHolding * Math.log(1 - u()));
  }
  const n = starts.length;
  return { kind: "call-records", count: n, start: Float64Array.from(starts), offset: new Int16Array(n), duration: Float64Array.from(durations), outcome: new Uint8Array(n), group: new Uint16Array(n), groups: [""], hasOutcome: false, hasGroup: false, offsets: [0] };
}

describe("making a scenario", () => {
  it("Poisson traffic gives a Poisson scenario (|Z − 1| within tolerance)", () => {
    const c = characterise(renewalDays(0.05, 1, 60, "poisson"), { fit: { replicates: 0 } });
    const made = makeScenario(c, { holding: "exponential" });
    expect(made.arrivals.model).toBe("poisson");
    expect(made.scenario.arrivals).toEqual({ process: "poisson", rate: (c.busy.ratePerHour / 60) });
    expect(made.scenario.holding.law).toBe("exponential");
    expect(scenarioSchema.safeParse(made.scenario).success).toBe(true);
  });

  it("smooth traffic (Erlang-4 interarrivals) gives a gamma renewal stream; its cv recovers 1/√4 within 4 se of Z mapped through dZ/dcv", () => {
    const c = characterise(renewalDays(0.05, 4, 60, "smooth"), { fit: { replicates: 0 } });
    const z = c.busy.peakedness!;
    expect(z.value).toBeLessThan(1 - z.poissonTolerance);
    const made = makeScenario(c, { holding: "exponential" });
    expect(made.arrivals.model).toBe("renewal");
    expect(made.arrivals.fitted!).toBeCloseTo(z.value, 8);
    const arrivals = made.scenario.arrivals;
    if (arrivals.process !== "renewal" || arrivals.interarrival.law !== "gamma") throw new Error("expected gamma renewal");
    const m = made.holding.meanMinutes;
    const tau = arrivals.interarrival.mean;
    const slope = (gammaRenewalPeakedness(tau, 0.51, m) - gammaRenewalPeakedness(tau, 0.49, m)) / 0.02;
    // se of Z here: √(2m/T) scaled by Z (the same Gaussian approximation as for Poisson)
    const seZ = z.value * z.standardErrorIfPoisson;
    expect(Math.abs(arrivals.interarrival.cv - 0.5)).toBeLessThan((4 * seZ) / slope);
    expect(scenarioSchema.safeParse(made.scenario).success).toBe(true);
  });

  it("interval counts with a given holding time: exponential holding, Poisson from the dispersion of counts", async () => {
    const u = seedrandom.alea("counts");
    const lines = ["interval,attempts"];
    for (let d = 0; d < 7; d++)
      for (let q = 0; q < 96; q++) {
        // Poisson counts with mean 20 by counting unit-rate exponential gaps in [0, 20)
        let n = 0;
        for (let t = -Math.log(1 - u()); t < 20; t -= Math.log(1 - u())) n++;
        const at = new Date(Date.UTC(2026, 0, 12 + d, 0, q * 15)).toISOString().replace(".000", "");
        lines.push(`${at},${q >= 40 && q < 44 ? n + 20 : n}`);
      }
    const data = await readMeasurementCsv(new TextEncoder().encode(lines.join("\n")), { kind: "interval-counts", intervalStart: "interval", attempts: "attempts", intervalMinutes: 15, meanHoldingSeconds: 120 });
    const c = characterise(data);
    expect(c.busyHour.label).toBe("10:00–11:00");
    expect(c.busy.offeredTraffic).toBeGreaterThan(0);
    const made = makeScenario(c);
    expect(made.holding.law).toBe("exponential (given mean)");
    expect(made.arrivals.measured.quantity).toBe("index of dispersion");
    expect(made.arrivals.model).toBe("poisson");
    expect(made.scenario.holding).toEqual({ law: "exponential", mean: 2 });
  });

  it("interval counts without a holding time cannot make a scenario, and says why", async () => {
    const data = await readMeasurementCsv(new TextEncoder().encode("interval,attempts\n2026-01-12T10:00Z,5\n2026-01-12T10:15Z,6\n2026-01-12T10:30Z,5\n2026-01-12T10:45Z,7\n"), {
      kind: "interval-counts",
      intervalStart: "interval",
      attempts: "attempts",
      intervalMinutes: 15,
    });
    const c = characterise(data);
    expect(c.busyHour.measure).toBe("attempts");
    expect(c.busyHour.singleDay).toBe(true);
    expect(c.notes.join(" ")).toMatch(/One day only/);
    expect(() => makeScenario(c)).toThrow(/give the mean holding time/);
  });

  it("refuses bad options by the schema", () => {
    const c = characterise(renewalDays(0.05, 1, 60, "opts"), { fit: { replicates: 0 } });
    expect(() => makeScenario(c, { targetBlocking: 1.5 })).toThrow(/must be < 1/);
    expect(() => makeScenario(c, { holding: "pareto" as never })).toThrow();
  });
});
