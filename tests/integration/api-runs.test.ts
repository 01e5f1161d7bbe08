// Run routes against a real PostgreSQL and a real pg-boss on it: submission (inline or an exact scenario
// revision), quotas, the queue failing, cancel, paging and status filters, exports, preferences.
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { and, eq } from "drizzle-orm";
import Papa from "papaparse";
import type PgBoss from "pg-boss";
import type { Database } from "@/db/client";
import { auditEvents, runs, workspaceQuotas } from "@/db/schema";
import { queues } from "@/lib/jobs/contracts";
import { parseScenario } from "@/lib/simulation";
import { runScenario } from "@/lib/simulation/node";
import { call, createTeam, openHarness, smallScenario, state, type Harness, type Team } from "./support/api-harness";

vi.mock("next/headers", async () => (await import("./support/api-harness")).headersModule);
vi.mock("@/lib/auth/config", async () => (await import("./support/api-harness")).authModule);
vi.mock("@/db/client", async (original) => ({ ...(await original<object>()), ...(await import("./support/api-harness")).databaseModule }));
vi.mock("@/db/queue", async (original) => ({ ...(await original<object>()), ...(await import("./support/api-harness")).queueModule }));

const scenarioRoutes = await import("@/app/api/v1/workspaces/[workspace]/scenarios/route");
const scenarioRoute = await import("@/app/api/v1/workspaces/[workspace]/scenarios/[id]/route");
const runList = await import("@/app/api/v1/workspaces/[workspace]/runs/route");
const runOne = await import("@/app/api/v1/workspaces/[workspace]/runs/[id]/route");
const runCancel = await import("@/app/api/v1/workspaces/[workspace]/runs/[id]/cancel/route");
const runCsv = await import("@/app/api/v1/workspaces/[workspace]/runs/[id]/export.csv/route");
const runJson = await import("@/app/api/v1/workspaces/[workspace]/runs/[id]/export.json/route");
const preferences = await import("@/app/api/v1/preferences/route");

let harness: Harness;
let db: Database;
let boss: PgBoss;
let team: Team;
let drain: Harness["drain"];
const engineer = () => ({ session: team.users.engineer });

beforeAll(async () => {
  harness = await openHarness("fen");
  ({ db, boss, team, drain } = harness);
});
afterAll(async () => harness.close());


const submit = (body: unknown, caller: Parameters<typeof call>[2]["caller"] = engineer(), slug = team.slug) => call(runList.POST, { workspace: slug }, { caller, body });

