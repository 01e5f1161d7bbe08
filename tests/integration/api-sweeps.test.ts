// Sweep routes against a real PostgreSQL and pg-boss: submission of a sweep, a grid and a dimensioning search,
// definition errors by field, the points and concurrency quotas, the detail with its point runs, cancel
// cascading to the points, and the exports.
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { and, eq } from "drizzle-orm";
import Papa from "papaparse";
import type PgBoss from "pg-boss";
import type { Database } from "@/db/client";
import { runs, sweeps, workspaceQuotas } from "@/db/schema";
import { queues } from "@/lib/jobs/contracts";
import { parseScenario, planRun } from "@/lib/simulation";
import { runScenario } from "@/lib/simulation/node";
import { expandSweep, parseSweepDefinition } from "@/lib/sweeps";
import { call, createTeam, openHarness, smallScenario, state, type Harness, type Team } from "./support/api-harness";

vi.mock("next/headers", async () => (await import("./support/api-harness")).headersModule);
vi.mock("@/lib/auth/config", async () => (await import("./support/api-harness")).authModule);
vi.mock("@/db/client", async (original) => ({ ...(await original<object>()), ...(await import("./support/api-harness")).databaseModule }));
vi.mock("@/db/queue", async (original) => ({ ...(await original<object>()), ...(await import("./support/api-harness")).queueModule }));

const sweepList = await import("@/app/api/v1/workspaces/[workspace]/sweeps/route");
const sweepOne = await import("@/app/api/v1/workspaces/[workspace]/sweeps/[id]/route");
const sweepCancel = await import("@/app/api/v1/workspaces/[workspace]/sweeps/[id]/cancel/route");
const sweepCsv = await import("@/app/api/v1/workspaces/[workspace]/sweeps/[id]/export.csv/route");
const sweepJson = await import("@/app/api/v1/workspaces/[workspace]/sweeps/[id]/export.json/route");
const runList = await import("@/app/api/v1/workspaces/[workspace]/runs/route");

let harness: Harness;
let db: Database;
let boss: PgBoss;
let team: Team;
let drain: Harness["drain"];
const engineer = () => ({ session: team.users.engineer });

beforeAll(async () => {
  harness = await openHarness("mere");
  ({ db, boss, team, drain } = harness);
});
afterAll(async () => harness.close());


const submit = (body: unknown, caller: Parameters<typeof call>[2]["caller"] = engineer(), slug = team.slug) => call(sweepList.POST, { workspace: slug }, { caller, body });

/** What the worker's sweep-start does for a sweep: one queued point run per point, same seed everywhere. */
async function insertPoints(sweepId: string): Promise<string[]> {
  const [sweep] = await db.select().from(sweeps).where(eq(sweeps.id, sweepId));
  const points = expandSweep(parseScenario(sweep.scenario), parseSweepDefinition(sweep.definition));
  const rows = await db
    .insert(runs)
    .values(
      points.map((p) => ({
        workspaceId: sweep.workspaceId,
        sweepId,
        sweepPoint: p.point,
        sweepValues: p.values,
        scenario: p.scenario,
        seed: p.scenario.run.seed,
        plan: planRun(p.scenario) as unknown as Record<string, unknown>,
        replicationsPlanned: p.scenario.run.replications,
      })),
    )
    .returning({ id: runs.id });
  await db.update(sweeps).set({ status: "running" }).where(eq(sweeps.id, sweepId));
  return rows.map((r) => r.id);
}

