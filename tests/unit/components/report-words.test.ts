// The printable report's words for a scenario and a sweep definition (components/reports/scenario-words.ts).
import { describe, expect, it } from "vitest";
import { parseScenario } from "@/lib/simulation";
import { parseSweepDefinition } from "@/lib/sweeps";
import { lawWords, scenarioWords, storedScenario, sweepDefinitionWords } from "@/components/reports/scenario-words";
import { simulationNotes, stopReasons } from "@/components/reports/run-notes";

const run = { seed: 5, replications: 4, callsPerReplication: 1000, warmupCalls: 100 };
const line = (lines: { label: string; text: string }[], label: string) => lines.find((l) => l.label === label)?.text;

describe("report words", () => {
  it("says every part of a finite-source scenario in words, with the defaults filled in", () => {
    const words = scenarioWords(parseScenario({ servers: 12, arrivals: { process: "finite-source", sources: 30, idleRate: 0.25 }, holding: { law: "exponential", mean: 2 }, run }));
    expect(line(words, "Group under study")).toBe("12 circuits; no waiting positions, so a call that finds every circuit busy is refused");
    expect(line(words, "Arrivals")).toBe("Finite sources: 30 sources, each calling 0.25 times per time unit while idle");
    expect(line(words, "Holding time")).toBe("Exponential: mean 2 time units");
    expect(line(words, "Repeated attempts")).toBe("none: a refused call is lost");
    // confidence 0.95 is the schema's default, so it must appear although the input omitted it.
    expect(line(words, "Run settings")).toBe("4 replications of 1,000 measured calls each, warm-up of 100 calls discarded, 95 % confidence intervals, seed 5");
  });

  it("names the offered traffic, waiting positions, retrials and patience when the scenario has them", () => {
    const words = scenarioWords(
      parseScenario({
        servers: 10,
        waitingPositions: 3,
        patience: { law: "deterministic", value: 0.5 },
        arrivals: { process: "poisson", rate: 8 },
        holding: { law: "erlang", k: 2, mean: 1 },
        retrials: { persistence: 0.6, delay: { law: "exponential", mean: 0.2 }, maxAttempts: 5 },
        run,
      }),
    );
    expect(line(words, "Group under study")).toBe("10 circuits and 3 waiting positions");
    expect(line(words, "Mean offered traffic")).toBe("8 E, before repeated attempts"); // 8 calls per time unit × mean 1
    expect(line(words, "Holding time")).toBe("Erlang-k: stages k 2, mean 1 time units");
    expect(line(words, "Patience in the queue")).toBe("Constant: value 0.5 time units");
    expect(line(words, "Repeated attempts")).toBe("a refused call tries again with probability 0.6 after a pause (Exponential: mean 0.2 time units), at most 5 attempts in all");
  });

  it("describes overflow primaries and a hyperexponential law by its branches", () => {
    const s = parseScenario({ servers: 8, arrivals: { process: "overflow", primaries: [{ traffic: 18, servers: 20 }, { traffic: 9, servers: 10 }] }, holding: { law: "exponential", mean: 1 }, run });
    expect(line(scenarioWords(s), "Arrivals")).toBe("Overflow from primary groups: what 2 primary groups refuse (18 E on 20 circuits; 9 E on 10 circuits)");
    expect(line(scenarioWords(s), "Mean offered traffic")).toBe("27 E offered to the primary groups, before repeated attempts");
    expect(lawWords({ law: "hyperexponential", probabilities: [0.9, 0.1], means: [0.5, 5.5] })).toBe("Hyperexponential: branch probabilities 0.9, 0.1, branch means 0.5, 5.5 time units");
  });

  it("keeps a stored document that no longer validates instead of failing the report", () => {
    const odd = { servers: 0, arrivals: { process: "poisson", rate: 1 }, holding: { law: "exponential", mean: 1 }, waitingPositions: 0, run: { ...run, confidence: 0.9 } };
    expect(() => parseScenario(odd)).toThrow();
    expect(storedScenario(odd as never).servers).toBe(0);
  });

  it("says what a grid varied and what it judged against", () => {
    const words = sweepDefinitionWords(parseSweepDefinition({ kind: "grid", x: { parameter: "offeredTraffic", values: [10, 20, 30] }, y: { parameter: "peakedness", values: [1, 1.5] }, targetBlocking: 0.01 }));
    expect(line(words, "Columns: Offered traffic (E)")).toBe("10, 20, 30");
    expect(line(words, "Rows: Peakedness Z")).toBe("1, 1.5");
    expect(line(words, "Target grade of service")).toBe("1 % call congestion; each group sized by Erlang B");
  });

  it("states why a run stopped and how its intervals were made", () => {
    const notes = simulationNotes({
      confidence: 0.95,
      replications: 8,
      calls: 160000,
      stopReason: "planned",
      callCongestion: { estimate: 0.01, standardError: 0.001, halfWidth: 0.002, ciLow: 0.008, ciHigh: 0.012, method: "" },
      warmupCalls: { mean: 2000, min: 2000, max: 2000 },
    } as never);
    expect(line(notes, "Sample")).toBe(`8 independent replications, 160,000 fresh calls measured in all; stopped because ${stopReasons.planned}`);
    expect(line(notes, "Intervals")).toMatch(/^95 % Student t intervals/);
    expect(line(notes, "Engine")).toBeUndefined();
  });
});
