// Sweeps, grids and dimensioning searches through the real queue with an in-process worker.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { eq } from "drizzle-orm";
import type PgBoss from "pg-boss";
import type { Database } from "@/db/client";
import { createBoss } from "@/db/queue";
import { runs, sweeps } from "@/db/schema";
import { parseScenario, runScenario, type ScenarioInput } from "@/lib/simulation/node";
import { expandSweep, parseSweepDefinition, type DimensioningAnswer, type GridMap, type SweepCurve } from "@/lib/sweeps";
import { startWorker, type RunningWorker } from "@/worker/main";
import { migratedScratchDatabase } from "./support/database";
import { canonicalJson, createWorkspace, submitTestSweep, waitFor } from "./support/worker";

let scratch: Awaited<ReturnType<typeof migratedScratchDatabase>>;
let db: Database;
let boss: PgBoss;
let worker: RunningWorker;
let owner: Awaited<ReturnType<typeof createWorkspace>>;

beforeAll(async () => {
  scratch = await migratedScratchDatabase();
  db = scratch.db;
  delete process.env.SMTP_URL; // notices are covered in worker.test.ts
  boss = await createBoss(scratch.url, "web");
  worker = await startWorker(scratch.url, { threads: 2, log: () => {} });
  owner = await createWorkspace(db, "basin");
});

afterAll(async () => {
  await worker?.stop(1000);
  await boss?.stop({ graceful: false, wait: true });
  await scratch?.close();
});

const base: ScenarioInput = {
  servers: 10,
  arrivals: { process: "poisson", rate: 3 },
  holding: { law: "exponential", mean: 2 },
  run: { seed: 5, replications: 8, callsPerReplication: 20_000, chunkReplications: 4 },
};

async function finishedSweep(id: string, timeoutMs = 40_000) {
  return waitFor(`sweep ${id} to finish`, async () => {
    const [row] = await db.select().from(sweeps).where(eq(sweeps.id, id));
    return row.status === "succeeded" || row.status === "failed" ? row : undefined;
  }, timeoutMs);
}

/** Smallest N with B(N, A) <= target by the Erlang B recursion, computed here. */
function erlangBServers(a: number, target: number): number {
  let b = 1;
  let n = 0;
  while (b > target) {
    n++;
    b = (a * b) / (n + a * b);
  }
  return n;
}

describe("sweeps through the queue", () => {
  it("a one-parameter sweep gives a curve with CI band and analytic values; each point equals its CLI run", async () => {
    const definition = { parameter: "offeredTraffic", values: [4, 6, 8] };
    const id = await submitTestSweep(db, boss, owner, base, definition);
    const sweep = await finishedSweep(id);
    expect(sweep.error).toBeNull();
    expect([sweep.pointsPlanned, sweep.pointsDone]).toEqual([3, 3]);
    const curve = sweep.result as unknown as SweepCurve;
    expect(curve.kind).toBe("sweep");
    expect(curve.points.map((p) => p.value)).toEqual([4, 6, 8]);
    expect(curve.methods).toContain("Erlang B");
    for (const p of curve.points) {
      expect(p.callCongestion!.ciLow).toBeLessThanOrEqual(p.callCongestion!.estimate);
      expect(p.callCongestion!.ciHigh).toBeGreaterThanOrEqual(p.callCongestion!.estimate);
      // Erlang B is exact for Poisson traffic: the recursion value computed here is the reference stored.
      let b = 1;
      for (let n = 1; n <= 10; n++) b = (p.value * b) / (n + p.value * b);
      expect(p.analytic["Erlang B"]).toBeCloseTo(b, 12);
    }
    // Blocking grows with the traffic (common random numbers keep the curve smooth).
    const estimates = curve.points.map((p) => p.callCongestion!.estimate);
    expect(estimates[0]).toBeLessThan(estimates[1]);
    expect(estimates[1]).toBeLessThan(estimates[2]);
    const pointRuns = await db.select().from(runs).where(eq(runs.sweepId, id)).orderBy(runs.sweepPoint);
    expect(pointRuns.map((r) => r.seed)).toEqual([5, 5, 5]);
    const expected = expandSweep(parseScenario(base), parseSweepDefinition(definition))[1].scenario;
    expect(canonicalJson(pointRuns[1].result)).toBe(canonicalJson(await runScenario(expected)));
  });

  it("a grid says, cell by cell, whether Erlang B's sizing holds for peaked traffic", async () => {
    const id = await submitTestSweep(db, boss, owner, base, {
      kind: "grid",
      x: { parameter: "offeredTraffic", values: [4, 8] },
      y: { parameter: "peakedness", values: [1, 3] },
      targetBlocking: 0.02,
    });
    const sweep = await finishedSweep(id);
    expect(sweep.error).toBeNull();
    const map = sweep.result as unknown as GridMap;
    expect(map.cells.map((c) => [c.x, c.y, c.servers])).toEqual([
      [4, 1, erlangBServers(4, 0.02)],
      [8, 1, erlangBServers(8, 0.02)],
      [4, 3, erlangBServers(4, 0.02)],
      [8, 3, erlangBServers(8, 0.02)],
    ]);
    // Poisson (Z = 1) on the Erlang B group: true blocking <= 2 %, so "breaks" (the whole interval
    // above 2 %) would need the interval to miss the truth. Z = 3 on the same group blocks far
    // more than 2 % (Hayward: B(N/3, A/3) is several times the target here), so those cells break.
    for (const cell of map.cells.filter((c) => c.y === 1)) expect(cell.verdict).not.toBe("breaks");
    for (const cell of map.cells.filter((c) => c.y === 3)) expect(cell.verdict).toBe("breaks");
    expect(map.counts.breaks).toBe(2);
  });

  it("dimensioning finds the smallest group whose upper confidence bound meets the target, beside the formula's N", async () => {
    const peaked: ScenarioInput = { ...base, arrivals: { process: "batch", rate: 1, batchSize: { law: "geometric", mean: 3 } } };
    const id = await submitTestSweep(db, boss, owner, peaked, { kind: "dimensioning", targetBlocking: 0.02 });
    const sweep = await finishedSweep(id, 50_000);
    expect(sweep.error).toBeNull();
    const answer = sweep.result as unknown as DimensioningAnswer;
    expect(answer.formula).toEqual({ method: "Erlang B", servers: erlangBServers(6, 0.02) });
    const found = answer.simulated!;
    expect(found.estimate.ciHigh).toBeLessThanOrEqual(0.02);
    // The answer is the smallest meeting N: one server fewer was probed and does not meet it.
    const fewer = answer.probes.find((p) => p.servers === found.servers - 1)!;
    expect(fewer.meets).toBe(false);
    expect(answer.probes[0].servers).toBe(answer.formula.servers);
    // Peakedness 3 needs more servers than Erlang B's sizing of the same mean traffic.
    expect(answer.difference).toBe(found.servers - answer.formula.servers);
    expect(answer.difference).toBeGreaterThan(0);
    expect(sweep.pointsDone).toBe(answer.probes.length);
  }, 60_000);
});
