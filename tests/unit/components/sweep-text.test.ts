import { describe, expect, it } from "vitest";
import { dimensioningSentence, parseValueList } from "@/components/sweeps/sweep-text";
import type { DimensioningAnswer } from "@/lib/sweeps";

describe("parseValueList", () => {
  it("reads lists and stepped ranges", () => {
    expect(parseValueList("10, 12.5; 15 20")).toEqual({ values: [10, 12.5, 15, 20] });
    expect(parseValueList("0.1:0.5:0.1")).toEqual({ values: [0.1, 0.2, 0.3, 0.4, 0.5] });
    expect(parseValueList("10:20:2")).toEqual({ values: [10, 12, 14, 16, 18, 20] });
  });
  it("names what is wrong", () => {
    expect(parseValueList("")).toEqual({ error: "Enter at least one value." });
    expect(parseValueList("10, x")).toEqual({ error: '"x" is not a number.' });
    expect(parseValueList("20:10:1")).toEqual({ error: "A range must end at or above where it starts." });
    expect(parseValueList("1:1000:1", 121)).toEqual({ error: "That range has 1000 values; at most 121." });
  });
});

const answer = (simulated: number | null): DimensioningAnswer => ({
  kind: "dimensioning",
  targetBlocking: 0.01,
  measure: "callCongestion",
  confidence: 0.95,
  formula: { method: "Erlang B", servers: 30 },
  simulated: simulated === null ? null : { servers: simulated, estimate: { estimate: 0.006, ciLow: 0.005, ciHigh: 0.008 } },
  difference: simulated === null ? null : simulated - 30,
  probes: [],
  ...(simulated === null ? { unresolved: "no answer within 30 probes" } : {}),
});

describe("dimensioningSentence", () => {
  it("states simulated N against the formula's N", () => {
    expect(dimensioningSentence(answer(33), false)).toMatch(/needs 33 servers by simulation, while Erlang B installs 30 servers .*under-sizes this traffic by 3 servers\.$/);
    expect(dimensioningSentence(answer(29), false)).toMatch(/over-sizes this traffic by 1 server\.$/);
    expect(dimensioningSentence(answer(30), false)).toMatch(/exactly what Erlang B installs 30 servers .*holds\.$/);
    expect(dimensioningSentence(answer(null), false)).toMatch(/^The search stopped without an answer \(no answer within 30 probes\)/);
  });
});