describe("submitting runs", () => {
  it("queues an inline scenario: 202 {id, status}, the run row, its audit event and one run-start job", async () => {
    await drain(queues.runStart);
    const r = await submit({ scenario: smallScenario(21), name: "first" });
    expect(r.status).toBe(202);
    expect(r.body).toEqual({ id: expect.any(String), status: "queued" });
    expect(r.headers.get("location")).toBe(`/api/v1/workspaces/${team.slug}/runs/${r.body.id}`);
    expect(await drain(queues.runStart)).toEqual([{ runId: r.body.id }]);
    const [audit] = await db.select().from(auditEvents).where(and(eq(auditEvents.subjectId, r.body.id), eq(auditEvents.action, "run.submitted")));
    expect(audit.actorUserId).toBe(team.users.engineer);

    const detail = await call(runOne.GET, { workspace: team.slug, id: r.body.id }, { caller: { session: team.users.viewer } });
    expect(detail.status).toBe(200);
    expect(detail.body).toMatchObject({
      id: r.body.id,
      name: "first",
      status: "queued",
      progress: { replicationsDone: 0, replicationsPlanned: 4, fraction: 0 },
      scenarioId: null,
      revision: null,
      seed: 21,
      partial: false,
      reviewStatus: "unreviewed",
      submittedBy: { id: team.users.engineer, email: `engineer@${team.slug}.test` },
      scenario: parseScenario(smallScenario(21)),
      plan: { initialReplications: 4 },
      startedAt: null,
      finishedAt: null,
      error: null,
    });
    expect(detail.body).not.toHaveProperty("result");
  });

  it("runs point at the exact scenario revision they simulated", async () => {
    const created = (await call(scenarioRoutes.POST, { workspace: team.slug }, { caller: engineer(), body: { name: "Tandem", scenario: smallScenario(5) } })).body;
    const first = (await submit({ scenarioId: created.id })).body;
    await call(scenarioRoute.PATCH, { workspace: team.slug, id: created.id }, { caller: engineer(), method: "PATCH", body: { scenario: { ...smallScenario(5), servers: 8 } } });
    const latest = (await submit({ scenarioId: created.id })).body;
    const pinned = (await submit({ scenarioId: created.id, revision: 1 })).body;
    const read = async (id: string) => (await call(runOne.GET, { workspace: team.slug, id }, { caller: engineer() })).body;
    expect(await read(first.id)).toMatchObject({ scenarioId: created.id, revision: 1, scenarioName: "Tandem", scenario: { servers: 5 } });
    expect(await read(latest.id)).toMatchObject({ revision: 2, scenario: { servers: 8 } });
    expect(await read(pinned.id)).toMatchObject({ revision: 1, scenario: { servers: 5 } });

    const missing = await submit({ scenarioId: created.id, revision: 3 });
    expect(missing.status).toBe(400);
    expect(missing.body.error.fields.revision).toMatch(/no revision 3 \(the newest is 2\)/);
    const foreign = await submit({ scenarioId: "not-a-scenario" });
    expect(foreign.body.error.fields).toHaveProperty("scenarioId");
    await drain(queues.runStart);
  });

  it("refuses bad input with a 400 naming the field, and stores nothing", async () => {
    const before = (await db.select().from(runs)).length;
    const cases: [unknown, string][] = [
      [{}, "scenarioId"],
      [{ scenario: smallScenario(), scenarioId: "x" }, "scenarioId"],
      [{ scenario: { ...smallScenario(), holding: { law: "exponential", mean: 0 } } }, "scenario.holding.mean"],
      [{ scenario: { ...smallScenario(), arrivals: { process: "carrier-pigeon" } } }, "scenario.arrivals.process"],
      [{ scenario: smallScenario(), revision: 2 }, "revision"],
      [{ scenario: smallScenario(), name: "n".repeat(201) }, "name"],
    ];
    for (const [body, field] of cases) {
      const r = await submit(body);
      expect(r.status, JSON.stringify(r.body)).toBe(400);
      expect(Object.keys(r.body.error.fields)).toContain(field);
    }
    const wrongType = await call(runList.POST, { workspace: team.slug }, { caller: engineer(), rawBody: "servers=5", contentType: "application/x-www-form-urlencoded" });
    expect(wrongType.status).toBe(415);
    expect((await db.select().from(runs)).length).toBe(before);
    expect(await drain(queues.runStart)).toEqual([]);
  });

  it("answers 503 and stores nothing when the queue cannot take the job", async () => {
    const before = (await db.select().from(runs)).length;
    state.boss = { send: async () => Promise.reject(new Error("connection terminated unexpectedly")) } as unknown as PgBoss;
    const refused = await submit({ scenario: smallScenario() });
    state.boss = () => Promise.reject(new Error("connect ECONNREFUSED 127.0.0.1:1"));
    const unreachable = await submit({ scenario: smallScenario() });
    state.boss = boss;
    expect([refused.status, refused.body.error.code]).toEqual([503, "queue-unavailable"]);
    expect(refused.body.error.message).toMatch(/nothing was stored/);
    expect(unreachable.status).toBe(503);
    expect((await db.select().from(runs)).length).toBe(before);
  });
});