describe("submitting sweeps", () => {
  it("accepts a one-parameter sweep, a grid and a dimensioning search, each with one sweep-start job", async () => {
    await drain(queues.sweepStart);
    const bodies = [
      { scenario: smallScenario(), parameter: "offeredTraffic", values: [2, 3, 4], name: "load curve" },
      { scenario: smallScenario(), kind: "grid", x: { parameter: "offeredTraffic", values: [2, 4] }, y: { parameter: "peakedness", values: [1, 2] }, targetBlocking: 0.02 },
      { scenario: smallScenario(), kind: "dimensioning", targetBlocking: 0.01 },
    ];
    const ids: string[] = [];
    for (const body of bodies) {
      const r = await submit(body);
      expect(r.status, JSON.stringify(r.body)).toBe(202);
      expect(r.body.status).toBe("queued");
      ids.push(r.body.id);
    }
    expect((await drain(queues.sweepStart)).map((d) => d.sweepId).sort()).toEqual([...ids].sort());
    const stored = await db.select().from(sweeps).where(eq(sweeps.workspaceId, team.workspaceId));
    expect(stored.map((s) => [s.kind, s.pointsPlanned]).sort()).toEqual([["dimensioning", 30], ["grid", 4], ["sweep", 3]].sort());
    const list = await call(sweepList.GET, { workspace: team.slug }, { caller: { session: team.users.viewer }, query: { kind: "grid" } });
    expect(list.body.items.map((s: { id: string }) => s.id)).toEqual([ids[1]]);
  });

  it("refuses bad definitions with a 400 naming the field, and stores nothing", async () => {
    const before = (await db.select().from(sweeps)).length;
    const cases: [unknown, string][] = [
      [{ scenario: smallScenario(), parameter: "colour", values: [1] }, "parameter"],
      [{ scenario: smallScenario(), parameter: "servers", values: [3, -1] }, "values.1"],
      [{ scenario: smallScenario(), parameter: "servers", values: [] }, "values"],
      [{ parameter: "servers", values: [3] }, "scenarioId"],
      [{ scenario: { ...smallScenario(), servers: 0 }, parameter: "servers", values: [3] }, "scenario.servers"],
      [{ scenario: smallScenario(), kind: "spiral" }, "kind"],
      [{ scenario: smallScenario(), kind: "grid", x: { parameter: "offeredTraffic", values: [2] }, y: { parameter: "offeredTraffic", values: [3] }, targetBlocking: 0.01 }, "y.parameter"],
      [{ scenario: smallScenario(), kind: "dimensioning", targetBlocking: 1.5 }, "targetBlocking"],
    ];
    for (const [body, field] of cases) {
      const r = await submit(body);
      expect(r.status, JSON.stringify(body)).toBe(400);
      expect(Object.keys(r.body.error.fields), JSON.stringify(r.body)).toContain(field);
    }
    expect((await db.select().from(sweeps)).length).toBe(before);
    expect(await drain(queues.sweepStart)).toEqual([]);
  });

  it("applies the points-per-sweep, calls-per-run and concurrent-runs quotas with clear messages", async () => {
    const quota = await createTeam(db, "mere-quota");
    await db.insert(workspaceQuotas).values({ workspaceId: quota.workspaceId, concurrentRuns: 4, callsPerRun: 30_000, pointsPerSweep: 3 });
    const as = { session: quota.users.engineer };
    const many = await submit({ scenario: smallScenario(), parameter: "servers", values: [3, 4, 5, 6] }, as, quota.slug);
    expect(many.status).toBe(400);
    expect(many.body.error.fields.values).toMatch(/4 points; this workspace allows 3 \(quota pointsPerSweep\)/);
    const probes = await submit({ scenario: smallScenario(), kind: "dimensioning", targetBlocking: 0.01 }, as, quota.slug);
    expect(probes.body.error.fields).toHaveProperty("maxProbes");
    // The horizon grows with the offered traffic: 4 replications x 10 time units x 1000 calls per unit = 40 000 calls at the last point.
    const horizon = { ...smallScenario(), run: { seed: 1, replications: 4, horizon: 10 } };
    const heavy = await submit({ scenario: horizon, parameter: "offeredTraffic", values: [4, 1000] }, as, quota.slug);
    expect(heavy.status).toBe(400);
    expect(heavy.body.error.fields["scenario.run.horizon"]).toMatch(/^point 1 \(offeredTraffic = 1000\) asks for about 40,000 calls/);

    expect((await submit({ scenario: smallScenario(), parameter: "servers", values: [3, 4, 5] }, as, quota.slug)).status).toBe(202);
    // Three points wait to start, so only one more run fits under concurrentRuns = 4.
    expect((await call(runList.POST, { workspace: quota.slug }, { caller: as, body: { scenario: smallScenario() } })).status).toBe(202);
    const full = await submit({ scenario: smallScenario(), parameter: "servers", values: [3, 4] }, as, quota.slug);
    expect([full.status, full.body.error.code]).toEqual([429, "quota-exceeded"]);
    expect(full.body.error.message).toMatch(/allows 4 at once \(quota concurrentRuns\)/);
    await drain(queues.sweepStart);
    await drain(queues.runStart);
  });
});

