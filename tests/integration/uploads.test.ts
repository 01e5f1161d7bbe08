// Issue #9: the upload routes against a real PostgreSQL and queue. Every bad file is a 400 naming the line (or
// the mapping field), and leaves the workspace exactly as it was: no object, no upload row, no audit event, no job.
// The demo file goes through the whole path: stored, characterised by the worker, downloaded, made a scenario.
import { createHash } from "node:crypto";
import { readFileSync } from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { eq, sql } from "drizzle-orm";
import type { Database } from "@/db/client";
import { auditEvents, memberships, scenarioRevisions, scenarios, storedObjects, uploads, users, workspaces } from "@/db/schema";
import { MAX_FILE_BYTES, type Characterisation } from "@/lib/measurement";
import type { UploadDetail, UploadScenarioMade, UploadSummary } from "@/lib/measurement/uploads";
import { startWorker, type RunningWorker } from "@/worker/main";
import { migratedScratchDatabase } from "./support/database";
import { projectRoot, waitFor } from "./support/worker";

// The guard reads the session through next-auth and the request headers; here one variable is "the session".
const session = vi.hoisted(() => ({ userId: null as string | null }));
vi.mock("next/headers", () => ({ headers: async () => new Headers() }));
vi.mock("@/lib/auth/config", () => ({ auth: async () => (session.userId ? { user: { id: session.userId } } : null) }));

const uploadsRoute = await import("@/app/api/v1/workspaces/[workspace]/uploads/route");
const previewRoute = await import("@/app/api/v1/workspaces/[workspace]/uploads/preview/route");
const uploadRoute = await import("@/app/api/v1/workspaces/[workspace]/uploads/[uploadId]/route");
const fileRoute = await import("@/app/api/v1/workspaces/[workspace]/uploads/[uploadId]/file/route");
const scenarioRoute = await import("@/app/api/v1/workspaces/[workspace]/uploads/[uploadId]/scenario/route");
const { closeDatabase } = await import("@/db/client");
const { closeBoss, getBoss } = await import("@/db/queue");

let scratch: Awaited<ReturnType<typeof migratedScratchDatabase>>;
let db: Database;
let worker: RunningWorker | undefined;
const slug = "weir-basin";
let engineer: string;
let viewer: string;
const savedDatabaseUrl = process.env.DATABASE_URL;

beforeAll(async () => {
  scratch = await migratedScratchDatabase();
  db = scratch.db;
  process.env.DATABASE_URL = scratch.url; // the routes' getDatabase() and getBoss() use it
  const [ws] = await db.insert(workspaces).values({ slug, name: "Weir Basin" }).returning();
  [{ id: engineer }, { id: viewer }] = await db.insert(users).values([{ email: "engineer@weir.test" }, { email: "viewer@weir.test" }]).returning();
  await db.insert(memberships).values([
    { userId: engineer, workspaceId: ws.id, role: "engineer" },
    { userId: viewer, workspaceId: ws.id, role: "viewer" },
  ]);
  await getBoss(); // creates pg-boss's tables, so jobs can be counted from the start
});

afterAll(async () => {
  await worker?.stop(1000);
  await closeBoss();
  await closeDatabase();
  process.env.DATABASE_URL = savedDatabaseUrl;
  await scratch?.close();
});

const base = `http://localhost:3000/api/v1/workspaces/${slug}/uploads`;
const ctx = (extra: Record<string, string> = {}) => ({ params: Promise.resolve({ workspace: slug, ...extra }) as never });
const mapping = { kind: "call-records" as const, start: "call_start", duration: "duration_s", outcome: "outcome", group: "route" };

/** `map` null sends no mapping field. */
function multipart(bytes: Uint8Array | string, map: unknown = mapping, fileName = "records.csv"): Request {
  const form = new FormData();
  form.set("file", new File([bytes as BlobPart], fileName, { type: "text/csv" }));
  if (map !== null) form.set("mapping", typeof map === "string" ? map : JSON.stringify(map));
  return new Request(base, { method: "POST", body: form });
}

