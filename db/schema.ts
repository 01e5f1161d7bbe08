import { sql } from "drizzle-orm";
import {
  bigint,
  bigserial,
  customType,
  doublePrecision,
  boolean,
  index,
  integer,
  jsonb,
  pgEnum,
  pgTable,
  primaryKey,
  text,
  timestamp,
  uniqueIndex,
} from "drizzle-orm/pg-core";
import { workspaceRoles } from "../lib/schemas/roles";
import { jobStatuses } from "../lib/schemas/job-status";
import { UPLOAD_KINDS, UPLOAD_STATUSES } from "../lib/measurement/uploads";

const id = () => text("id").primaryKey().$defaultFn(() => crypto.randomUUID());
const createdAt = () => timestamp("created_at", { withTimezone: true, mode: "date" }).notNull().defaultNow();

export const workspaceRole = pgEnum("workspace_role", workspaceRoles);

// Users, accounts, sessions and verification tokens follow @auth/drizzle-adapter's expected columns.
export const users = pgTable(
  "users",
  {
    id: id(),
    name: text("name"),
    email: text("email").notNull(),
    emailVerified: timestamp("email_verified", { withTimezone: true, mode: "date" }),
    image: text("image"),
    passwordHash: text("password_hash"),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("users_email_lower_idx").on(sql`lower(${t.email})`)],
);

export const accounts = pgTable(
  "accounts",
  {
    userId: text("user_id").notNull().references(() => users.id, { onDelete: "cascade" }),
    type: text("type").notNull(),
    provider: text("provider").notNull(),
    providerAccountId: text("provider_account_id").notNull(),
    refresh_token: text("refresh_token"),
    access_token: text("access_token"),
    expires_at: integer("expires_at"),
    token_type: text("token_type"),
    scope: text("scope"),
    id_token: text("id_token"),
    session_state: text("session_state"),
  },
  (t) => [primaryKey({ columns: [t.provider, t.providerAccountId] })],
);

export const sessions = pgTable("sessions", {
  sessionToken: text("session_token").primaryKey(),
  userId: text("user_id").notNull().references(() => users.id, { onDelete: "cascade" }),
  expires: timestamp("expires", { withTimezone: true, mode: "date" }).notNull(),
});

export const verificationTokens = pgTable(
  "verification_tokens",
  {
    identifier: text("identifier").notNull(),
    token: text("token").notNull(),
    expires: timestamp("expires", { withTimezone: true, mode: "date" }).notNull(),
  },
  (t) => [primaryKey({ columns: [t.identifier, t.token] })],
);

export const workspaces = pgTable("workspaces", {
  id: id(),
  slug: text("slug").notNull().unique(),
  name: text("name").notNull(),
  description: text("description").notNull().default(""),
  /** Sizing that protects people (emergency lines, hospital beds): the UI shows the safety caution. */
  safetyCritical: boolean("safety_critical").notNull().default(false),
  createdAt: createdAt(),
});

export const memberships = pgTable(
  "memberships",
  {
    userId: text("user_id").notNull().references(() => users.id, { onDelete: "cascade" }),
    workspaceId: text("workspace_id").notNull().references(() => workspaces.id, { onDelete: "cascade" }),
    role: workspaceRole("role").notNull(),
    createdAt: createdAt(),
  },
  (t) => [primaryKey({ columns: [t.userId, t.workspaceId] }), index("memberships_workspace_idx").on(t.workspaceId)],
);

export const invitations = pgTable(
  "invitations",
  {
    id: id(),
    workspaceId: text("workspace_id").notNull().references(() => workspaces.id, { onDelete: "cascade" }),
    email: text("email").notNull(),
    role: workspaceRole("role").notNull(),
    /** SHA-256 of the link token: the token itself is only ever in the e-mail. */
    tokenHash: text("token_hash").notNull().unique(),
    invitedBy: text("invited_by").references(() => users.id, { onDelete: "set null" }),
    expiresAt: timestamp("expires_at", { withTimezone: true, mode: "date" }).notNull(),
    acceptedAt: timestamp("accepted_at", { withTimezone: true, mode: "date" }),
    revokedAt: timestamp("revoked_at", { withTimezone: true, mode: "date" }),
    createdAt: createdAt(),
  },
  (t) => [index("invitations_workspace_idx").on(t.workspaceId)],
);

export const auditEvents = pgTable(
  "audit_events",
  {
    id: bigserial("id", { mode: "number" }).primaryKey(),
    workspaceId: text("workspace_id").references(() => workspaces.id, { onDelete: "cascade" }),
    actorUserId: text("actor_user_id").references(() => users.id, { onDelete: "set null" }),
    action: text("action").notNull(),
    subjectType: text("subject_type"),
    subjectId: text("subject_id"),
    detail: jsonb("detail").$type<Record<string, unknown>>().notNull().default({}),
    createdAt: createdAt(),
  },
  (t) => [index("audit_events_workspace_idx").on(t.workspaceId, t.createdAt)],
);

