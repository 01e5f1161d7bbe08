// The canonical reduction and the precision planner (lib/simulation/aggregate.ts, plan.ts): the same
// scenario and seed must give bit-identical results however the chunks are scheduled.
import { describe, expect, it } from "vitest";
import {
  aggregateReplications,
  chunkRange,
  decideNext,
  mergeAggregates,
  parseScenario,
  planRun,
  PRECISION_MIN_REPLICATIONS,
  runReplication,
  type PartialAggregate,
  type ScenarioInput,
} from "../../../lib/simulation/node";
import { finishRun, InlineRunner, runChunk, runScenario } from "../../../lib/simulation/node";
import { referencesFor } from "../../../lib/simulation";

const base: ScenarioInput = {
  servers: 10,
  arrivals: { process: "poisson", rate: 8 },
  holding: { law: "exponential", mean: 1 },
  run: { seed: 21, replications: 7, callsPerReplication: 4_000, chunkReplications: 3 },
};

describe("chunked aggregate", () => {
  it("chunks run in any order by separate runners fold to exactly the CLI's result", async () => {
    const s = parseScenario(base);
    const plan = planRun(s);
    expect(plan.chunkReplications).toBe(3);
    expect([0, 1, 2].map((c) => chunkRange(plan, c))).toEqual([
      { firstReplication: 0, replications: 3 },
      { firstReplication: 3, replications: 3 },
      { firstReplication: 6, replications: 1 },
    ]);
    const parts = new Map<number, PartialAggregate>();
    for (const chunk of [2, 0, 1]) parts.set(chunk, await runChunk(s, plan, chunk, { runner: new InlineRunner(), key: `k${chunk}` }));
    // Stored chunk results go through JSON (PostgreSQL jsonb): the fold must not care.
    const stored = [0, 1, 2].map((c) => JSON.parse(JSON.stringify(parts.get(c))) as PartialAggregate);
    const fromChunks = finishRun(s, stored, referencesFor(s));
    const cli = await runScenario(s, { threads: 2 });
    expect(JSON.stringify(fromChunks)).toBe(JSON.stringify(cli));
    expect(cli.replications).toBe(7);
  }, 60_000);

  it("a chunk folds replications in index order whatever order they arrive in", () => {
    const s = parseScenario(base);
    const stats = [0, 1, 2].map((i) => runReplication(s, i));
    const inOrder = aggregateReplications(stats, s.servers);
    const shuffled = aggregateReplications([stats[2], stats[0], stats[1]], s.servers);
    expect(JSON.stringify(shuffled)).toBe(JSON.stringify(inOrder));
  });

  it("refuses to merge chunks that leave a gap or disagree on the group size", () => {
    const a: PartialAggregate = { firstReplication: 0, records: [], occupancy: [0, 0] };
    const gap: PartialAggregate = { firstReplication: 2, records: [], occupancy: [0, 0] };
    expect(() => mergeAggregates([{ ...a, records: [{} as never] }, gap])).toThrow(/not contiguous/);
    expect(() => mergeAggregates([a, { firstReplication: 0, records: [], occupancy: [0] }])).toThrow();
  });
});

describe("precision planner", () => {
  const precise: ScenarioInput = {
    ...base,
    run: { seed: 5, replications: 2, callsPerReplication: 2_000, chunkReplications: 2, precision: { relativeHalfWidth: 0.08, maxCalls: 400_000 } },
  };

  /** Drives decideNext like a queue would: chunks finish in a scrambled order, `lookahead` in flight. */
  function drive(input: ScenarioInput, lookahead: number, scramble: number) {
    const s = parseScenario(input);
    const plan = planRun(s);
    const cache = new Map<number, PartialAggregate>();
    const compute = (c: number) => {
      const { firstReplication, replications } = chunkRange(plan, c);
      return aggregateReplications(
        Array.from({ length: replications }, (_, i) => runReplication(s, firstReplication + i)),
        s.servers,
      );
    };
    const finished = new Map<number, PartialAggregate>();
    for (let step = 0; step < 10_000; step++) {
      const d = decideNext(s, plan, (c) => finished.get(c), lookahead);
      if (d.kind === "complete") return { decision: d, parts: Array.from({ length: d.chunks }, (_, c) => finished.get(c)!) };
      const pending = d.chunks.filter((c) => !finished.has(c));
      // Finish the pending chunk picked by a fixed scramble, not necessarily the lowest.
      const pick = pending[(step * scramble) % pending.length];
      if (!cache.has(pick)) cache.set(pick, compute(pick));
      finished.set(pick, cache.get(pick)!);
    }
    throw new Error("planner did not finish");
  }

  it("stops at the same checkpoint with the same estimate for any number of workers", () => {
    const one = drive(precise, 1, 1);
    const four = drive(precise, 4, 3);
    const seven = drive(precise, 7, 5);
    expect(one.decision).toEqual(four.decision);
    expect(one.decision).toEqual(seven.decision);
    expect(one.decision.reason).toBe("precision-met");
    const s = parseScenario(precise);
    const json = (r: typeof one) => JSON.stringify(finishRun(s, r.parts, []));
    expect(json(four)).toBe(json(one));
    expect(json(seven)).toBe(json(one));
  }, 60_000);

  it(`never stops on precision before ${PRECISION_MIN_REPLICATIONS} replications or on a zero standard error`, () => {
    // 40 servers at 8 E: Erlang B is about 1e-18 (Erlang B recursion), so no call is ever blocked;
    // a zero standard error must not count as precise, and only the call budget can stop the run.
    const none = drive({ ...precise, servers: 40, run: { ...precise.run, precision: { relativeHalfWidth: 0.5, maxCalls: 30_000 } } }, 2, 1);
    expect(none.decision.reason).toBe("call-budget");
    const reps = none.parts.reduce((n, p) => n + p.records.length, 0);
    expect(reps).toBe(14); // 14 x 2000 = 28 000 calls; one more chunk (4000) would pass 30 000
    // A loose target met at once still runs the minimum number of replications.
    const loose = drive({ ...precise, run: { ...precise.run, precision: { relativeHalfWidth: 0.99, maxCalls: 400_000 } } }, 1, 1);
    expect(loose.decision.reason).toBe("precision-met");
    expect(loose.parts.reduce((n, p) => n + p.records.length, 0)).toBe(PRECISION_MIN_REPLICATIONS);
  }, 60_000);
});