const raw = (bytes: Uint8Array, map: unknown = mapping) =>
  new Request(`${base}?fileName=raw.csv&mapping=${encodeURIComponent(JSON.stringify(map))}`, { method: "POST", body: bytes as BodyInit, headers: { "content-type": "text/csv" } });

async function post(request: Request, as = engineer) {
  session.userId = as;
  const response = await uploadsRoute.POST(request, ctx());
  return { status: response.status, body: (await response.json()) as { id?: string; error?: { code: string; message: string; fields?: Record<string, string> } } };
}

/** Everything an upload could leave behind. */
async function footprint() {
  const [objects] = await db.select({ n: sql<number>`count(*)::int` }).from(storedObjects);
  const [rows] = await db.select({ n: sql<number>`count(*)::int` }).from(uploads);
  const [audit] = await db.select({ n: sql<number>`count(*)::int` }).from(auditEvents);
  const jobs = await db.execute<{ n: number }>(sql`select count(*)::int as n from pgboss.job where name = 'characterise-upload'`);
  return { objects: objects.n, uploads: rows.n, audit: audit.n, jobs: jobs.rows[0].n };
}

const header = "call_start,duration_s,outcome,route\n";
const row = (second: number, duration = "60", offset = "+01:00") => `2026-01-12T10:00:${String(second).padStart(2, "0")}${offset},${duration},answered,north\n`;
const enc = (text: string) => new TextEncoder().encode(text);

describe("bad files: 400 naming the line, nothing stored", () => {
  const cases: Array<[string, () => Request, string, RegExp]> = [
    ["a mapped column missing from the header", () => multipart(header + row(0), { ...mapping, duration: "holding" }), "missing-column", /line 1.*no column "holding"/],
    ["a row with a wrong number of columns", () => multipart(header + row(0) + "2026-01-12T10:00:05+01:00,60,answered,north,extra\n"), "wrong-field-count", /line 3/],
    ["a non-numeric duration", () => multipart(header + row(0) + row(5, "4O")), "not-a-number", /line 3, column "duration_s": "4O" is not a number/],
    ["a negative duration", () => multipart(header + row(0) + row(5) + row(9, "-12.5")), "negative-duration", /line 4, column "duration_s": -12.5 is negative/],
    ["an unparseable timestamp", () => multipart(header + row(0) + "12/01/2026 10:00,30,answered,north\n"), "bad-timestamp", /line 3, column "call_start"/],
    ["an offset on some rows only", () => multipart(header + row(0) + row(5, "60", "")), "mixed-time-zones", /line 3/],
    ["two unrelated offsets", () => multipart(header + row(0) + row(5, "60", "-05:00")), "mixed-time-zones", /line 3/],
    ["unsorted rows", () => multipart(header + row(5) + row(0)), "unsorted", /line 3.*sort the file/],
    ["a repeated interval start", () => multipart("interval,attempts\n2026-01-12T10:00:00Z,5\n2026-01-12T10:00:00Z,6\n", { kind: "interval-counts", intervalStart: "interval", attempts: "attempts", intervalMinutes: 15 }), "duplicate-row", /line 3, column "interval": repeats the interval start of line 2/],
    ["an empty file", () => multipart(""), "empty-file", /empty/],
    ["a header without rows", () => multipart(header), "no-data", /no data|no rows|only/i],
    ["an invalid UTF-8 byte", () => multipart(new Uint8Array([...enc(header + row(0)), 0x32, 0x30, 0xff, 0x0a])), "wrong-encoding", /line 3/],
    ["a UTF-16 file", () => multipart(new Uint8Array([0xff, 0xfe, ...enc("c\0a\0")])), "wrong-encoding", /UTF-16/],
    ["a file over the size limit", () => raw(new Uint8Array(MAX_FILE_BYTES + 1).fill(0x41)), "file-too-large", /larger than|limit/],
    ["a mapping that is not JSON", () => multipart(header + row(0), "{kind:"), "bad-mapping", /mapping: not valid JSON/],
    ["a mapping of the wrong shape", () => multipart(header + row(0), { kind: "call-records", start: "call_start" }), "bad-mapping", /mapping duration/],
    ["no mapping at all", () => multipart(header + row(0), null), "bad-mapping", /send the column mapping/],
  ];

  for (const [what, request, code, message] of cases) {
    it(`refuses ${what}`, async () => {
      const before = await footprint();
      const { status, body } = await post(request());
      expect(status).toBe(400);
      expect(body.error?.code).toBe(code);
      expect(body.error?.message).toMatch(message);
      expect(Object.values(body.error?.fields ?? {})).toContain(body.error?.message);
      expect(await footprint()).toEqual(before);
    });
  }

  it("refuses a body far over the limit with 413 while it streams, storing nothing", async () => {
    const before = await footprint();
    const { status, body } = await post(raw(new Uint8Array(MAX_FILE_BYTES + 512 * 1024).fill(0x41)));
    expect(status).toBe(413);
    expect(body.error?.message).toMatch(/larger than \d+ bytes/);
    expect(await footprint()).toEqual(before);
  });

  it("refuses a viewer (403) and another media type (415), storing nothing", async () => {
    const before = await footprint();
    expect((await post(multipart(header + row(0)), viewer)).status).toBe(403);
    const json = new Request(base, { method: "POST", body: "{}", headers: { "content-type": "application/json" } });
    expect((await post(json)).status).toBe(415);
    expect(await footprint()).toEqual(before);
  });
});

