// Every scenario, run, sweep and preferences route against the one guard: no credentials 401, another
// workspace's member 404, viewer 403 on writes, and API tokens (owner's current role; revoked or removed 401).
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { and, eq } from "drizzle-orm";
import type { Database } from "@/db/client";
import { memberships } from "@/db/schema";
import { revokeApiToken } from "@/db/queries/tokens";
import { call, openHarness, smallScenario, tokenFor, type Caller, type Harness, type Team } from "./support/api-harness";

vi.mock("next/headers", async () => (await import("./support/api-harness")).headersModule);
vi.mock("@/lib/auth/config", async () => (await import("./support/api-harness")).authModule);
vi.mock("@/db/client", async (original) => ({ ...(await original<object>()), ...(await import("./support/api-harness")).databaseModule }));
vi.mock("@/db/queue", async (original) => ({ ...(await original<object>()), ...(await import("./support/api-harness")).queueModule }));

const base = "@/app/api/v1/workspaces/[workspace]";
const m = {
  scenarios: await import(`${base}/scenarios/route`),
  scenario: await import(`${base}/scenarios/[id]/route`),
  revisions: await import(`${base}/scenarios/[id]/revisions/route`),
  revision: await import(`${base}/scenarios/[id]/revisions/[revision]/route`),
  runs: await import(`${base}/runs/route`),
  run: await import(`${base}/runs/[id]/route`),
  runCancel: await import(`${base}/runs/[id]/cancel/route`),
  runCsv: await import(`${base}/runs/[id]/export.csv/route`),
  runJson: await import(`${base}/runs/[id]/export.json/route`),
  sweeps: await import(`${base}/sweeps/route`),
  sweep: await import(`${base}/sweeps/[id]/route`),
  sweepCancel: await import(`${base}/sweeps/[id]/cancel/route`),
  sweepCsv: await import(`${base}/sweeps/[id]/export.csv/route`),
  sweepJson: await import(`${base}/sweeps/[id]/export.json/route`),
  workspaces: await import("@/app/api/v1/workspaces/route"),
};

let harness: Harness;
let db: Database;
let team: Team;
let ids: { scenario: string; run: string; sweep: string };

type Handler = (request: Request, context: { params: Promise<Record<string, string>> }) => Promise<Response>;
interface Route {
  name: string;
  handler: Handler;
  params: () => Record<string, string>;
  method: string;
  /** A body a permitted caller could send (writes only). */
  body?: () => unknown;
}

const routes: Route[] = [
  { name: "GET scenarios", handler: m.scenarios.GET, params: () => ({}), method: "GET" },
  { name: "POST scenarios", handler: m.scenarios.POST, params: () => ({}), method: "POST", body: () => ({ name: "n", scenario: smallScenario() }) },
  { name: "GET scenarios/{id}", handler: m.scenario.GET, params: () => ({ id: ids.scenario }), method: "GET" },
  { name: "PATCH scenarios/{id}", handler: m.scenario.PATCH, params: () => ({ id: ids.scenario }), method: "PATCH", body: () => ({ name: "renamed" }) },
  { name: "GET revisions", handler: m.revisions.GET, params: () => ({ id: ids.scenario }), method: "GET" },
  { name: "GET revisions/{n}", handler: m.revision.GET, params: () => ({ id: ids.scenario, revision: "1" }), method: "GET" },
  { name: "GET runs", handler: m.runs.GET, params: () => ({}), method: "GET" },
  { name: "POST runs", handler: m.runs.POST, params: () => ({}), method: "POST", body: () => ({ scenarioId: ids.scenario }) },
  { name: "GET runs/{id}", handler: m.run.GET, params: () => ({ id: ids.run }), method: "GET" },
  { name: "POST runs/{id}/cancel", handler: m.runCancel.POST, params: () => ({ id: ids.run }), method: "POST" },
  { name: "GET runs/{id}/export.csv", handler: m.runCsv.GET, params: () => ({ id: ids.run }), method: "GET" },
  { name: "GET runs/{id}/export.json", handler: m.runJson.GET, params: () => ({ id: ids.run }), method: "GET" },
  { name: "GET sweeps", handler: m.sweeps.GET, params: () => ({}), method: "GET" },
  { name: "POST sweeps", handler: m.sweeps.POST, params: () => ({}), method: "POST", body: () => ({ scenarioId: ids.scenario, parameter: "servers", values: [4, 5] }) },
  { name: "GET sweeps/{id}", handler: m.sweep.GET, params: () => ({ id: ids.sweep }), method: "GET" },
  { name: "POST sweeps/{id}/cancel", handler: m.sweepCancel.POST, params: () => ({ id: ids.sweep }), method: "POST" },
  { name: "GET sweeps/{id}/export.csv", handler: m.sweepCsv.GET, params: () => ({ id: ids.sweep }), method: "GET" },
  { name: "GET sweeps/{id}/export.json", handler: m.sweepJson.GET, params: () => ({ id: ids.sweep }), method: "GET" },
];
const writes = routes.filter((r) => r.method !== "GET");

