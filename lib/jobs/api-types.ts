// Response shapes of the background-run API (/api/v1/workspaces/{ws}/scenarios|runs|sweeps, /api/v1/preferences),
// shared by the route handlers (which build them), the browser's query hooks and the CLI. Pure and
// browser-safe: type imports only. Dates are ISO 8601 strings in JSON.
import type { JobStatus } from "../schemas/job-status";
import type { Reference, RunPlan, ScenarioInput, SimulationResult } from "../simulation";
import type { SweepSummary } from "../sweeps";

export type { JobStatus } from "../schemas/job-status";
export type ReviewStatus = "unreviewed" | "approved" | "changes-requested";
export type SweepKind = "sweep" | "grid" | "dimensioning";

export interface PersonRef {
  id: string;
  name: string | null;
  email: string;
}

/** Every list endpoint: one keyset page (pass `nextCursor` back as `cursor`; null on the last page), and the total matching. */
export interface Page<T> {
  items: T[];
  nextCursor: string | null;
  total: number;
}

/** POST runs, POST sweeps -> 202; POST …/cancel -> 200. */
export interface JobAccepted {
  id: string;
  status: JobStatus;
}

export interface RunProgress {
  replicationsDone: number;
  replicationsPlanned: number;
  /** 0..1, including progress inside running chunks. */
  fraction: number;
}

/** A row of GET runs (and the common part of GET runs/{id}). */
export interface RunListItem {
  id: string;
  /** Label given at submission ("" when none). */
  name: string;
  status: JobStatus;
  progress: RunProgress;
  scenarioId: string | null;
  /** The scenario revision simulated; null for an inline scenario. */
  revision: number | null;
  scenarioName: string | null;
  seed: number;
  partial: boolean;
  sweepId: string | null;
  sweepPoint: number | null;
  /** Swept parameter values of a sweep's point run. */
  sweepValues: Record<string, number> | null;
  reviewStatus: ReviewStatus;
  submittedBy: PersonRef | null;
  createdAt: string;
  startedAt: string | null;
  finishedAt: string | null;
  error: string | null;
}

/** GET runs/{id} */
export interface RunResponse extends RunListItem {
  /** The exact scenario simulated (defaults filled in). */
  scenario: ScenarioInput;
  plan: RunPlan;
  /** Present once finished (partial when cancelled mid-run); the shape `simulate --json` prints. */
  result?: SimulationResult;
  /** The analytic references, stored when the run started (also inside `result`). */
  references?: Reference[];
  /**
   * GET runs/{id} only: while the run is queued or running and no worker has reported within the liveness
   * window, why it is not moving; null otherwise.
   */
  workerNotice?: string | null;
}

/** GET runs */
export type RunListResponse = Page<RunListItem>;

export interface ScenarioSummary {
  id: string;
  name: string;
  description: string;
  latestRevision: number;
  createdAt: string;
  updatedAt: string;
  createdBy: PersonRef | null;
}

export type ScenarioListResponse = Page<ScenarioSummary>;

/** GET scenarios/{id}, and the answer to POST (201) and PATCH: the newest revision's document. */
export interface ScenarioResponse extends ScenarioSummary {
  scenario: ScenarioInput;
  /** Note of the newest revision. */
  revisionNote: string;
}

/** One entry of GET scenarios/{id}/revisions (newest first). */
export interface ScenarioRevisionSummary {
  revision: number;
  note: string;
  createdAt: string;
  createdBy: PersonRef | null;
}

export interface ScenarioRevisionsResponse {
  revisions: ScenarioRevisionSummary[];
}

/** GET scenarios/{id}/revisions/{revision}: one revision with its document. */
export interface ScenarioRevisionResponse extends ScenarioRevisionSummary {
  scenarioId: string;
  scenarioName: string;
  scenario: ScenarioInput;
}

export interface SweepProgress {
  pointsDone: number;
  /** Points planned so far (a dimensioning search: at most its maxProbes until it has finished). */
  pointsPlanned: number;
  /** 0..1: the point runs' progress over the points planned. */
  fraction: number;
}

/** A row of GET sweeps. */
export interface SweepListItem {
  id: string;
  name: string;
  kind: SweepKind;
  status: JobStatus;
  progress: SweepProgress;
  scenarioId: string | null;
  revision: number | null;
  scenarioName: string | null;
  reviewStatus: ReviewStatus;
  submittedBy: PersonRef | null;
  createdAt: string;
  startedAt: string | null;
  finishedAt: string | null;
  error: string | null;
}

export type SweepListResponse = Page<SweepListItem>;

export interface Estimate {
  estimate: number;
  ciLow: number;
  ciHigh: number;
}

/** One point of a sweep (a probe of a search): its run, where it sits and what it has found so far. */
export interface SweepPointRun {
  id: string;
  sweepPoint: number;
  sweepValues: Record<string, number>;
  status: JobStatus;
  progress: RunProgress;
  partial: boolean;
  callCongestion: Estimate | null;
  timeCongestion: Estimate | null;
  error: string | null;
}

/** GET sweeps/{id} */
export interface SweepResponse extends SweepListItem {
  /** What was asked for (lib/sweeps `sweepDefinitionSchema`, defaults filled in). */
  definition: Record<string, unknown>;
  /** The base scenario (each point applies its values to it). */
  scenario: ScenarioInput;
  /**
   * The curve, grid verdicts or dimensioning answer: the stored summary once the sweep has finished; while it
   * runs, a sweep's or grid's summary of the points finished so far (a search has none until it ends).
   */
  result: SweepSummary | null;
  /** One run per point, in point order. */
  runs: SweepPointRun[];
}

/** POST workspaces/{ws}/references (the editor's analytic panel). */
export interface ReferencesResponse {
  /** Mean offered traffic in erlangs (for overflow, the primaries' total). */
  offeredTraffic: number;
  references: Reference[];
}

/** GET/PUT /api/v1/preferences */
export interface Preferences {
  /** E-mail me when my runs and sweeps finish or fail. */
  notifyByEmail: boolean;
}

/** Every error body (lib/api/respond.ts). */
export interface ApiErrorBody {
  error: { status: number; code: string; message: string; fields?: Record<string, string> };
}
