// The life of a background run or sweep. Pure, so the browser, the API schemas and db/schema.ts share one list.
export const jobStatuses = ["queued", "running", "succeeded", "failed", "cancelled"] as const;
export type JobStatus = (typeof jobStatuses)[number];

/** Statuses that still hold a worker slot (and count against the concurrent-runs quota). */
export const activeJobStatuses = ["queued", "running"] as const satisfies readonly JobStatus[];

export const isFinishedStatus = (status: JobStatus) => status === "succeeded" || status === "failed" || status === "cancelled";
