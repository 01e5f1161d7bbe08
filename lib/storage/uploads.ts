import "server-only";
// Measured-traffic uploads from the web: read the body (multipart or raw) under the size cap, validate the whole
// file with lib/measurement while it streams, then store bytes + row + audit + the characterise job in ONE
// transaction. A refused file leaves nothing behind; the web process never characterises.
import type PgBoss from "pg-boss";
import type { Database } from "@/db/client";
import { transactionalSend } from "@/db/queries/run-work";
import { findUpload, insertUpload } from "@/db/queries/uploads";
import { createScenario } from "@/db/queries/scenarios";
import { ApiError, jsonError } from "@/lib/api/respond";
import { AccessError } from "@/lib/auth/access";
import { queues } from "@/lib/jobs/contracts";
import { MAX_FILE_BYTES, MeasurementInputError, makeScenario, parseMapping, previewCsv, readMeasurementCsv, type CsvPreview } from "@/lib/measurement";
import { cleanFileName, makeUploadScenarioSchema, type UploadScenarioMade, type UploadStatus } from "@/lib/measurement/uploads";
import { parseScenario } from "@/lib/simulation";

/** Body cap of the upload routes: the file limit plus room for multipart boundaries and the mapping field. */
export const UPLOAD_BODY_BYTES = MAX_FILE_BYTES + 256 * 1024;
/** Media types the upload routes accept: a form with a `file` field, or the file itself. */
export const UPLOAD_CONTENT_TYPES = ["multipart/form-data", "text/csv", "text/plain", "application/octet-stream"] as const;

export interface UploadBody {
  fileName: string;
  bytes: Uint8Array;
  contentType: string;
  /** the mapping as sent (JSON text parsed), not yet validated */
  mapping: unknown;
}

function parseMappingText(text: string | null): unknown {
  if (text === null || text.trim() === "") return undefined;
  try {
    return JSON.parse(text);
  } catch (error) {
    throw new MeasurementInputError("bad-mapping", `mapping: not valid JSON (${(error as Error).message})`, undefined, "mapping");
  }
}

/**
 * The file and its mapping from either a multipart form (fields `file`, `mapping` as JSON, optional `fileName`) or a
 * raw CSV body (mapping as JSON in the `mapping` query parameter, name in `fileName`). The body arrives capped.
 */
export async function readUploadBody(request: Request): Promise<UploadBody> {
  const url = new URL(request.url);
  const mediaType = request.headers.get("content-type")?.split(";")[0].trim().toLowerCase() ?? "";
  if (mediaType === "multipart/form-data") {
    let form: FormData;
    try {
      form = await request.formData();
    } catch (error) {
      const cause = (error as { cause?: unknown }).cause;
      if (cause instanceof ApiError) throw cause;
      throw new ApiError(400, "invalid-body", `The form data is malformed: ${(error as Error).message}`);
    }
    const file = form.get("file");
    if (!(file instanceof Blob)) throw new MeasurementInputError("empty-file", 'no file: send it in the form field "file"', undefined, "file");
    const named = form.get("fileName");
    return {
      fileName: cleanFileName(typeof named === "string" && named ? named : (file as File).name),
      bytes: new Uint8Array(await file.arrayBuffer()),
      contentType: "text/csv",
      mapping: parseMappingText(typeof form.get("mapping") === "string" ? (form.get("mapping") as string) : null),
    };
  }
  return {
    fileName: cleanFileName(url.searchParams.get("fileName")),
    bytes: new Uint8Array(await request.arrayBuffer()),
    contentType: "text/csv",
    mapping: parseMappingText(url.searchParams.get("mapping")),
  };
}

/** 400 naming the line and column (or the mapping field), with the refusal's code, e.g. "negative-duration". */
export function measurementRefusal(error: MeasurementInputError): Response {
  const field = error.code === "bad-mapping" ? (error.column ?? "mapping") : "file";
  return jsonError(400, error.code, error.message, { [field]: error.message });
}

/** Runs a route's work, answering a refused file or mapping with measurementRefusal. */
export async function refusingBadFiles(work: () => Promise<Response>): Promise<Response> {
  try {
    return await work();
  } catch (error) {
    if (error instanceof MeasurementInputError) return measurementRefusal(error);
    throw error;
  }
}

export interface Uploader {
  workspaceId: string;
  userId: string;
}

/** Validates the whole file against the mapping, then stores it and queues its characterisation together. */
export async function storeUpload(db: Database, boss: PgBoss, uploader: Uploader, body: UploadBody): Promise<{ id: string; status: UploadStatus }> {
  if (body.mapping === undefined) throw new MeasurementInputError("bad-mapping", "mapping: send the column mapping (see the preview's guess)", undefined, "mapping");
  const mapping = parseMapping(body.mapping);
  await readMeasurementCsv(body.bytes, mapping); // every refusal, with its line, before anything is stored
  try {
    return await db.transaction(async (tx) => {
      const upload = await insertUpload(tx, { ...uploader, fileName: body.fileName, mapping, bytes: body.bytes, contentType: body.contentType });
      await transactionalSend(tx, boss)(queues.characteriseUpload, { uploadId: upload.id });
      return upload;
    });
  } catch (error) {
    if (error instanceof Error && /pg-boss|queue/i.test(error.message)) {
      throw new ApiError(503, "queue-unavailable", `The job queue is not available (${error.message}); nothing was stored, try again shortly.`);
    }
    throw error;
  }
}

/** The header, first rows and a guessed mapping; nothing is stored. */
export async function previewUpload(body: UploadBody): Promise<CsvPreview> {
  return previewCsv(body.bytes);
}

const noSuchUpload = () => new AccessError(404, "not-found", "No such upload in this workspace.");

/** A scenario made from a characterised upload (busy hour or whole-day profile), stored as a new scenario. */
export async function makeUploadScenario(db: Database, uploader: Uploader, uploadId: string, input: unknown): Promise<UploadScenarioMade> {
  const options = makeUploadScenarioSchema.parse(input);
  const upload = await findUpload(db, uploader.workspaceId, uploadId);
  if (!upload) throw noSuchUpload();
  if (upload.status !== "ready" || !upload.characterisation) {
    throw new ApiError(409, "not-characterised", upload.status === "failed" ? `This upload could not be characterised: ${upload.error}` : "This upload is still being characterised; make a scenario once it is ready.");
  }
  const { name, ...makeOptions } = options;
  const { scenario, ...made } = makeScenario(upload.characterisation, makeOptions);
  const what = makeOptions.source === "daily-profile" ? "whole day" : `busy hour ${upload.characterisation.busyHour.label}`;
  const title = name ?? `${upload.fileName.replace(/\.csv$/i, "")} — ${what}`;
  const stored = await createScenario(db, {
    ...uploader,
    name: title.slice(0, 200),
    description: `Made from the measured traffic in ${upload.fileName} (${what}). ${made.arrivals.method}. ${made.servers.method}.`,
    scenario: parseScenario(scenario),
    note: `from upload ${upload.id}`,
  });
  return { scenarioId: stored.id, name: stored.name, made };
}
