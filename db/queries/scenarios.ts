import { and, count, desc, eq, ilike, or, sql, type SQL } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import type { Database } from "../client";
import { scenarioRevisions, scenarios, users } from "../schema";
import { recordAudit } from "./audit";
import { RecordInputError } from "./errors";
import { afterCursor, containsPattern, keysetOrder, keysetText, pageFrom, type Keyset } from "./paging";
import type { ScenarioListQuery } from "@/lib/schemas/scenarios";
import type { Scenario } from "@/lib/simulation";

/** The one joined user of a query (creator, submitter): aliased so it never clashes with other user joins. */
export const person = alias(users, "person");

type PersonColumns = { id: string; email: string; name: string | null } | null;

/** `{ id, email, name }` of a joined user, or null when the account is gone. */
export const personColumns = { id: person.id, email: person.email, name: person.name };
export const toPerson = (person: PersonColumns) => (person ? { id: person.id, email: person.email, name: person.name } : null);

const summaryColumns = {
  id: scenarios.id,
  name: scenarios.name,
  description: scenarios.description,
  latestRevision: scenarios.latestRevision,
  createdAt: scenarios.createdAt,
  updatedAt: scenarios.updatedAt,
  creator: personColumns,
};

/** Replaces the joined `creator` columns by `createdBy` (null when the account is gone). */
export function withCreator<R extends { creator: PersonColumns }>({ creator: person, ...row }: R) {
  return { ...row, createdBy: toPerson(person) };
}
const summary = withCreator;

export interface NewScenario {
  workspaceId: string;
  userId: string;
  name: string;
  description: string;
  scenario: Scenario;
  note: string;
}

/** A scenario and its revision 1, with an audit event, in one transaction. */
export async function createScenario(db: Database, input: NewScenario) {
  const id = await db.transaction(async (tx) => {
    const [row] = await tx
      .insert(scenarios)
      .values({ workspaceId: input.workspaceId, name: input.name, description: input.description, latestRevision: 1, createdBy: input.userId })
      .returning({ id: scenarios.id });
    await tx.insert(scenarioRevisions).values({ scenarioId: row.id, revision: 1, body: input.scenario, note: input.note, createdBy: input.userId });
    await recordAudit(tx, { workspaceId: input.workspaceId, actorUserId: input.userId, action: "scenario.created", subjectType: "scenario", subjectId: row.id, detail: { name: input.name, revision: 1 } });
    return row.id;
  });
  return (await findScenario(db, input.workspaceId, id))!;
}

const sortColumns = { updated: scenarios.updatedAt, created: scenarios.createdAt, name: scenarios.name } as const;

/** Scenarios of a workspace: search words in name or description, sorted, one keyset page. */
export async function listScenarios(db: Database, workspaceId: string, query: ScenarioListQuery) {
  const keyset: Keyset = {
    column: sortColumns[query.sort],
    type: query.sort === "name" ? "text" : "timestamptz",
    id: scenarios.id,
    order: query.order ?? (query.sort === "name" ? "asc" : "desc"),
  };
  const words = (query.q ?? "").split(/\s+/).filter(Boolean);
  const filters: (SQL | undefined)[] = [
    eq(scenarios.workspaceId, workspaceId),
    ...words.map((word) => or(ilike(scenarios.name, containsPattern(word)), ilike(scenarios.description, containsPattern(word)))),
  ];
  const [rows, [{ total }]] = await Promise.all([
    db
      .select({ ...summaryColumns, sortKey: keysetText(keyset) })
      .from(scenarios)
      .leftJoin(person, eq(person.id, scenarios.createdBy))
      .where(and(...filters, afterCursor(keyset, query.cursor)))
      .orderBy(...keysetOrder(keyset))
      .limit(query.limit + 1),
    db.select({ total: count() }).from(scenarios).where(and(...filters)),
  ]);
  const page = pageFrom(rows, query.limit);
  return { items: page.rows.map(summary), nextCursor: page.nextCursor, total };
}

/** The scenario with its newest revision's document; null when it is not in this workspace. */
export async function findScenario(db: Database, workspaceId: string, scenarioId: string) {
  const [row] = await db
    .select({ ...summaryColumns, scenario: scenarioRevisions.body, revisionNote: scenarioRevisions.note })
    .from(scenarios)
    .innerJoin(scenarioRevisions, and(eq(scenarioRevisions.scenarioId, scenarios.id), eq(scenarioRevisions.revision, scenarios.latestRevision)))
    .leftJoin(person, eq(person.id, scenarios.createdBy))
    .where(and(eq(scenarios.workspaceId, workspaceId), eq(scenarios.id, scenarioId)));
  return row ? { ...summary(row), scenario: row.scenario as Scenario } : null;
}

