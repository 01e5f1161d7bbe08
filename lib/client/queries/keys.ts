// Stable query keys, one factory per concept, so every hook and every invalidation names the same data.
export const queryKeys = {
  workspace: (ws: string) => ["ws", ws] as const,
  scenarios: (ws: string) => ["ws", ws, "scenarios"] as const,
  scenario: (ws: string, id: string) => ["ws", ws, "scenarios", id] as const,
  revisions: (ws: string, id: string) => ["ws", ws, "scenarios", id, "revisions"] as const,
  runs: (ws: string, filter: RunFilter = {}) => ["ws", ws, "runs", "list", filter] as const,
  allRuns: (ws: string) => ["ws", ws, "runs"] as const,
  run: (ws: string, id: string) => ["ws", ws, "runs", "one", id] as const,
  sweeps: (ws: string) => ["ws", ws, "sweeps", "list"] as const,
  allSweeps: (ws: string) => ["ws", ws, "sweeps"] as const,
  sweep: (ws: string, id: string) => ["ws", ws, "sweeps", "one", id] as const,
  references: (ws: string, scenario: unknown) => ["ws", ws, "references", scenario] as const,
  /** Computed in the browser from the scenario alone, so not under a workspace. */
  runLengthPlan: (scenarioAndPrecision: string | null) => ["run-length-plan", scenarioAndPrecision] as const,
  tokens: (ws: string) => ["ws", ws, "tokens"] as const,
};

export interface RunFilter {
  status?: string;
  scenarioId?: string;
  sweepId?: string;
  limit?: number;
  cursor?: string;
}

/** How often a job still in progress is asked about (ms). */
export const livePollMs = 1_000;
export const isLive = (status: string | undefined) => status === "queued" || status === "running";
