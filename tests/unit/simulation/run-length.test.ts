// Issue #11, section 2: run-length planning (lib/simulation/run-length.ts) and the `plan` command.
import { mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { CliUsageError } from "../../../lib/cli/command";
import { simulationCommands } from "../../../lib/cli/simulation-commands";
import { erlangTimeCongestionVariance, planRunLength, planRunLengthInSlices } from "../../../lib/simulation/run-length";
import { SimulationCancelledError } from "../../../lib/simulation/replication";
import { parseScenario, type ScenarioInput } from "../../../lib/simulation/node";
import { erlangB } from "../../../lib/teletraffic";
import { simulate, simulateReference } from "./helpers";

const mm = (servers: number, rate: number, run: object): ScenarioInput => ({ servers, arrivals: { process: "poisson", rate }, holding: { law: "exponential", mean: 1 }, run: { seed: 9, replications: 10, ...run } as ScenarioInput["run"] });

describe("asymptotic variance of the Erlang model (birth-death formula)", () => {
  it("N = 1: the two-state chain's occupation-time variance 2 lambda mu / (lambda + mu)^3 (Karlin & Taylor, A First Course in Stochastic Processes, 1975)", () => {
    for (const [lambda, mu] of [[0.5, 1], [3, 2], [10, 1]]) {
      const { blocking, variance } = erlangTimeCongestionVariance(1, lambda, 1 / mu);
      expect(blocking).toBeCloseTo(lambda / (lambda + mu), 14);
      expect(variance).toBeCloseTo((2 * lambda * mu) / (lambda + mu) ** 3, 14);
    }
  });

  it("N = 30: the stationary law is Erlang B's, and the time-congestion variance matches 40 simulated replications", () => {
    const { blocking, variance } = erlangTimeCongestionVariance(30, 20, 1);
    expect(blocking).toBeCloseTo(erlangB(30, 20), 14);
    // Replications of T = 20 000 / 20 = 1000 time units: each time-congestion estimate has variance
    // about sigma^2 / T. The sample variance over 40 replications is within a factor [0.5, 1.8] of
    // its expectation at 99.9 % (chi-square on 39 degrees of freedom: 19.0 / 39 and 70.7 / 39).
    const r = simulateReference(mm(30, 20, { replications: 40, callsPerReplication: 20_000, warmupCalls: 1_000 }));
    const values = r.perReplication.timeCongestion;
    const mean = values.reduce((a, b) => a + b, 0) / values.length;
    const sampleVariance = values.reduce((s, v) => s + (v - mean) ** 2, 0) / (values.length - 1);
    const expected = variance / (20_000 / 20);
    expect(sampleVariance / expected).toBeGreaterThan(0.5);
    expect(sampleVariance / expected).toBeLessThan(1.8);
  });
});

describe("planRunLength", () => {
  it("Erlang model: n = z^2 v / (r B)^2 calls from the formula, split over the scenario's replications", () => {
    const s = parseScenario(mm(30, 20, { callsPerReplication: 1_000, warmupCalls: 100 }));
    const plan = planRunLength(s, { relativeHalfWidth: 0.05 });
    const { blocking, variance } = erlangTimeCongestionVariance(30, 20, 1);
    const z = 2.2621571627409915; // t(0.975, 9)
    expect(plan.calls).toBe(Math.ceil((z * z * variance * 20) / (0.05 * blocking) ** 2));
    expect(plan.callsPerReplication).toBe(Math.ceil(plan.calls / 10));
    expect(plan.method).toMatch(/birth-death/);
    expect(plan.seconds).toBeGreaterThan(0);
    // Halving the half-width needs four times the calls.
    expect(planRunLength(s, { relativeHalfWidth: 0.025 }).calls / plan.calls).toBeCloseTo(4, 2);
  });

  it("elsewhere a pilot measures the variance; the same scenario gives the same plan (pure)", () => {
    const s = parseScenario({ servers: 10, arrivals: { process: "on-off", onRate: 14, meanOn: 1, meanOff: 1 }, holding: { law: "exponential", mean: 1 }, run: { seed: 2, replications: 10, callsPerReplication: 1_000 } });
    const a = planRunLength(s, { relativeHalfWidth: 0.05 });
    expect(a.method).toMatch(/^pilot of 10 x/);
    expect(a.calls).toBeGreaterThan(1_000);
    expect(planRunLength(s, { relativeHalfWidth: 0.05 })).toEqual(a);
  });

  it("a pilot that sees no blocking gives a lower bound", () => {
    const s = parseScenario({ ...mm(60, 5, { callsPerReplication: 1_000 }), holding: { law: "lognormal", mean: 1, cv: 1 } });
    const plan = planRunLength(s, { relativeHalfWidth: 0.1 });
    expect(plan.lowerBound).toBe(true);
    expect(plan.method).toMatch(/saw no blocking/);
  });
});

describe("a planned run is long enough for the engine's own warnings", () => {
  // The field-crew example (tests' copy of lib/simulation/examples/field-crew-radio.json): finite
  // sources with a long relaxation time and lognormal holding; 5 % needs only ~2 600 calls per
  // replication, fewer than 100 relaxation times and too few draws to see the law's tail.
  const example = JSON.parse(readFileSync(path.join(__dirname, "../../../lib/simulation/examples/field-crew-radio.json"), "utf8")) as ScenarioInput;

  it("lengthens the replications and says why; a run at the planned length carries neither run-too-short nor heavy-tail", async () => {
    const s = parseScenario(example);
    const plan = planRunLength(s, { relativeHalfWidth: 0.05 });
    expect(plan.lengthened).toMatch(/^each replication needs at least \d+ calls for .*; the precision alone needs \d+ in all$/);
    expect(plan.calls).toBe(plan.callsPerReplication * plan.replications);
    for (const seed of [1, 2, 3]) {
      const result = await simulate({ ...example, run: { ...example.run, seed, replications: plan.replications, callsPerReplication: plan.callsPerReplication } });
      expect(result.warnings.map((w) => w.code)).not.toContain("run-too-short");
      expect(result.warnings.map((w) => w.code)).not.toContain("heavy-tail");
    }
    // Without the floor (the precision's own length) the same runs are warned about: the floor is needed.
    const short = Math.ceil(Number(plan.lengthened!.match(/needs (\d+) in all$/)![1]) / plan.replications);
    const warned = await simulate({ ...example, run: { ...example.run, seed: 1, replications: plan.replications, callsPerReplication: short } });
    expect(warned.warnings.map((w) => w.code)).toEqual(expect.arrayContaining(["run-too-short", "heavy-tail"]));
  });

  it("leaves a plan alone when the precision already needs long replications", () => {
    const plan = planRunLength(parseScenario(mm(30, 20, { callsPerReplication: 1_000 })), { relativeHalfWidth: 0.05 });
    expect(plan.lengthened).toBeUndefined();
  });
});

describe("planRunLengthInSlices (the editor's planner, a pilot in slices)", () => {
  const onOff = parseScenario({ servers: 10, arrivals: { process: "on-off", onRate: 14, meanOn: 1, meanOff: 1 }, holding: { law: "exponential", mean: 1 }, run: { seed: 2, replications: 10, callsPerReplication: 1_000 } });
  const pause = () => new Promise<void>((resolve) => setTimeout(resolve, 0));

  it("gives the same plan as planRunLength, pausing between slices", async () => {
    let pauses = 0;
    const plan = await planRunLengthInSlices(onOff, { relativeHalfWidth: 0.05 }, { pause: () => (pauses++, pause()), sliceEvents: 4096 });
    expect(plan).toEqual(planRunLength(onOff, { relativeHalfWidth: 0.05 }));
    expect(pauses).toBeGreaterThan(10);
    // The Erlang model needs no pilot: the closed form, no pause.
    const erlang = parseScenario(mm(30, 20, { callsPerReplication: 1_000 }));
    let erlangPauses = 0;
    expect(await planRunLengthInSlices(erlang, { relativeHalfWidth: 0.05 }, { pause: () => (erlangPauses++, pause()) })).toEqual(planRunLength(erlang, { relativeHalfWidth: 0.05 }));
    expect(erlangPauses).toBe(0);
  });

  it("stops between slices when its signal is aborted", async () => {
    const controller = new AbortController();
    let pauses = 0;
    const planning = planRunLengthInSlices(onOff, { relativeHalfWidth: 0.05 }, { pause: () => (++pauses === 3 && controller.abort(), pause()), signal: controller.signal, sliceEvents: 4096 });
    await expect(planning).rejects.toBeInstanceOf(SimulationCancelledError);
    expect(pauses).toBe(3);
  });
});

describe("npm run cli -- plan", () => {
  const plan = simulationCommands.find((c) => c.name === "plan")!;
  const dir = mkdtempSync(path.join(tmpdir(), "spillway-plan-"));
  const file = path.join(dir, "mm.json");
  writeFileSync(file, JSON.stringify(mm(30, 20, { callsPerReplication: 1_000 })));

  it("prints about N calls and T seconds, and the same as JSON", async () => {
    const out = await plan.run([file, "--precision", "0.05"]);
    expect(out.table).toMatch(/about \d+ calls \(\d+ per replication x 10\), about [\d.]+ s on 1 thread/);
    expect(out.json).toMatchObject({ relativeHalfWidth: 0.05, replications: 10, lowerBound: false });
  });

  it("names the flag when the precision is missing or out of range", async () => {
    await expect(plan.run([file])).rejects.toThrow(new CliUsageError("--precision: required when the scenario has no run.precision; usage: plan <scenario.json> [--precision R] [--threads N] [--json]"));
    await expect(plan.run([file, "--precision", "1.5"])).rejects.toThrow(/^--precision: must be a number between 0 and 1/);
  });
});