export interface ScenarioChange {
  workspaceId: string;
  scenarioId: string;
  userId: string;
  name?: string;
  description?: string;
  /** A new document makes a new revision. */
  scenario?: Scenario;
  note?: string;
  /** When given, the change applies only if this is still the newest revision. */
  baseRevision?: number;
}

/**
 * Renames and/or adds the next revision, with an audit event, in one transaction; the scenario row is locked so
 * two concurrent edits get consecutive revision numbers (or the second a clear refusal with `baseRevision`).
 * Null when the scenario is not in this workspace.
 */
export async function reviseScenario(db: Database, change: ScenarioChange) {
  const done = await db.transaction(async (tx) => {
    const [current] = await tx
      .select({ latestRevision: scenarios.latestRevision, name: scenarios.name })
      .from(scenarios)
      .where(and(eq(scenarios.workspaceId, change.workspaceId), eq(scenarios.id, change.scenarioId)))
      .for("update");
    if (!current) return false;
    if (change.baseRevision !== undefined && change.baseRevision !== current.latestRevision)
      throw new RecordInputError(
        `revision ${change.baseRevision} is no longer the newest (revision ${current.latestRevision} is); reload the scenario and apply your change to it`,
        "baseRevision",
      );
    const revision = change.scenario ? current.latestRevision + 1 : current.latestRevision;
    if (change.scenario)
      await tx.insert(scenarioRevisions).values({ scenarioId: change.scenarioId, revision, body: change.scenario, note: change.note ?? "", createdBy: change.userId });
    await tx
      .update(scenarios)
      .set({ latestRevision: revision, updatedAt: sql`now()`, ...(change.name !== undefined ? { name: change.name } : {}), ...(change.description !== undefined ? { description: change.description } : {}) })
      .where(eq(scenarios.id, change.scenarioId));
    await recordAudit(tx, {
      workspaceId: change.workspaceId,
      actorUserId: change.userId,
      action: change.scenario ? "scenario.revised" : "scenario.renamed",
      subjectType: "scenario",
      subjectId: change.scenarioId,
      detail: { revision, ...(change.name !== undefined && change.name !== current.name ? { from: current.name, to: change.name } : {}) },
    });
    return true;
  });
  return done ? findScenario(db, change.workspaceId, change.scenarioId) : null;
}

const revisionColumns = {
  revision: scenarioRevisions.revision,
  note: scenarioRevisions.note,
  createdAt: scenarioRevisions.createdAt,
  creator: personColumns,
};

/** Every revision of a scenario, newest first; null when the scenario is not in this workspace. */
export async function listScenarioRevisions(db: Database, workspaceId: string, scenarioId: string) {
  const [owner] = await db.select({ id: scenarios.id }).from(scenarios).where(and(eq(scenarios.workspaceId, workspaceId), eq(scenarios.id, scenarioId)));
  if (!owner) return null;
  const rows = await db
    .select(revisionColumns)
    .from(scenarioRevisions)
    .leftJoin(person, eq(person.id, scenarioRevisions.createdBy))
    .where(eq(scenarioRevisions.scenarioId, scenarioId))
    .orderBy(desc(scenarioRevisions.revision));
  return rows.map(withCreator);
}

/** One revision (the newest when `revision` is omitted) with its document and row id; null when missing here. */
export async function findScenarioRevision(db: Database, workspaceId: string, scenarioId: string, revision?: number) {
  const [row] = await db
    .select({ ...revisionColumns, id: scenarioRevisions.id, scenarioId: scenarios.id, scenarioName: scenarios.name, scenario: scenarioRevisions.body })
    .from(scenarios)
    .innerJoin(
      scenarioRevisions,
      and(eq(scenarioRevisions.scenarioId, scenarios.id), eq(scenarioRevisions.revision, revision ?? scenarios.latestRevision)),
    )
    .leftJoin(person, eq(person.id, scenarioRevisions.createdBy))
    .where(and(eq(scenarios.workspaceId, workspaceId), eq(scenarios.id, scenarioId)));
  if (!row) return null;
  return { ...withCreator(row), scenario: row.scenario as Scenario };
}