const request = (route: Route, caller: Caller, workspace = team.slug) =>
  call(route.handler, { workspace, ...route.params() }, { caller, method: route.method, ...(route.body ? { body: route.body() } : {}) });


beforeAll(async () => {
  harness = await openHarness("sluice");
  ({ db, team } = harness);
  const as = { session: team.users.engineer };
  const scenario = (await call(m.scenarios.POST, { workspace: team.slug }, { caller: as, body: { name: "Guarded", scenario: smallScenario() } })).body.id;
  const run = (await call(m.runs.POST, { workspace: team.slug }, { caller: as, body: { scenarioId: scenario } })).body.id;
  const sweep = (await call(m.sweeps.POST, { workspace: team.slug }, { caller: as, body: { scenarioId: scenario, parameter: "servers", values: [4, 5] } })).body.id;
  ids = { scenario, run, sweep };
});
afterAll(async () => harness.close());

describe("every route's role rules", () => {
  it("answers 401 without credentials", async () => {
    for (const route of routes) expect((await request(route, null)).status, route.name).toBe(401);
  });

  it("answers 404 to a member of another workspace, in either workspace's path", async () => {
    for (const route of routes) {
      expect((await request(route, { session: team.users.outsider })).status, route.name).toBe(404);
      if (route.params().id) expect((await request(route, { session: team.users.outsider }, team.otherSlug)).status, `${route.name} (own workspace)`).toBe(404);
    }
  });

  it("answers 403 to a viewer on every write, and lets the viewer read", async () => {
    for (const route of writes) {
      const r = await request(route, { session: team.users.viewer });
      expect(r.status, route.name).toBe(403);
      expect(r.body.error.code).toBe("forbidden");
    }
    for (const route of routes.filter((r) => r.method === "GET" && !r.name.includes("runs/{id}/export"))) expect((await request(route, { session: team.users.viewer })).status, route.name).toBe(200);
  });

  it("accepts an engineer's API token on every route, and refuses it outside its workspace", async () => {
    const token = await tokenFor(db, team, "engineer");
    for (const route of routes.filter((r) => !r.name.includes("cancel") && !r.name.includes("runs/{id}/export"))) {
      expect([200, 201, 202], route.name).toContain((await request(route, { token })).status);
    }
    expect((await request(routes[0], { token }, team.otherSlug)).status).toBe(404);
  });

  it("lists only the token's own workspace to a token, and every membership to a session", async () => {
    // The engineer also belongs to the other workspace; a token made in this one must not reveal it.
    await db.insert(memberships).values({ userId: team.users.engineer, workspaceId: team.otherWorkspaceId, role: "viewer" });
    try {
      const token = await tokenFor(db, team, "engineer");
      const viaToken = await call(m.workspaces.GET, {}, { caller: { token } });
      expect(viaToken.status).toBe(200);
      expect(viaToken.body.workspaces.map((w: { slug: string }) => w.slug)).toEqual([team.slug]);
      const viaSession = await call(m.workspaces.GET, {}, { caller: { session: team.users.engineer } });
      expect(viaSession.body.workspaces.map((w: { slug: string }) => w.slug).sort()).toEqual([team.slug, team.otherSlug].sort());
    } finally {
      await db.delete(memberships).where(and(eq(memberships.userId, team.users.engineer), eq(memberships.workspaceId, team.otherWorkspaceId)));
    }
  });

  it("gives a viewer's token the viewer's rights, and follows a role change at once", async () => {
    const token = await tokenFor(db, team, "viewer");
    expect((await request(routes[0], { token })).status).toBe(200);
    for (const route of writes) expect((await request(route, { token })).status, route.name).toBe(403);
    await db.update(memberships).set({ role: "engineer" }).where(and(eq(memberships.userId, team.users.viewer), eq(memberships.workspaceId, team.workspaceId)));
    expect((await request(routes[1], { token })).status).toBe(201);
    await db.update(memberships).set({ role: "viewer" }).where(and(eq(memberships.userId, team.users.viewer), eq(memberships.workspaceId, team.workspaceId)));
  });

  it("answers 401 to a revoked token and to the token of a removed member, on every route", async () => {
    const revoked = await tokenFor(db, team, "engineer");
    const [row] = await db.query.apiTokens.findMany({ where: (t, { eq: is }) => is(t.userId, team.users.engineer), orderBy: (t, { desc }) => desc(t.createdAt), limit: 1 });
    await revokeApiToken(db, { workspaceId: team.workspaceId, tokenId: row.id, actorUserId: team.users.admin, anyOwner: true });
    const removedOwner = await tokenFor(db, team, "reviewer");
    await db.delete(memberships).where(and(eq(memberships.userId, team.users.reviewer), eq(memberships.workspaceId, team.workspaceId)));
    for (const route of routes) {
      expect((await request(route, { token: revoked })).status, `${route.name} (revoked)`).toBe(401);
      expect((await request(route, { token: removedOwner })).status, `${route.name} (removed)`).toBe(401);
    }
    const garbage = await request(routes[0], { token: "spw_not-a-real-token-at-all-xxxx" });
    expect(garbage.status).toBe(401);
  });
});