describe("the demo file, end to end", () => {
  const demo = readFileSync(path.join(projectRoot, "public/demo/measured-call-records.csv"));
  let id: string;

  it("previews the header and first rows with a guessed mapping, storing nothing", async () => {
    const before = await footprint();
    session.userId = engineer;
    const form = new FormData();
    form.set("file", new File([demo], "measured-call-records.csv"));
    const response = await previewRoute.POST(new Request(`${base}/preview`, { method: "POST", body: form }), ctx());
    expect(response.status).toBe(200);
    const preview = (await response.json()) as { header: string[]; rows: string[][]; lines: number[]; guess: unknown };
    expect(preview.header).toEqual(["call_start", "duration_s", "outcome", "route"]);
    expect(preview.lines.slice(0, 3)).toEqual([2, 3, 4]);
    expect(preview.guess).toEqual(mapping);
    expect(await footprint()).toEqual(before);
  });

  it("stores the file, its row, an audit event and one characterise job together (202)", async () => {
    const before = await footprint();
    const { status, body } = await post(multipart(demo, mapping, "measured-call-records.csv"));
    expect(status).toBe(202);
    id = body.id!;
    expect(await footprint()).toEqual({ objects: before.objects + 1, uploads: before.uploads + 1, audit: before.audit + 1, jobs: before.jobs + 1 });
    const [event] = await db.select().from(auditEvents).where(eq(auditEvents.subjectId, id));
    expect(event.action).toBe("upload.created");
  });

  it("refuses to make a scenario before the characterisation is ready (409)", async () => {
    session.userId = engineer;
    const response = await scenarioRoute.POST(new Request(`${base}/${id}/scenario`, { method: "POST", body: "{}", headers: { "content-type": "application/json" } }), ctx({ uploadId: id }));
    expect(response.status).toBe(409);
  });

  it("is characterised by the worker and reads back as ready", async () => {
    worker = await startWorker(scratch.url, { threads: 1, log: () => {} });
    session.userId = viewer; // members read
    const detail = await waitFor(
      "the upload to be characterised",
      async () => {
        const response = await uploadRoute.GET(new Request(`${base}/${id}`), ctx({ uploadId: id }));
        const body = (await response.json()) as UploadDetail;
        return body.status === "ready" || body.status === "failed" ? body : undefined;
      },
      50_000,
      250,
    );
    expect(detail.error).toBeNull();
    expect(detail.status).toBe("ready");
    expect(detail.progress).toBe(1);
    const c = detail.characterisation as Characterisation;
    // The demo's busy hour is 10:00–11:00 by construction (lib/measurement/demo.ts); the recovery of its
    // parameters within sample-size tolerances is tests/unit/measurement/demo.test.ts.
    expect(c.busyHour.label).toMatch(/^10:00/);
    expect(c.busyHour.definition).toMatch(/ITU-T E.500/);
    expect(c.holding?.fits.length).toBeGreaterThanOrEqual(4);

    const list = (await (await uploadsRoute.GET(new Request(base), ctx())).json()) as { items: UploadSummary[] };
    expect(list.items.map((u) => [u.id, u.fileName, u.status])).toEqual([[id, "measured-call-records.csv", "ready"]]);
  }, 60_000);

  it("gives any member the exact bytes back", async () => {
    session.userId = viewer;
    const response = await fileRoute.GET(new Request(`${base}/${id}/file`), ctx({ uploadId: id }));
    expect(response.status).toBe(200);
    expect(response.headers.get("content-disposition")).toMatch(/attachment; filename="measured-call-records.csv"/);
    const bytes = Buffer.from(await response.arrayBuffer());
    expect(createHash("sha256").update(bytes).digest("hex")).toBe(createHash("sha256").update(demo).digest("hex"));
  });

  it("makes a busy-hour scenario and a whole-day one (engineers only)", async () => {
    const make = (body: unknown) => scenarioRoute.POST(new Request(`${base}/${id}/scenario`, { method: "POST", body: JSON.stringify(body), headers: { "content-type": "application/json" } }), ctx({ uploadId: id }));
    session.userId = viewer;
    expect((await make({})).status).toBe(403);
    session.userId = engineer;
    const bad = await make({ source: "night" });
    expect(bad.status).toBe(400);

    const busy = await make({ source: "busy-hour" });
    expect(busy.status).toBe(201);
    const made = (await busy.json()) as UploadScenarioMade;
    // The demo's busy hour is an on-off stream with peakedness about 2: above the Poisson tolerance.
    expect(made.made.arrivals.model).toBe("on-off");
    const [revision] = await db.select().from(scenarioRevisions).where(eq(scenarioRevisions.scenarioId, made.scenarioId));
    expect((revision.body as { servers: number }).servers).toBe(made.made.servers.value);

    const day = await make({ source: "daily-profile", name: "Whole day" });
    expect(day.status).toBe(201);
    const dayMade = (await day.json()) as UploadScenarioMade;
    expect(dayMade.made.arrivals.model).toBe("time-varying");
    const [stored] = await db.select().from(scenarios).where(eq(scenarios.id, dayMade.scenarioId));
    expect(stored.name).toBe("Whole day");
  });

  it("records a file the worker cannot read as failed, with the line, instead of leaving it characterising", async () => {
    const { insertUpload } = await import("@/db/queries/uploads");
    const { characteriseUpload } = await import("@/worker/handlers/characterise-upload");
    const [ws] = await db.select().from(workspaces).where(eq(workspaces.slug, slug));
    // Stored behind the route's back (as if the rules had changed since): the third line starts before the second.
    const stored = await db.transaction((tx) =>
      insertUpload(tx, { workspaceId: ws.id, userId: engineer, fileName: "old.csv", mapping: { ...mapping, durationUnit: "seconds", timeZone: "Z" }, bytes: enc(header + row(5) + row(0)), contentType: "text/csv" }),
    );
    await characteriseUpload({ db, log: () => {} } as never, { uploadId: stored.id });
    const [after] = await db.select().from(uploads).where(eq(uploads.id, stored.id));
    expect(after.status).toBe("failed");
    expect(after.error).toMatch(/could not be characterised: line 3, column "call_start": .* is earlier than .* on line 2; sort the file by call_start$/);
    // A second delivery of the same job changes nothing.
    await characteriseUpload({ db, log: () => {} } as never, { uploadId: stored.id });
    expect((await db.select().from(uploads).where(eq(uploads.id, stored.id)))[0]).toEqual(after);
  });

  it("stores a data limitation (no complete clock hour) as a permanent failure with its message, without retrying", async () => {
    const { insertUpload } = await import("@/db/queries/uploads");
    const { characteriseUpload } = await import("@/worker/handlers/characterise-upload");
    const [ws] = await db.select().from(workspaces).where(eq(workspaces.slug, slug));
    const stored = await db.transaction((tx) =>
      insertUpload(tx, { workspaceId: ws.id, userId: engineer, fileName: "one.csv", mapping: { ...mapping, durationUnit: "seconds", timeZone: "Z" }, bytes: enc(header + row(0)), contentType: "text/csv" }),
    );
    // retries left, yet no throw: an input error is not retried
    await characteriseUpload({ db, log: () => {} } as never, { uploadId: stored.id }, { retryCount: 0, retryLimit: 3 } as never);
    const [after] = await db.select().from(uploads).where(eq(uploads.id, stored.id));
    expect(after.status).toBe("failed");
    expect(after.error).toMatch(/^The file could not be characterised: the measurement covers no complete clock hour/);
  }, 60_000);

  it("retries any other failure while pg-boss may, then stores it as a worker failure", async () => {
    const { insertUpload } = await import("@/db/queries/uploads");
    const { characteriseUpload } = await import("@/worker/handlers/characterise-upload");
    const [ws] = await db.select().from(workspaces).where(eq(workspaces.slug, slug));
    const stored = await db.transaction((tx) =>
      insertUpload(tx, { workspaceId: ws.id, userId: engineer, fileName: "lost.csv", mapping: { ...mapping, durationUnit: "seconds", timeZone: "Z" }, bytes: enc(header + row(0)), contentType: "text/csv" }),
    );
    // A passing database fault while the stored file is read (the handler's second select), not the file's fault.
    const flaky = () => {
      let selects = 0;
      return new Proxy(db, {
        get: (target, key) =>
          key === "select"
            ? (...args: unknown[]) => {
                if (++selects === 2) throw new Error("connection reset");
                return (target.select as (...a: unknown[]) => unknown)(...args);
              }
            : Reflect.get(target, key),
      });
    };
    await expect(characteriseUpload({ db: flaky(), log: () => {} } as never, { uploadId: stored.id }, { retryCount: 0, retryLimit: 3 } as never)).rejects.toThrow(/connection reset/);
    expect((await db.select().from(uploads).where(eq(uploads.id, stored.id)))[0].status).toBe("characterising");
    // the last try: stored as the worker's failure
    await characteriseUpload({ db: flaky(), log: () => {} } as never, { uploadId: stored.id }, { retryCount: 3, retryLimit: 3 } as never);
    const [after] = await db.select().from(uploads).where(eq(uploads.id, stored.id));
    expect(after.status).toBe("failed");
    expect(after.error).toMatch(/^The file could not be characterised: the worker failed \(/);
  }, 60_000);

  it("answers 404 for an upload of another workspace or none", async () => {
    session.userId = engineer;
    expect((await uploadRoute.GET(new Request(`${base}/nope`), ctx({ uploadId: "nope" }))).status).toBe(404);
    expect((await fileRoute.GET(new Request(`${base}/nope/file`), ctx({ uploadId: "nope" }))).status).toBe(404);
  });
});

describe("the demo seed's measured traffic", () => {
  it("stores the demo file in the demo workspace as a ready, characterised upload, once", async () => {
    const { seedDemoTraffic } = await import("@/db/demo-traffic");
    const [ws] = await db.insert(workspaces).values({ slug: "kestrel-fen", name: "Kestrel Fen" }).returning();
    const [user] = await db.insert(users).values({ email: "engineer@kestrel-fen.test" }).returning();
    await db.insert(memberships).values({ userId: user.id, workspaceId: ws.id, role: "engineer" });
    await seedDemoTraffic(db);
    await seedDemoTraffic(db);
    const rows = await db.select().from(uploads).where(eq(uploads.workspaceId, ws.id));
    expect(rows).toHaveLength(1);
    expect(rows[0].status).toBe("ready");
    expect(rows[0].fileName).toBe("measured-call-records.csv");
    expect((rows[0].characterisation as unknown as Characterisation).busyHour.label).toMatch(/^10:00/);
  }, 60_000);
});