describe("a sweep's detail, cancel and exports", () => {
  it("shows one run per point with progress and a live curve, cancels the active points, and exports per point", async () => {
    const id = (await submit({ scenario: smallScenario(8), parameter: "servers", values: [4, 5, 6] })).body.id;
    const pointRuns = await insertPoints(id);
    // Point 0 finished (the real engine's result), point 1 half done, point 2 queued.
    const done = (await db.select().from(runs).where(eq(runs.id, pointRuns[0])))[0];
    const result = await runScenario(parseScenario(done.scenario));
    await db.update(runs).set({ status: "succeeded", result: result as unknown as Record<string, unknown>, references: result.references, replicationsDone: 4, progress: 1 }).where(eq(runs.id, pointRuns[0]));
    await db.update(runs).set({ status: "running", progress: 0.5, replicationsDone: 2 }).where(eq(runs.id, pointRuns[1]));

    const detail = await call(sweepOne.GET, { workspace: team.slug, id }, { caller: { session: team.users.viewer } });
    expect(detail.status).toBe(200);
    expect(detail.body).toMatchObject({ id, kind: "sweep", status: "running", definition: { kind: "sweep", parameter: "servers", values: [4, 5, 6] }, scenario: { servers: 5 } });
    expect(detail.body.progress.fraction).toBeCloseTo(1.5 / 3, 12);
    expect(detail.body.runs.map((r: { sweepPoint: number; status: string; sweepValues: object }) => [r.sweepPoint, r.status, r.sweepValues])).toEqual([
      [0, "succeeded", { servers: 4 }],
      [1, "running", { servers: 5 }],
      [2, "queued", { servers: 6 }],
    ]);
    expect(detail.body.runs[0].callCongestion).toEqual({ estimate: result.callCongestion.estimate, ciLow: result.callCongestion.ciLow, ciHigh: result.callCongestion.ciHigh });
    expect(detail.body.result).toMatchObject({ kind: "sweep", parameter: "servers" });
    expect(detail.body.result.points[0].callCongestion.estimate).toBe(result.callCongestion.estimate);
    // Point runs stay out of the plain run list, and are listed with their sweep.
    const plain = await call(runList.GET, { workspace: team.slug }, { caller: engineer() });
    expect(plain.body.items.map((r: { id: string }) => r.id)).not.toContain(pointRuns[0]);
    const ofSweep = await call(runList.GET, { workspace: team.slug }, { caller: engineer(), query: { sweepId: id } });
    expect(ofSweep.body.total).toBe(3);

    await drain(queues.runFinalise);
    expect((await call(sweepCancel.POST, { workspace: team.slug, id }, { caller: { session: team.users.reviewer }, method: "POST" })).status).toBe(403);
    const cancelled = await call(sweepCancel.POST, { workspace: team.slug, id }, { caller: engineer(), method: "POST" });
    expect(cancelled.body).toEqual({ id, status: "cancelled" });
    const statuses = await db.select({ id: runs.id, status: runs.status }).from(runs).where(eq(runs.sweepId, id));
    expect(Object.fromEntries(statuses.map((r) => [r.id, r.status]))).toEqual({ [pointRuns[0]]: "succeeded", [pointRuns[1]]: "cancelled", [pointRuns[2]]: "cancelled" });
    expect((await drain(queues.runFinalise)).map((d) => d.runId).sort()).toEqual([pointRuns[1], pointRuns[2]].sort());
    expect((await call(sweepCancel.POST, { workspace: team.slug, id }, { caller: engineer(), method: "POST" })).status).toBe(409);

    const csv = await call(sweepCsv.GET, { workspace: team.slug, id }, { caller: engineer() });
    expect(csv.headers.get("content-disposition")).toBe(`attachment; filename="spillway-sweep-${id}.csv"`);
    const rows = Papa.parse<Record<string, string>>(csv.text, { header: true, skipEmptyLines: true }).data;
    expect(rows.map((r) => [r.point, r.servers, r.status])).toEqual([
      ["0", "4", "succeeded"],
      ["1", "5", "cancelled"],
      ["2", "6", "cancelled"],
    ]);
    expect(Number(rows[0].callCongestion)).toBe(result.callCongestion.estimate);
    // Erlang B, B(4, 4) by the recursion B(n) = A B(n-1) / (n + A B(n-1)) (exact method computed here).
    let b = 1;
    for (let n = 1; n <= 4; n++) b = (4 * b) / (n + 4 * b);
    expect(Number(rows[0]["Erlang B"])).toBeCloseTo(b, 12);
    const json = await call(sweepJson.GET, { workspace: team.slug, id }, { caller: engineer() });
    expect(json.body.runs).toHaveLength(3);
    expect((await call(sweepOne.GET, { workspace: team.otherSlug, id }, { caller: { session: team.users.outsider } })).status).toBe(404);
    expect(await db.select().from(sweeps).where(and(eq(sweeps.id, id), eq(sweeps.status, "cancelled")))).toHaveLength(1);
  });
});