/** Password sign-in attempts, for the failed-attempt rate limit. */
export const signInAttempts = pgTable(
  "sign_in_attempts",
  {
    id: bigserial("id", { mode: "number" }).primaryKey(),
    email: text("email").notNull(),
    /** Who tried (the client address as the web server saw it), for the per-client limit. */
    client: text("client").notNull().default(""),
    succeeded: boolean("succeeded").notNull(),
    createdAt: createdAt(),
  },
  (t) => [index("sign_in_attempts_email_idx").on(t.email, t.createdAt), index("sign_in_attempts_client_idx").on(t.client, t.createdAt)],
);

/** Messages received by the local fake SMTP server (dev and tests only). */
export const capturedMail = pgTable(
  "captured_mail",
  {
    id: bigserial("id", { mode: "number" }).primaryKey(),
    envelopeFrom: text("envelope_from").notNull(),
    envelopeTo: text("envelope_to").array().notNull(),
    subject: text("subject").notNull().default(""),
    textBody: text("text_body").notNull().default(""),
    htmlBody: text("html_body"),
    /** From the X-Spillway-Workspace header: the workspace the message concerns (null for sign-in links). */
    workspaceId: text("workspace_id"),
    /** From the X-Spillway-Kind header, e.g. "invitation" or "sign-in-link". */
    kind: text("kind").notNull().default(""),
    receivedAt: timestamp("received_at", { withTimezone: true, mode: "date" }).notNull().defaultNow(),
  },
  (t) => [index("captured_mail_received_idx").on(t.receivedAt), index("captured_mail_workspace_idx").on(t.workspaceId, t.receivedAt)],
);

// ---------------------------------------------------------------------------------------------
// Background runs, sweeps and sizing searches (issue #7), review decisions (issue #8), API tokens.
// ---------------------------------------------------------------------------------------------

export { jobStatuses };
export const jobStatus = pgEnum("job_status", jobStatuses);
export const sweepKinds = ["sweep", "grid", "dimensioning"] as const;
export const sweepKind = pgEnum("sweep_kind", sweepKinds);
export const reviewStatuses = ["unreviewed", "approved", "changes-requested"] as const;
export const reviewStatus = pgEnum("review_status", reviewStatuses);

const at = (name: string) => timestamp(name, { withTimezone: true, mode: "date" });

