// What the upload routes, the worker and the pages share about a stored upload: its kinds, its life, and the
// JSON shapes the API returns. Pure (browser-safe), so db/schema.ts, the routes and the client use one list.
import { z } from "zod";
import type { Characterisation } from "./characterise";
import type { ColumnMapping } from "./mapping";
import { makeScenarioOptionsSchema, type MadeScenario } from "./scenario";

export const UPLOAD_KINDS = ["call-records", "interval-counts"] as const;
export type UploadKind = (typeof UPLOAD_KINDS)[number];

/** stored: bytes kept, waiting for the worker; characterising: the worker is at it; ready / failed: done. */
export const UPLOAD_STATUSES = ["stored", "characterising", "ready", "failed"] as const;
export type UploadStatus = (typeof UPLOAD_STATUSES)[number];

export const isUploadFinished = (status: UploadStatus) => status === "ready" || status === "failed";

/** A file name as shown and offered back on download: no path, no control characters, at most 200 characters. */
export function cleanFileName(name: string | null | undefined): string {
  const base = (name ?? "").split(/[\\/]/).pop() ?? "";
  const clean = base.replace(/[\u0000-\u001f\u007f"]/g, "").trim().slice(0, 200);
  return clean || "upload.csv";
}

/** POST …/uploads/{id}/scenario: which scenario to make (makeScenario's options) and the new scenario's name. */
export const makeUploadScenarioSchema = makeScenarioOptionsSchema.extend({
  name: z.string().trim().min(1, "give the scenario a name").max(200, "at most 200 characters").optional(),
});
export type MakeUploadScenario = z.input<typeof makeUploadScenarioSchema>;

export interface UploadSummary {
  id: string;
  fileName: string;
  kind: UploadKind;
  sizeBytes: number;
  sha256: string;
  status: UploadStatus;
  /** 0..1 while characterising */
  progress: number;
  error: string | null;
  createdAt: string;
  finishedAt: string | null;
  uploadedBy: { id: string; email: string; name: string | null } | null;
}

export interface UploadDetail extends UploadSummary {
  mapping: ColumnMapping;
  characterisation: Characterisation | null;
}

/** 201 of POST …/uploads/{id}/scenario: the scenario stored, and how it was made from the measurement. */
export interface UploadScenarioMade {
  scenarioId: string;
  name: string;
  made: Omit<MadeScenario, "scenario">;
}
