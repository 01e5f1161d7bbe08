import { describe, expect, it } from "vitest";
import { ScenarioError, parseScenario, scenarioSchema, type ScenarioInput } from "@/lib/simulation";
import {
  apiFieldsToForm,
  arrivalProcesses,
  batchSizeSpecs,
  defaultScenario,
  lawSpecs,
  parseNumberList,
  readScenarioFile,
  scenarioFormErrors,
} from "@/lib/client/scenario-form";
import { diffScenarios } from "@/lib/client/scenario-diff";
import { DEFAULT_TARGET_GOS, erlangBTraffic, parseTarget, verdictFor } from "@/lib/client/verdict";
import { formatPercent, formatPoints } from "@/lib/client/format";
import { sizesSafetyCapacity } from "@/lib/client/safety";

/** Erlang B by the textbook recursion B(n) = A B(n-1) / (n + A B(n-1)), computed here, independent of lib/teletraffic. */
function erlangB(n: number, a: number): number {
  let b = 1;
  for (let k = 1; k <= n; k++) b = (a * b) / (k + a * b);
  return b;
}

describe("scenario editor model", () => {
  it("every arrival process, law and batch-size default is a valid scenario", () => {
    for (const [name, p] of Object.entries(arrivalProcesses)) {
      expect(() => parseScenario({ ...defaultScenario, arrivals: p.make() }), name).not.toThrow();
    }
    for (const [name, spec] of Object.entries(lawSpecs))
      for (const form of spec.forms) expect(() => parseScenario({ ...defaultScenario, holding: form.make(2) }), `${name}/${form.id}`).not.toThrow();
    for (const [name, spec] of Object.entries(batchSizeSpecs))
      expect(() => parseScenario({ ...defaultScenario, arrivals: { process: "batch", rate: 4, batchSize: spec.make() } }), name).not.toThrow();
  });

  it("maps every zod issue to its form field with the API's wording", () => {
    const bad = {
      ...defaultScenario,
      servers: 0,
      arrivals: { process: "mmpp", rates: [1, 2], switching: [[0, -1], [1, 0]] },
      holding: { law: "exponential", mean: -1 },
    } as unknown as ScenarioInput;
    const fields = scenarioFormErrors(bad);
    expect(fields).toMatchObject({
      "scenario.servers": "must be >= 1",
      "scenario.arrivals.switching.0.1": "must be >= 0",
      "scenario.holding.mean": "must be > 0",
    });
    // The same words the API sends: parseScenario's ScenarioError carries every field (form paths).
    try {
      parseScenario(bad);
      expect.unreachable();
    } catch (error) {
      expect(error).toBeInstanceOf(ScenarioError);
      const e = error as ScenarioError;
      expect(e.field).toBe("servers");
      for (const [key, message] of Object.entries(e.fields)) expect(fields[`scenario.${key}`]).toBe(message);
      expect(e.message).toMatch(/^servers: must be >= 1 \(and \d+ more\)$/);
    }
  });

  it("names the discriminator when the process is unknown", () => {
    const fields = scenarioFormErrors({ ...defaultScenario, arrivals: { process: "smoke" } });
    expect(Object.keys(fields)).toEqual(["scenario.arrivals.process"]);
  });

  it("places API field keys (relative, bracketed or prefixed) on the editor's fields", () => {
    expect(apiFieldsToForm({ servers: "a", "scenario.holding.mean": "b", "arrivals.switching[1][0]": "c", name: "d" })).toEqual({
      "scenario.servers": "a",
      "scenario.holding.mean": "b",
      "scenario.arrivals.switching.1.0": "c",
      name: "d",
    });
  });

  it("reads number lists and scenario files, naming what is wrong", () => {
    expect(parseNumberList("1, 2.5 3;4e1")).toEqual([1, 2.5, 3, 40]);
    expect(parseNumberList("1, x")[1]).toBeNaN();
    expect(readScenarioFile("{ nope")).toMatchObject({ ok: false, message: expect.stringMatching(/^The file is not valid JSON/) });
    expect(readScenarioFile("[]")).toMatchObject({ ok: false, message: "The file must hold one scenario object." });
    expect(readScenarioFile(JSON.stringify({ ...defaultScenario, sever: 3 }))).toMatchObject({ ok: false, message: 'scenario: unknown field "sever"' });
    expect(readScenarioFile(JSON.stringify(defaultScenario))).toMatchObject({ ok: true });
    expect(scenarioSchema.safeParse(defaultScenario).success).toBe(true);
  });
});