/** A named scenario in a workspace; its content lives in immutable revisions. */
export const scenarios = pgTable(
  "scenarios",
  {
    id: id(),
    workspaceId: text("workspace_id").notNull().references(() => workspaces.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    description: text("description").notNull().default(""),
    /** Number of the newest revision (1-based). */
    latestRevision: integer("latest_revision").notNull().default(1),
    createdBy: text("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
    updatedAt: at("updated_at").notNull().defaultNow(),
  },
  (t) => [index("scenarios_workspace_idx").on(t.workspaceId, t.updatedAt)],
);

/** Every edit is a new row; a run points at the exact revision it simulated. */
export const scenarioRevisions = pgTable(
  "scenario_revisions",
  {
    id: id(),
    scenarioId: text("scenario_id").notNull().references(() => scenarios.id, { onDelete: "cascade" }),
    revision: integer("revision").notNull(),
    /** The scenario JSON, as validated by lib/simulation/scenario.ts. */
    body: jsonb("body").$type<Record<string, unknown>>().notNull(),
    note: text("note").notNull().default(""),
    createdBy: text("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("scenario_revisions_scenario_revision_idx").on(t.scenarioId, t.revision)],
);

/** Sweeps, two-parameter grids and simulation-based dimensioning searches: one row, one run per point. */
export const sweeps = pgTable(
  "sweeps",
  {
    id: id(),
    workspaceId: text("workspace_id").notNull().references(() => workspaces.id, { onDelete: "cascade" }),
    kind: sweepKind("kind").notNull(),
    scenarioId: text("scenario_id").references(() => scenarios.id, { onDelete: "set null" }),
    scenarioRevisionId: text("scenario_revision_id").references(() => scenarioRevisions.id, { onDelete: "set null" }),
    /** Optional label given at submission. */
    name: text("name").notNull().default(""),
    /** The base scenario as run (inline or copied from the revision). */
    scenario: jsonb("scenario").$type<Record<string, unknown>>().notNull(),
    /** Parameter(s), values, target: lib/jobs/contracts.ts `sweepDefinitionSchema`. */
    definition: jsonb("definition").$type<Record<string, unknown>>().notNull(),
    status: jobStatus("status").notNull().default("queued"),
    pointsPlanned: integer("points_planned").notNull().default(0),
    pointsDone: integer("points_done").notNull().default(0),
    /** Summary once finished (curve, map, or the dimensioning answer). */
    result: jsonb("result").$type<Record<string, unknown>>(),
    error: text("error"),
    reviewStatus: reviewStatus("review_status").notNull().default("unreviewed"),
    submittedBy: text("submitted_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
    startedAt: at("started_at"),
    finishedAt: at("finished_at"),
  },
  (t) => [index("sweeps_workspace_idx").on(t.workspaceId, t.createdAt)],
);

export const runs = pgTable(
  "runs",
  {
    id: id(),
    workspaceId: text("workspace_id").notNull().references(() => workspaces.id, { onDelete: "cascade" }),
    scenarioId: text("scenario_id").references(() => scenarios.id, { onDelete: "set null" }),
    scenarioRevisionId: text("scenario_revision_id").references(() => scenarioRevisions.id, { onDelete: "set null" }),
    /** Optional label given at submission (lists show the scenario's name when empty). */
    name: text("name").notNull().default(""),
    /** The exact scenario simulated (a copy, so deleting a scenario never changes a result). */
    scenario: jsonb("scenario").$type<Record<string, unknown>>().notNull(),
    seed: bigint("seed", { mode: "number" }).notNull(),
    /** lib/simulation/plan.ts `RunPlan`: chunk size, initial chunks, precision stop. */
    plan: jsonb("plan").$type<Record<string, unknown>>().notNull(),
    status: jobStatus("status").notNull().default("queued"),
    replicationsPlanned: integer("replications_planned").notNull(),
    replicationsDone: integer("replications_done").notNull().default(0),
    /** Fraction of planned work done, including progress inside running chunks (0..1). */
    progress: doublePrecision("progress").notNull().default(0),
    /** The SimulationResult (same shape as `simulate --json`); partial when cancelled. */
    result: jsonb("result").$type<Record<string, unknown>>(),
    /** Analytic references computed once, when the run starts. */
    references: jsonb("references").$type<unknown[]>(),
    /** True when the result covers only the chunks done before a cancel. */
    partial: boolean("partial").notNull().default(false),
    error: text("error"),
    sweepId: text("sweep_id").references(() => sweeps.id, { onDelete: "cascade" }),
    /** Position of this run in its sweep (point index) and the swept parameter values. */
    sweepPoint: integer("sweep_point"),
    sweepValues: jsonb("sweep_values").$type<Record<string, number>>(),
    reviewStatus: reviewStatus("review_status").notNull().default("unreviewed"),
    submittedBy: text("submitted_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
    startedAt: at("started_at"),
    finishedAt: at("finished_at"),
  },
  (t) => [
    index("runs_workspace_idx").on(t.workspaceId, t.createdAt),
    index("runs_workspace_status_idx").on(t.workspaceId, t.status),
    uniqueIndex("runs_sweep_point_idx").on(t.sweepId, t.sweepPoint),
  ],
);

/** One chunk of replications of a run; the (run, chunk) key makes redelivered chunks idempotent. */
export const runChunks = pgTable(
  "run_chunks",
  {
    runId: text("run_id").notNull().references(() => runs.id, { onDelete: "cascade" }),
    chunk: integer("chunk").notNull(),
    firstReplication: integer("first_replication").notNull(),
    replications: integer("replications").notNull(),
    /** lib/simulation/aggregate.ts `PartialAggregate` (JSON-safe); null until the chunk is done. */
    aggregate: jsonb("aggregate").$type<Record<string, unknown>>(),
    /** Fraction of this chunk done, written while it runs. */
    progress: doublePrecision("progress").notNull().default(0),
    attempts: integer("attempts").notNull().default(0),
    worker: text("worker"),
    startedAt: at("started_at"),
    finishedAt: at("finished_at"),
  },
  (t) => [primaryKey({ columns: [t.runId, t.chunk] })],
);

/** Comments and review decisions on a run or a sweep. */
export const reviewComments = pgTable(
  "review_comments",
  {
    id: id(),
    workspaceId: text("workspace_id").notNull().references(() => workspaces.id, { onDelete: "cascade" }),
    subjectType: text("subject_type").$type<"run" | "sweep">().notNull(),
    subjectId: text("subject_id").notNull(),
    authorId: text("author_id").references(() => users.id, { onDelete: "set null" }),
    body: text("body").notNull().default(""),
    /** Set when the comment is a decision. */
    decision: reviewStatus("decision"),
    createdAt: createdAt(),
  },
  (t) => [index("review_comments_subject_idx").on(t.subjectType, t.subjectId, t.createdAt)],
);

/** Personal API tokens: only the SHA-256 of the secret is stored. */
export const apiTokens = pgTable(
  "api_tokens",
  {
    id: id(),
    workspaceId: text("workspace_id").notNull().references(() => workspaces.id, { onDelete: "cascade" }),
    userId: text("user_id").notNull().references(() => users.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    tokenHash: text("token_hash").notNull().unique(),
    createdAt: createdAt(),
    lastUsedAt: at("last_used_at"),
    revokedAt: at("revoked_at"),
  },
  (t) => [index("api_tokens_workspace_idx").on(t.workspaceId, t.userId)],
);

/** Per-user settings (e-mail notices). */
export const userPreferences = pgTable("user_preferences", {
  userId: text("user_id").primaryKey().references(() => users.id, { onDelete: "cascade" }),
  /** E-mail the submitter when a run or sweep finishes or fails, and on a review decision. */
  notifyByEmail: boolean("notify_by_email").notNull().default(true),
  updatedAt: at("updated_at").notNull().defaultNow(),
});

/** Per-workspace quotas; absent row = the defaults in lib/jobs/quotas.ts. */
export const workspaceQuotas = pgTable("workspace_quotas", {
  workspaceId: text("workspace_id").primaryKey().references(() => workspaces.id, { onDelete: "cascade" }),
  concurrentRuns: integer("concurrent_runs").notNull(),
  callsPerRun: bigint("calls_per_run", { mode: "number" }).notNull(),
  pointsPerSweep: integer("points_per_sweep").notNull(),
});

// ---------------------------------------------------------------------------------------------
// Measured traffic (issue #9): uploaded files kept durably, and their characterisation.
// ---------------------------------------------------------------------------------------------

/** Raw bytes (node-postgres reads bytea as a Buffer). */
const bytea = customType<{ data: Buffer; driverData: Buffer }>({ dataType: () => "bytea" });

/** Durable object storage behind lib/storage's interface: one row per object, bytes inline. */
export const storedObjects = pgTable("stored_objects", {
  key: text("key").primaryKey(),
  workspaceId: text("workspace_id").notNull().references(() => workspaces.id, { onDelete: "cascade" }),
  contentType: text("content_type").notNull(),
  sizeBytes: bigint("size_bytes", { mode: "number" }).notNull(),
  sha256: text("sha256").notNull(),
  bytes: bytea("bytes").notNull(),
  createdAt: createdAt(),
});

export const uploadKind = pgEnum("upload_kind", UPLOAD_KINDS);
export const uploadStatus = pgEnum("upload_status", UPLOAD_STATUSES);

/** A measured-traffic file: its column mapping, where its bytes are, and what the worker made of it. */
export const uploads = pgTable(
  "uploads",
  {
    id: id(),
    workspaceId: text("workspace_id").notNull().references(() => workspaces.id, { onDelete: "cascade" }),
    uploadedBy: text("uploaded_by").references(() => users.id, { onDelete: "set null" }),
    fileName: text("file_name").notNull(),
    kind: uploadKind("kind").notNull(),
    /** lib/measurement `columnMappingSchema`, as parsed. */
    mapping: jsonb("mapping").$type<Record<string, unknown>>().notNull(),
    // NO ACTION (checked at the end of the statement), so deleting a workspace cascades to both tables.
    objectKey: text("object_key").notNull().references(() => storedObjects.key),
    sizeBytes: bigint("size_bytes", { mode: "number" }).notNull(),
    sha256: text("sha256").notNull(),
    status: uploadStatus("status").notNull().default("stored"),
    /** 0..1 while the worker characterises. */
    progress: doublePrecision("progress").notNull().default(0),
    /** lib/measurement `Characterisation` once ready. */
    characterisation: jsonb("characterisation").$type<Record<string, unknown>>(),
    error: text("error"),
    createdAt: createdAt(),
    startedAt: at("started_at"),
    finishedAt: at("finished_at"),
  },
  (t) => [index("uploads_workspace_idx").on(t.workspaceId, t.createdAt)],
);

// ---------------------------------------------------------------------------------------------
// Worker heartbeats: which background workers are alive (db/queries/workers.ts, lib/jobs/worker-heartbeat.ts).
// ---------------------------------------------------------------------------------------------

/**
 * One row per running worker process, refreshed every few seconds; a row not refreshed within the liveness
 * window is a dead or stuck worker. stop() deletes its row; a killed worker's row ages out and is pruned.
 * Times are the database's clock, so workers on other machines with skewed clocks are judged alike. No index on
 * last_seen_at: the table holds a handful of rows, and an index would stop the frequent updates being HOT.
 */
export const workerHeartbeats = pgTable("worker_heartbeats", {
  /** host:pid, the name the worker logs under. */
  name: text("name").primaryKey(),
  host: text("host").notNull(),
  pid: integer("pid").notNull(),
  /** Replication threads of the process. */
  threads: integer("threads").notNull(),
  startedAt: at("started_at").notNull().defaultNow(),
  lastSeenAt: at("last_seen_at").notNull().defaultNow(),
});
