// Measured-traffic uploads: storing a validated file (object + row + audit in the caller's transaction), listing
// and reading them, and the worker's progress and outcome writes.
import { and, desc, eq, inArray, sql } from "drizzle-orm";
import type { Database } from "../client";
import { uploads } from "../schema";
import { recordAudit } from "./audit";
import { postgresObjectStore } from "./objects";
import { person, personColumns, toPerson } from "./scenarios";
import type { Transaction } from "./run-work";
import { newObjectKey } from "../../lib/storage";
import type { Characterisation, ColumnMapping } from "../../lib/measurement";
import type { UploadDetail, UploadStatus, UploadSummary } from "../../lib/measurement/uploads";

type Executor = Database | Transaction;

export interface NewUpload {
  workspaceId: string;
  userId: string;
  fileName: string;
  mapping: ColumnMapping;
  bytes: Uint8Array;
  contentType: string;
  /** a characterisation made already (the demo seed); the row is then ready and needs no worker */
  characterisation?: Characterisation;
}

/** The file's bytes, its upload row and an audit event, in the caller's transaction. */
export async function insertUpload(tx: Transaction, input: NewUpload): Promise<{ id: string; status: UploadStatus }> {
  const object = await postgresObjectStore(tx).putObject({
    key: newObjectKey("upload"),
    workspaceId: input.workspaceId,
    contentType: input.contentType,
    bytes: input.bytes,
  });
  const ready = input.characterisation !== undefined;
  const [row] = await tx
    .insert(uploads)
    .values({
      workspaceId: input.workspaceId,
      uploadedBy: input.userId,
      fileName: input.fileName,
      kind: input.mapping.kind,
      mapping: input.mapping as unknown as Record<string, unknown>,
      objectKey: object.key,
      sizeBytes: object.sizeBytes,
      sha256: object.sha256,
      ...(ready ? { status: "ready" as const, progress: 1, characterisation: input.characterisation as unknown as Record<string, unknown>, startedAt: new Date(), finishedAt: new Date() } : {}),
    })
    .returning({ id: uploads.id, status: uploads.status });
  await recordAudit(tx, {
    workspaceId: input.workspaceId,
    actorUserId: input.userId,
    action: "upload.created",
    subjectType: "upload",
    subjectId: row.id,
    detail: { fileName: input.fileName, kind: input.mapping.kind, sizeBytes: object.sizeBytes, sha256: object.sha256 },
  });
  return row;
}

const summaryColumns = {
  id: uploads.id,
  fileName: uploads.fileName,
  kind: uploads.kind,
  sizeBytes: uploads.sizeBytes,
  sha256: uploads.sha256,
  status: uploads.status,
  progress: uploads.progress,
  error: uploads.error,
  createdAt: uploads.createdAt,
  finishedAt: uploads.finishedAt,
  uploader: personColumns,
};

type SummaryRow = { [K in keyof typeof summaryColumns]: K extends "uploader" ? Parameters<typeof toPerson>[0] : unknown } & { createdAt: Date; finishedAt: Date | null };

function toSummary({ uploader, createdAt, finishedAt, ...row }: SummaryRow): UploadSummary {
  return { ...(row as Omit<UploadSummary, "createdAt" | "finishedAt" | "uploadedBy">), createdAt: createdAt.toISOString(), finishedAt: finishedAt?.toISOString() ?? null, uploadedBy: toPerson(uploader) };
}

/** A workspace's uploads, newest first (without their characterisations). */
export async function listUploads(db: Executor, workspaceId: string, limit = 200): Promise<UploadSummary[]> {
  const rows = await db
    .select(summaryColumns)
    .from(uploads)
    .leftJoin(person, eq(person.id, uploads.uploadedBy))
    .where(eq(uploads.workspaceId, workspaceId))
    .orderBy(desc(uploads.createdAt), desc(uploads.id))
    .limit(limit);
  return rows.map(toSummary);
}

/** One upload with its mapping and characterisation; null when it is not in this workspace. */
export async function findUpload(db: Executor, workspaceId: string, uploadId: string): Promise<(UploadDetail & { objectKey: string }) | null> {
  const [row] = await db
    .select({ ...summaryColumns, mapping: uploads.mapping, characterisation: uploads.characterisation, objectKey: uploads.objectKey })
    .from(uploads)
    .leftJoin(person, eq(person.id, uploads.uploadedBy))
    .where(and(eq(uploads.workspaceId, workspaceId), eq(uploads.id, uploadId)));
  if (!row) return null;
  const { mapping, characterisation, objectKey, ...summary } = row;
  return { ...toSummary(summary), mapping: mapping as unknown as ColumnMapping, characterisation: characterisation as unknown as Characterisation | null, objectKey };
}

/** Whether the workspace already has an upload of exactly these bytes (the seed's idempotence). */
export async function findUploadBySha256(db: Executor, workspaceId: string, sha256: string): Promise<{ id: string } | null> {
  const [row] = await db.select({ id: uploads.id }).from(uploads).where(and(eq(uploads.workspaceId, workspaceId), eq(uploads.sha256, sha256))).limit(1);
  return row ?? null;
}

/** What the worker needs to characterise an upload. */
export async function findUploadForWork(db: Executor, uploadId: string) {
  const [row] = await db
    .select({ id: uploads.id, workspaceId: uploads.workspaceId, objectKey: uploads.objectKey, mapping: uploads.mapping, status: uploads.status, sizeBytes: uploads.sizeBytes })
    .from(uploads)
    .where(eq(uploads.id, uploadId));
  return row ? { ...row, mapping: row.mapping as unknown as ColumnMapping } : null;
}

/** stored (or characterising, after a worker died) -> characterising; false when it is already finished. */
export async function markUploadCharacterising(db: Executor, uploadId: string): Promise<boolean> {
  const rows = await db
    .update(uploads)
    .set({ status: "characterising", progress: 0, startedAt: new Date() })
    .where(and(eq(uploads.id, uploadId), inArray(uploads.status, ["stored", "characterising"])))
    .returning({ id: uploads.id });
  return rows.length > 0;
}

/** Progress only ever grows, and only while characterising. */
export async function setUploadProgress(db: Executor, uploadId: string, fraction: number): Promise<void> {
  await db
    .update(uploads)
    .set({ progress: sql`greatest(${uploads.progress}, ${Math.min(1, Math.max(0, fraction))})` })
    .where(and(eq(uploads.id, uploadId), eq(uploads.status, "characterising")));
}

export async function finishUpload(db: Executor, uploadId: string, characterisation: Characterisation): Promise<void> {
  await db
    .update(uploads)
    .set({ status: "ready", progress: 1, characterisation: characterisation as unknown as Record<string, unknown>, error: null, finishedAt: new Date() })
    .where(and(eq(uploads.id, uploadId), eq(uploads.status, "characterising")));
}

export async function failUpload(db: Executor, uploadId: string, error: string): Promise<void> {
  await db
    .update(uploads)
    .set({ status: "failed", error, finishedAt: new Date() })
    .where(and(eq(uploads.id, uploadId), inArray(uploads.status, ["stored", "characterising"])));
}