describe("revision diff", () => {
  it("lists changed, added and removed leaves", () => {
    const a = { servers: 30, arrivals: { process: "poisson", rate: 24 }, run: { seed: 1 } };
    const b = { servers: 32, arrivals: { process: "poisson", rate: 24 }, retrials: { persistence: 0.5 }, run: {} };
    expect(diffScenarios(a, b)).toEqual([
      { path: "retrials.persistence", kind: "added", after: 0.5 },
      { path: "run", kind: "added", after: {} },
      { path: "run.seed", kind: "removed", before: 1 },
      { path: "servers", kind: "changed", before: 30, after: 32 },
    ]);
    expect(diffScenarios({ rates: [1, 2] }, { rates: [1, 3] })).toEqual([{ path: "rates[1]", kind: "changed", before: 2, after: 3 }]);
  });
});

describe("verdict", () => {
  // 24 E on 30 circuits; every analytic figure below comes from the recursion above, none is recalled.
  const traffic = 24;
  const servers = 30;
  const b = erlangB(servers, traffic);
  const references = [{ method: "Erlang B", assumptions: "", exact: false, callCongestion: b, carriedTraffic: traffic * (1 - b) }];
  // Erlang B's sizing for 1 %: the smallest n with B(n, 24) <= 0.01, found by walking the recursion here.
  let sized = 0;
  while (erlangB(sized, traffic) > DEFAULT_TARGET_GOS) sized++;

  it("recovers the offered traffic from the Erlang B reference", () => {
    expect(erlangBTraffic(references)).toBeCloseTo(traffic, 10);
  });

  it("breaks when the whole interval is above the target, with the margin in points", () => {
    const v = verdictFor({ servers, callCongestion: { estimate: 0.05, ciLow: 0.045, ciHigh: 0.055 }, confidence: 0.95, references, target: 0.01 });
    expect(v.kind).toBe("breaks");
    expect(v.margin).toBeCloseTo(0.04, 12);
    expect(v.formulaServers).toBe(sized);
    expect(v.formulaBlocking).toBeCloseTo(b, 12);
    expect(v.sentence).toContain(`at ${sized} circuits`);
    expect(v.sentence).toContain(`missing the ${formatPercent(0.01)} target by ${formatPoints(0.04).replace(/^\+/, "")}`);
  });

  it("holds when the whole interval is at or below the target, and cannot tell when it straddles it", () => {
    expect(verdictFor({ servers, callCongestion: { estimate: 0.004, ciLow: 0.003, ciHigh: 0.01 }, confidence: 0.95, references, target: 0.01 }).kind).toBe("holds");
    const unsure = verdictFor({ servers, callCongestion: { estimate: 0.01, ciLow: 0.008, ciHigh: 0.012 }, confidence: 0.95, references, target: 0.01 });
    expect(unsure.kind).toBe("undecided");
    expect(unsure.sentence).toContain("cannot tell");
  });

  it("reads the target from the address and falls back to the workspace default", () => {
    expect(parseTarget("0.02")).toBe(0.02);
    for (const bad of [null, "", "abc", "0", "1", "-0.1"]) expect(parseTarget(bad)).toBe(DEFAULT_TARGET_GOS);
  });
});

describe("safety caution", () => {
  it("recognises capacity that protects people", () => {
    expect(sizesSafetyCapacity("Ward 4 beds")).toBe(true);
    expect(sizesSafetyCapacity(null, "Emergency line 112 at the county centre")).toBe(true);
    expect(sizesSafetyCapacity("Harbour Road final route")).toBe(false);
  });
});