describe("quotas", () => {
  let quota: Team;
  beforeAll(async () => {
    quota = await createTeam(db, "quota");
    await db.insert(workspaceQuotas).values({ workspaceId: quota.workspaceId, concurrentRuns: 3, callsPerRun: 30_000, pointsPerSweep: 3 });
  });

  it("refuses a run asking for more calls than the workspace allows, naming the field", async () => {
    const r = await submit({ scenario: { ...smallScenario(), run: { seed: 1, replications: 4, callsPerReplication: 10_000 } } }, { session: quota.users.engineer }, quota.slug);
    expect(r.status).toBe(400);
    expect(r.body.error.fields["scenario.run.callsPerReplication"]).toMatch(/about 40,000 calls.*allows 30,000 per run \(quota callsPerRun\)/);
    // Warm-up counts: 4 x (5000 + 3000) = 32 000 > 30 000.
    const warm = await submit({ scenario: { ...smallScenario(), run: { seed: 1, replications: 4, callsPerReplication: 5000, warmupCalls: 3000 } } }, { session: quota.users.engineer }, quota.slug);
    expect(warm.status).toBe(400);
    // A precision target may run up to its call budget.
    const budget = await submit(
      { scenario: { ...smallScenario(), run: { seed: 1, replications: 4, callsPerReplication: 1000, precision: { relativeHalfWidth: 0.05, maxCalls: 50_000 } } } },
      { session: quota.users.engineer },
      quota.slug,
    );
    expect(Object.keys(budget.body.error.fields)).toEqual(["scenario.run.precision.maxCalls"]);
  });

  it("lets exactly concurrentRuns runs through when many arrive at once, and 429s the rest by name", async () => {
    const replies = await Promise.all(Array.from({ length: 6 }, (_, i) => submit({ scenario: smallScenario(i) }, { session: quota.users.engineer }, quota.slug)));
    expect(replies.filter((r) => r.status === 202)).toHaveLength(3);
    const refused = replies.filter((r) => r.status === 429);
    expect(refused).toHaveLength(3);
    expect(refused[0].body.error).toMatchObject({ code: "quota-exceeded", message: expect.stringMatching(/3 runs queued or running and allows 3 at once \(quota concurrentRuns\)/) });
    expect(await db.select().from(runs).where(eq(runs.workspaceId, quota.workspaceId))).toHaveLength(3);

    // A finished run frees its slot.
    const [done] = await db.select().from(runs).where(eq(runs.workspaceId, quota.workspaceId)).limit(1);
    await db.update(runs).set({ status: "succeeded" }).where(eq(runs.id, done.id));
    expect((await submit({ scenario: smallScenario() }, { session: quota.users.engineer }, quota.slug)).status).toBe(202);
    await drain(queues.runStart);
  });
});

describe("cancel", () => {
  it("cancels a queued run once, queues its finalise job, and refuses a second cancel with 409", async () => {
    const id = (await submit({ scenario: smallScenario() })).body.id;
    await drain(queues.runFinalise);
    const viewer = await call(runCancel.POST, { workspace: team.slug, id }, { caller: { session: team.users.viewer }, method: "POST" });
    expect(viewer.status).toBe(403);
    const r = await call(runCancel.POST, { workspace: team.slug, id }, { caller: engineer(), method: "POST" });
    expect(r.status).toBe(200);
    expect(r.body).toEqual({ id, status: "cancelled" });
    expect(await drain(queues.runFinalise)).toEqual([{ runId: id }]);
    const again = await call(runCancel.POST, { workspace: team.slug, id }, { caller: engineer(), method: "POST" });
    expect([again.status, again.body.error.code]).toEqual([409, "already-finished"]);
    const events = await db.select().from(auditEvents).where(and(eq(auditEvents.subjectId, id), eq(auditEvents.action, "run.cancelled")));
    expect(events).toHaveLength(1);
    const outsider = await call(runCancel.POST, { workspace: team.otherSlug, id }, { caller: { session: team.users.outsider }, method: "POST" });
    expect(outsider.status).toBe(404);
    await drain(queues.runStart);
  });
});

