// Per-workspace limits on background work; a workspace_quotas row overrides them.
export interface Quotas {
  /** Runs queued or running at once (sweep points count). */
  concurrentRuns: number;
  /** Fresh calls one run may ask for, warm-up included (replications x calls). */
  callsPerRun: number;
  /** Points in one sweep or grid, probes in one dimensioning search. */
  pointsPerSweep: number;
}

/** Defaults sized for one 2-core machine serving a small team (common practice, no source). */
export const defaultQuotas: Quotas = {
  concurrentRuns: 200,
  callsPerRun: 500_000_000,
  pointsPerSweep: 121,
};
