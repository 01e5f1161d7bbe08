// Queue names shared by the web app (senders) and the worker (handlers).
export const queues = {
  /** One simulation run of a scenario: replications with confidence intervals. */
  simulationRun: "simulation-run",
  /** A parameter sweep, fanned out into simulation runs. */
  sweep: "sweep",
} as const;

export const allQueueNames = Object.values(queues);