describe("listing", () => {
  it("pages newest first with a stable cursor and filters by status", async () => {
    const paged = await createTeam(db, "paged");
    const ids: string[] = [];
    for (let i = 0; i < 7; i++) ids.push((await submit({ scenario: smallScenario(i) }, { session: paged.users.engineer }, paged.slug)).body.id);
    await db.update(runs).set({ status: "succeeded" }).where(eq(runs.id, ids[1]));
    await db.update(runs).set({ status: "failed", error: "scenario error" }).where(eq(runs.id, ids[4]));
    const seen: string[] = [];
    let cursor: string | undefined;
    do {
      const r = await call(runList.GET, { workspace: paged.slug }, { caller: { session: paged.users.viewer }, query: { limit: "3", ...(cursor ? { cursor } : {}) } });
      expect(r.body.total).toBe(7);
      seen.push(...r.body.items.map((x: { id: string }) => x.id));
      cursor = r.body.nextCursor ?? undefined;
    } while (cursor);
    expect(seen).toEqual([...ids].reverse());
    const finished = await call(runList.GET, { workspace: paged.slug }, { caller: { session: paged.users.viewer }, query: { status: "succeeded,failed" } });
    expect(finished.body.items.map((x: { id: string; status: string }) => [x.id, x.status])).toEqual([
      [ids[4], "failed"],
      [ids[1], "succeeded"],
    ]);
    const bad = await call(runList.GET, { workspace: paged.slug }, { caller: { session: paged.users.viewer }, query: { status: "done" } });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields).toHaveProperty("status");
    const unknownParam = await call(runList.GET, { workspace: paged.slug }, { caller: { session: paged.users.viewer }, query: { colour: "teal" } });
    expect(unknownParam.status).toBe(400);
    await drain(queues.runStart);
  });
});

describe("exports", () => {
  it("409 before a result exists; then CSV rows per measure beside each reference, and the whole run as JSON", async () => {
    const scenario = parseScenario(smallScenario(3));
    const id = (await submit({ scenario })).body.id;
    expect((await call(runCsv.GET, { workspace: team.slug, id }, { caller: engineer() })).status).toBe(409);
    // Stand in for the worker: the real engine's result for this scenario, stored as the worker stores it.
    const result = await runScenario(scenario);
    await db.update(runs).set({ status: "succeeded", result: result as unknown as Record<string, unknown>, replicationsDone: 4, progress: 1 }).where(eq(runs.id, id));

    const csv = await call(runCsv.GET, { workspace: team.slug, id }, { caller: { session: team.users.viewer } });
    expect(csv.status).toBe(200);
    expect(csv.headers.get("content-type")).toMatch(/^text\/csv/);
    expect(csv.headers.get("content-disposition")).toBe(`attachment; filename="spillway-run-${id}.csv"`);
    const rows = Papa.parse<Record<string, string>>(csv.text, { header: true, skipEmptyLines: true }).data;
    const call1 = rows.find((r) => r.measure === "callCongestion")!;
    expect(Number(call1.estimate)).toBe(result.callCongestion.estimate);
    expect(Number(call1.ciLow)).toBe(result.callCongestion.ciLow);
    // Erlang B, B(5, 4) by the recursion B(n) = A B(n-1) / (n + A B(n-1)), B(0) = 1 (exact method computed here).
    let b = 1;
    for (let n = 1; n <= 5; n++) b = (4 * b) / (n + 4 * b);
    expect(Number(call1["Erlang B (exact)"])).toBeCloseTo(b, 12);
    expect(rows.map((r) => r.measure)).toEqual(expect.arrayContaining(["callCongestion", "timeCongestion", "carriedTraffic"]));

    const json = await call(runJson.GET, { workspace: team.slug, id }, { caller: engineer() });
    expect(json.body.result).toEqual(JSON.parse(JSON.stringify(result)));
    expect(json.body.scenario).toEqual(scenario);
    expect((await call(runJson.GET, { workspace: team.otherSlug, id }, { caller: { session: team.users.outsider } })).status).toBe(404);
    await drain(queues.runStart);
  });
});

describe("preferences", () => {
  it("reads the default, saves a change, refuses bad input by field, and needs a signed-in caller", async () => {
    const me = { session: team.users.reviewer };
    expect((await call(preferences.GET, {}, { caller: me })).body).toEqual({ notifyByEmail: true });
    const saved = await call(preferences.PUT, {}, { caller: me, method: "PUT", body: { notifyByEmail: false } });
    expect(saved.body).toEqual({ notifyByEmail: false });
    expect((await call(preferences.GET, {}, { caller: me })).body).toEqual({ notifyByEmail: false });
    expect((await call(preferences.GET, {}, { caller: { session: team.users.viewer } })).body).toEqual({ notifyByEmail: true });
    const bad = await call(preferences.PUT, {}, { caller: me, method: "PUT", body: { notifyByEmail: "no" } });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields).toHaveProperty("notifyByEmail");
    expect((await call(preferences.GET, {}, { caller: null })).status).toBe(401);
  });
});
