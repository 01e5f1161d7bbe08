// The per-segment table of `simulate`'s text output (lib/cli/simulation-commands.ts `segmentTable`, printed by
// `simulationTable` for local and remote runs alike), on tiny seeded time-varying runs of a few thousand calls.
import { describe, expect, it } from "vitest";
import { formatNumber } from "../../../lib/cli/command";
import { segmentTable, simulationTable } from "../../../lib/cli/simulation-commands";
import { parseScenario, referencesFor, type ScenarioInput, type SimulationResult } from "../../../lib/simulation/node";
import { periodicLossSystem, periodicRetrialSystem, timeVaryingLoss } from "../../../lib/teletraffic";
import { simulateReference } from "./helpers";

const profile = [
  { duration: 2, rate: 2 },
  { duration: 1, rate: 7 },
  { duration: 1, rate: 0 },
];
const input: ScenarioInput = {
  servers: 5,
  arrivals: { process: "time-varying", profile },
  holding: { law: "exponential", mean: 1 },
  run: { seed: 11, replications: 4, callsPerReplication: 1000 },
};
const run = (i: ScenarioInput) => simulateReference(i, referencesFor(parseScenario(i)));
/** The CLI's number format (6 significant figures), written out here. */
const six = (v: number) => formatNumber(Number(v.toPrecision(6)));
/** Cells of an aligned line: columns are at least two spaces apart, cells hold single spaces only. */
const cells = (line: string) => line.trim().split(/\s{2,}/);

describe("simulate's per-segment table", () => {
  const result = run(input);
  const lines = segmentTable(result);

  it("prints one aligned row per segment with its calls, interval and the exact periodic value, PSA and MOL", () => {
    expect(result.segments).toHaveLength(3);
    const header = lines.findIndex((l) => l.startsWith("time in cycle"));
    expect(cells(lines[header])).toEqual(["time in cycle", "offered (E)", "calls", "call congestion", "95% CI", "time congestion", "exact", "PSA", "MOL"]);
    expect(lines[header + 1]).toMatch(/^[- ]+$/);
    const rows = lines.slice(header + 2);
    expect(rows).toHaveLength(3);
    // Aligned: every line of the table has the header's width.
    for (const l of [lines[header + 1], ...rows]) expect(l.length).toBe(lines[header].length);
    // Independent values: lib/teletraffic's periodic solution and PSA/MOL for the same profile.
    const exact = periodicLossSystem({ servers: 5, profile }).segments;
    const approx = timeVaryingLoss({ servers: 5, profile }).segments;
    const parsed = rows.map(cells);
    expect(parsed.map((r) => r[0])).toEqual(["0 .. 2", "2 .. 3", "3 .. 4"]);
    expect(parsed.map((r) => r[1])).toEqual(["2", "7", "0"]);
    expect(parsed.reduce((a, r) => a + Number(r[2]), 0)).toBe(result.calls);
    parsed.forEach((r, i) => {
      const g = result.segments![i];
      expect(r[6], `segment ${i + 1} exact`).toBe(six(exact[i].callCongestion));
      expect(r[7], `segment ${i + 1} PSA`).toBe(six(approx[i].pointwiseBlocking));
      expect(r[5]).toBe(six(g.timeCongestion.estimate));
      if (g.callCongestion) {
        expect(r[3]).toBe(six(g.callCongestion.estimate));
        expect(r[4]).toBe(`${six(g.callCongestion.ciLow)} .. ${six(g.callCongestion.ciHigh)}`);
      }
    });
    // The empty segment offers no call, so it has no call congestion to estimate.
    expect(parsed[2].slice(2, 5)).toEqual(["0", "-", "no calls"]);
  });

  it("is part of the text output after the cycle table, and absent when the run has no segments", () => {
    const text = simulationTable(result);
    expect(text).toContain(lines.join("\n"));
    expect(text.indexOf("Per profile segment")).toBeGreaterThan(text.indexOf("call congestion"));
    expect(text.indexOf("Per profile segment")).toBeLessThan(text.indexOf("References"));
    const poisson = run({ ...input, arrivals: { process: "poisson", rate: 2.75 } });
    expect(poisson.segments).toBeUndefined();
    expect(segmentTable(poisson)).toEqual([]);
    expect(simulationTable(poisson)).not.toContain("Per profile segment");
  });

  it("says a one-sided bound as such", () => {
    const segments = result.segments!.map((g, i) => (i === 0 ? { ...g, callCongestion: { ...g.callCongestion!, estimate: 0, ciLow: 0, ciHigh: 0.002, upperBoundOnly: true } } : g));
    const row = cells(segmentTable({ ...result, segments } as SimulationResult).find((l) => l.startsWith("0 .. 2"))!);
    expect(row.slice(3, 5)).toEqual(["0", "< 0.002 (one-sided)"]);
  });

  it("with retrials adds the per-segment loss and the periodic retrial chain's first-attempt blocking, and leaves out PSA and MOL (they assume blocked calls cleared)", () => {
    const retrying: ScenarioInput = { ...input, servers: 4, arrivals: { process: "time-varying", profile: profile.slice(0, 2) }, retrials: { persistence: 0.5, delay: { law: "exponential", mean: 0.5 } }, run: { seed: 5, replications: 4, callsPerReplication: 800 } };
    const r = run(retrying);
    const table = segmentTable(r);
    const header = cells(table.find((l) => l.startsWith("time in cycle"))!);
    expect(header).toEqual(["time in cycle", "offered (E)", "calls", "call congestion", "95% CI", "time congestion", "loss", "loss 95% CI", "exact"]);
    const rows = table.slice(table.findIndex((l) => l.startsWith("time in cycle")) + 2).map(cells);
    // Independent value: lib/teletraffic's periodic retrial chain for the same profile.
    const exact = periodicRetrialSystem({ servers: 4, profile: profile.slice(0, 2), persistence: 0.5, meanRetryDelay: 0.5 });
    rows.forEach((row, i) => {
      expect(row[6]).toBe(six(r.segments![i].lossProbability!.estimate));
      expect(row[8]).toBe(six(exact.segments[i].firstAttemptBlocking));
    });
  });
});
