// Scenario routes against a real PostgreSQL: create, search, sort and page, PATCH = new immutable revision, and
// bad input that names the field and stores nothing.
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { eq } from "drizzle-orm";
import type { Database } from "@/db/client";
import { auditEvents, scenarioRevisions, scenarios } from "@/db/schema";
import { call, createTeam, smallScenario, state, type Team } from "./support/api-harness";
import { migratedScratchDatabase } from "./support/database";

vi.mock("next/headers", async () => (await import("./support/api-harness")).headersModule);
vi.mock("@/lib/auth/config", async () => (await import("./support/api-harness")).authModule);
vi.mock("@/db/client", async (original) => ({ ...(await original<object>()), ...(await import("./support/api-harness")).databaseModule }));

const list = await import("@/app/api/v1/workspaces/[workspace]/scenarios/route");
const one = await import("@/app/api/v1/workspaces/[workspace]/scenarios/[id]/route");
const revisions = await import("@/app/api/v1/workspaces/[workspace]/scenarios/[id]/revisions/route");
const revision = await import("@/app/api/v1/workspaces/[workspace]/scenarios/[id]/revisions/[revision]/route");

let scratch: Awaited<ReturnType<typeof migratedScratchDatabase>>;
let db: Database;
let team: Team;
const engineer = () => ({ session: team.users.engineer });

beforeAll(async () => {
  scratch = await migratedScratchDatabase();
  db = state.db = scratch.db;
  team = await createTeam(db, "weir");
});
afterAll(async () => scratch.close());

