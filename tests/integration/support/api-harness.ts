// Calls route handlers directly (no HTTP server, no build), as a signed-in session, an API token or nobody,
// against a scratch database and a real pg-boss on it. Each test file mocks next/headers, next-auth's `auth`,
// getDatabase and getBoss with the factories below:
//
//   vi.mock("next/headers", async () => (await import("./support/api-harness")).headersModule);
//   vi.mock("@/lib/auth/config", async () => (await import("./support/api-harness")).authModule);
//   vi.mock("@/db/client", async (original) => ({ ...(await original()), ...(await import("./support/api-harness")).databaseModule }));
//   vi.mock("@/db/queue", async (original) => ({ ...(await original()), ...(await import("./support/api-harness")).queueModule }));
import type PgBoss from "pg-boss";
import type { Database } from "@/db/client";
import { memberships, users, workspaces } from "@/db/schema";
import { createApiToken } from "@/db/queries/tokens";
import type { WorkspaceRole } from "@/lib/schemas/roles";

/** Who the next request comes from. */
export type Caller = { session: string } | { token: string } | null;

export const state: { caller: Caller; db: Database | null; boss: PgBoss | (() => Promise<PgBoss>) | null } = { caller: null, db: null, boss: null };

export const headersModule = {
  headers: async () => new Headers(state.caller && "token" in state.caller ? { authorization: `Bearer ${state.caller.token}` } : {}),
  cookies: async () => ({ get: () => undefined }),
};
export const authModule = {
  auth: async () => (state.caller && "session" in state.caller ? { user: { id: state.caller.session } } : null),
  authBasePath: "/api/v1/auth",
};
export const databaseModule = {
  getDatabase: () => {
    if (!state.db) throw new Error("harness: no database");
    return state.db;
  },
};
export const queueModule = {
  getBoss: async () => {
    if (!state.boss) throw new Error("harness: no queue");
    return typeof state.boss === "function" ? state.boss() : state.boss;
  },
};

type Handler<P> = (request: Request, context: { params: Promise<P> }) => Promise<Response>;

export interface ApiReply<T = any> {
  status: number;
  body: T;
  headers: Headers;
  text: string;
}

/**
 * One request to a route handler as `caller`. JSON bodies are sent as application/json; the answer's body is
 * parsed when it is JSON.
 */
export async function call<P, T = any>(
  handler: Handler<P>,
  params: P,
  options: { caller: Caller; method?: string; body?: unknown; query?: Record<string, string>; rawBody?: string; contentType?: string },
): Promise<ApiReply<T>> {
  state.caller = options.caller;
  const url = new URL("http://localhost:3000/api/v1/test");
  for (const [k, v] of Object.entries(options.query ?? {})) url.searchParams.set(k, v);
  const text = options.rawBody ?? (options.body === undefined ? undefined : JSON.stringify(options.body));
  const headers = new Headers();
  if (text !== undefined) headers.set("content-type", options.contentType ?? "application/json");
  if (options.caller && "token" in options.caller) headers.set("authorization", `Bearer ${options.caller.token}`);
  const response = await handler(new Request(url, { method: options.method ?? (text === undefined ? "GET" : "POST"), headers, body: text }), { params: Promise.resolve(params) });
  const body = await response.text();
  let parsed: unknown = body;
  if ((response.headers.get("content-type") ?? "").includes("application/json")) parsed = body ? JSON.parse(body) : null;
  return { status: response.status, body: parsed as T, headers: response.headers, text: body };
}

export interface Team {
  workspaceId: string;
  slug: string;
  otherSlug: string;
  otherWorkspaceId: string;
  users: Record<WorkspaceRole | "outsider", string>;
}

/** Workspace `slug` with one member per role, and a second workspace whose admin is the outsider. */
export async function createTeam(db: Database, slug: string): Promise<Team> {
  const [ws, other] = await db.insert(workspaces).values([{ slug, name: `Test ${slug}` }, { slug: `${slug}-other`, name: `Other ${slug}` }]).returning();
  const roles = ["admin", "engineer", "reviewer", "viewer", "outsider"] as const;
  const rows = await db.insert(users).values(roles.map((role) => ({ email: `${role}@${slug}.test`, name: `${role} of ${slug}` }))).returning();
  const ids = Object.fromEntries(roles.map((role, i) => [role, rows[i].id])) as Team["users"];
  await db.insert(memberships).values([
    ...(["admin", "engineer", "reviewer", "viewer"] as const).map((role) => ({ userId: ids[role], workspaceId: ws.id, role })),
    { userId: ids.outsider, workspaceId: other.id, role: "admin" as const },
  ]);
  return { workspaceId: ws.id, slug, otherSlug: other.slug, otherWorkspaceId: other.id, users: ids };
}

export async function tokenFor(db: Database, team: Team, role: WorkspaceRole): Promise<string> {
  return (await createApiToken(db, { workspaceId: team.workspaceId, userId: team.users[role], name: `${role} token` })).token;
}

/** A small valid scenario (seconds of work for a worker, never run here). */
export const smallScenario = (seed = 11) => ({
  servers: 5,
  arrivals: { process: "poisson", rate: 4 },
  holding: { law: "exponential", mean: 1 },
  run: { seed, replications: 4, callsPerReplication: 5000 },
});

export interface Harness {
  db: Database;
  /** The scratch database's address (for an in-process worker on it). */
  url: string;
  boss: PgBoss;
  team: Team;
  /** Takes every waiting job of a queue (so later checks count from zero) and returns their payloads. */
  drain: (queue: string) => Promise<Record<string, unknown>[]>;
  close: () => Promise<void>;
}

/** A migrated scratch database, a web pg-boss client on it, and a team in workspace `slug`; wired into the mocks. */
export async function openHarness(slug: string): Promise<Harness> {
  const { migratedScratchDatabase } = await import("./database");
  const { createBoss } = await import("@/db/queue");
  const scratch = await migratedScratchDatabase();
  const boss = await createBoss(scratch.url, "web");
  state.db = scratch.db;
  state.boss = boss;
  return {
    db: scratch.db,
    url: scratch.url,
    boss,
    team: await createTeam(scratch.db, slug),
    drain: async (queue) => {
      const jobs = (await boss.fetch(queue, { batchSize: 100 })) ?? [];
      if (jobs.length) await boss.complete(queue, jobs.map((j) => j.id));
      return jobs.map((j) => j.data as Record<string, unknown>);
    },
    close: async () => {
      await boss.stop({ graceful: false, wait: true });
      await scratch.close();
    },
  };
}