describe("scenarios", () => {
  it("creates a scenario with revision 1 (defaults filled in) and an audit event", async () => {
    const r = await call(list.POST, { workspace: team.slug }, { caller: engineer(), body: { name: "Trunk group A", description: "busy hour", scenario: smallScenario(), note: "first cut" } });
    expect(r.status).toBe(201);
    expect(r.body).toMatchObject({ name: "Trunk group A", latestRevision: 1, revisionNote: "first cut", createdBy: { id: team.users.engineer } });
    expect(r.body.scenario.waitingPositions).toBe(0);
    expect(r.body.scenario.run.confidence).toBe(0.95);
    const events = await db.select().from(auditEvents).where(eq(auditEvents.subjectId, r.body.id));
    expect(events.map((e) => e.action)).toEqual(["scenario.created"]);
  });

  it("refuses bad input with a 400 naming the field, and stores nothing", async () => {
    const before = (await db.select().from(scenarios)).length;
    const cases: [unknown, string][] = [
      [{ name: "x", scenario: { ...smallScenario(), arrivals: { process: "poisson", rate: -4 } } }, "scenario.arrivals.rate"],
      [{ name: "x", scenario: { ...smallScenario(), run: { seed: 1, replications: 1, callsPerReplication: 10 } } }, "scenario.run.replications"],
      [{ name: "", scenario: smallScenario() }, "name"],
      [{ name: "x" }, "scenario"],
      [{ name: "x", scenario: smallScenario(), colour: "teal" }, "input"],
    ];
    for (const [body, field] of cases) {
      const r = await call(list.POST, { workspace: team.slug }, { caller: engineer(), body });
      expect(r.status, JSON.stringify(body)).toBe(400);
      expect(Object.keys(r.body.error.fields), JSON.stringify(r.body)).toContain(field);
    }
    const malformed = await call(list.POST, { workspace: team.slug }, { caller: engineer(), rawBody: "{ not json" });
    expect(malformed.status).toBe(400);
    expect((await db.select().from(scenarios)).length).toBe(before);
  });

  it("PATCH with a scenario adds the next revision; old revisions stay exactly as they were", async () => {
    const created = (await call(list.POST, { workspace: team.slug }, { caller: engineer(), body: { name: "Ward pool", scenario: smallScenario(1) } })).body;
    const patched = await call(one.PATCH, { workspace: team.slug, id: created.id }, { caller: engineer(), method: "PATCH", body: { scenario: { ...smallScenario(1), servers: 7 }, note: "two more beds" } });
    expect(patched.status).toBe(200);
    expect(patched.body).toMatchObject({ latestRevision: 2, revisionNote: "two more beds", scenario: { servers: 7 } });

    const history = await call(revisions.GET, { workspace: team.slug, id: created.id }, { caller: { session: team.users.viewer } });
    expect(history.body.revisions.map((r: { revision: number; note: string }) => [r.revision, r.note])).toEqual([[2, "two more beds"], [1, ""]]);
    const first = await call(revision.GET, { workspace: team.slug, id: created.id, revision: "1" }, { caller: { session: team.users.viewer } });
    expect(first.body).toMatchObject({ revision: 1, scenarioId: created.id, scenarioName: "Ward pool", scenario: { servers: 5 } });

    // Renaming alone makes no revision.
    const renamed = await call(one.PATCH, { workspace: team.slug, id: created.id }, { caller: engineer(), method: "PATCH", body: { name: "Ward pool (east)" } });
    expect(renamed.body).toMatchObject({ name: "Ward pool (east)", latestRevision: 2 });
    expect(await db.select().from(scenarioRevisions).where(eq(scenarioRevisions.scenarioId, created.id))).toHaveLength(2);

    // A stale base revision is refused by name, and nothing changes.
    const stale = await call(one.PATCH, { workspace: team.slug, id: created.id }, { caller: engineer(), method: "PATCH", body: { scenario: smallScenario(2), baseRevision: 1 } });
    expect(stale.status).toBe(400);
    expect(stale.body.error.fields).toHaveProperty("baseRevision");
    const bad = await call(one.PATCH, { workspace: team.slug, id: created.id }, { caller: engineer(), method: "PATCH", body: { scenario: { ...smallScenario(), servers: 0 } } });
    expect(bad.body.error.fields).toHaveProperty(["scenario.servers"]);
    expect((await call(one.GET, { workspace: team.slug, id: created.id }, { caller: engineer() })).body.latestRevision).toBe(2);

    expect((await call(revision.GET, { workspace: team.slug, id: created.id, revision: "9" }, { caller: engineer() })).status).toBe(404);
    expect((await call(revision.GET, { workspace: team.slug, id: created.id, revision: "zero" }, { caller: engineer() })).status).toBe(400);
  });

  it("two concurrent edits get consecutive revisions, never the same number", async () => {
    const created = (await call(list.POST, { workspace: team.slug }, { caller: engineer(), body: { name: "Race", scenario: smallScenario() } })).body;
    const edits = await Promise.all([3, 4, 5].map((servers) => call(one.PATCH, { workspace: team.slug, id: created.id }, { caller: engineer(), method: "PATCH", body: { scenario: { ...smallScenario(), servers } } })));
    expect(edits.map((e) => e.status)).toEqual([200, 200, 200]);
    const numbers = (await db.select().from(scenarioRevisions).where(eq(scenarioRevisions.scenarioId, created.id))).map((r) => r.revision).sort();
    expect(numbers).toEqual([1, 2, 3, 4]);
  });

  it("searches, sorts and pages with a cursor that neither repeats nor skips", async () => {
    for (let i = 0; i < 7; i++) await call(list.POST, { workspace: team.slug }, { caller: engineer(), body: { name: `Paging ${String(i).padStart(2, "0")}`, description: i % 2 ? "odd_one" : "even", scenario: smallScenario(i) } });
    const seen: string[] = [];
    let cursor: string | undefined;
    do {
      const r = await call(list.GET, { workspace: team.slug }, { caller: { session: team.users.viewer }, query: { q: "paging", sort: "name", limit: "3", ...(cursor ? { cursor } : {}) } });
      expect(r.status).toBe(200);
      expect(r.body.total).toBe(7);
      seen.push(...r.body.items.map((s: { name: string }) => s.name));
      cursor = r.body.nextCursor ?? undefined;
    } while (cursor);
    expect(seen).toEqual(Array.from({ length: 7 }, (_, i) => `Paging ${String(i).padStart(2, "0")}`));

    // `_` is a literal in search words, not a wildcard.
    const odd = await call(list.GET, { workspace: team.slug }, { caller: engineer(), query: { q: "odd_one" } });
    expect(odd.body.total).toBe(3);
    const newest = await call(list.GET, { workspace: team.slug }, { caller: engineer(), query: { limit: "1" } });
    expect(newest.body.items[0].name).toBe("Paging 06");

    const bad = await call(list.GET, { workspace: team.slug }, { caller: engineer(), query: { cursor: "nonsense!", limit: "500" } });
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.fields).sort()).toEqual(["cursor", "limit"]);
  });

  it("keeps workspaces apart and roles to their rights", async () => {
    const created = (await call(list.POST, { workspace: team.slug }, { caller: engineer(), body: { name: "Private", scenario: smallScenario() } })).body;
    expect((await call(one.GET, { workspace: team.slug, id: created.id }, { caller: null })).status).toBe(401);
    expect((await call(one.GET, { workspace: team.slug, id: created.id }, { caller: { session: team.users.outsider } })).status).toBe(404);
    // The outsider's own workspace does not reveal it either.
    expect((await call(one.GET, { workspace: team.otherSlug, id: created.id }, { caller: { session: team.users.outsider } })).status).toBe(404);
    expect((await call(list.GET, { workspace: team.otherSlug }, { caller: { session: team.users.outsider } })).body.total).toBe(0);
    for (const role of ["viewer", "reviewer"] as const) {
      expect((await call(list.POST, { workspace: team.slug }, { caller: { session: team.users[role] }, body: { name: "No", scenario: smallScenario() } })).status).toBe(403);
      expect((await call(one.PATCH, { workspace: team.slug, id: created.id }, { caller: { session: team.users[role] }, method: "PATCH", body: { name: "No" } })).status).toBe(403);
    }
    expect((await call(one.GET, { workspace: team.slug, id: created.id }, { caller: { session: team.users.reviewer } })).status).toBe(200);
  });
});
