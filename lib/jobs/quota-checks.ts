// Pure quota rules for submissions: how much work a scenario or sweep asks for, and the refusal that names the
// field to change. The limits themselves are lib/jobs/quotas.ts (defaults) or a workspace_quotas row.
import { expectedCallsPerReplication, type Scenario } from "../simulation/index";
import { freshCallRate, lawMean } from "../simulation/scenario";
import { plannedPoints, type SweepDefinition } from "../sweeps/index";
import type { Quotas } from "./quotas";

/** A limit the request exceeds: a 400 naming `field` (the caller can ask for less). */
export class QuotaInputError extends Error {
  readonly kind = "input" as const;
  constructor(
    message: string,
    readonly field: string,
  ) {
    super(message);
    this.name = "QuotaInputError";
  }
}

const about = (n: number) => Number(n.toPrecision(3)).toLocaleString("en-US");

/**
 * Fresh calls a run may simulate, warm-up included: replications x (warm-up + measured calls), or, with a
 * precision target, up to its call budget (the precision stop may add replications until then).
 */
export function callsRequested(scenario: Scenario): { calls: number; field: string } {
  const run = scenario.run;
  const rate = freshCallRate(scenario.arrivals, lawMean(scenario.holding));
  const warmup = run.warmupCalls ?? (run.warmupTime ?? 0) * rate;
  const planned = run.replications * (expectedCallsPerReplication(scenario) + warmup);
  const measuredField = run.callsPerReplication !== undefined ? "run.callsPerReplication" : "run.horizon";
  if (run.precision && run.precision.maxCalls > planned) return { calls: run.precision.maxCalls, field: "run.precision.maxCalls" };
  return { calls: planned, field: measuredField };
}

/**
 * Throws when a run of `scenario` would exceed the calls-per-run quota. `inline`: the scenario came in the body,
 * so the error names `scenario.<field>`; otherwise it names `scenarioId` and says which field of the stored one.
 */
export function checkCallsPerRun(scenario: Scenario, quotas: Quotas, inline: boolean, where = "this run"): void {
  const { calls, field } = callsRequested(scenario);
  if (calls > quotas.callsPerRun)
    throw new QuotaInputError(
      `${where} asks for about ${about(calls)} calls (replications x (warm-up + measured calls), or the precision budget; set by ${field}); this workspace allows ${about(quotas.callsPerRun)} per run (quota callsPerRun)`,
      inline ? `scenario.${field}` : "scenarioId",
    );
}

/** Where a sweep definition's point count is set, for the message's field. */
function pointsField(definition: SweepDefinition): string {
  switch (definition.kind) {
    case "sweep":
      return "values";
    case "grid":
      return definition.x.values.length >= definition.y.values.length ? "x.values" : "y.values";
    case "dimensioning":
      return "maxProbes";
  }
}

/** Throws when a sweep plans more points (a search: more probes) than the workspace allows. */
export function checkPointsPerSweep(definition: SweepDefinition, quotas: Quotas): number {
  const points = plannedPoints(definition);
  if (points > quotas.pointsPerSweep)
    throw new QuotaInputError(
      `this ${definition.kind === "dimensioning" ? "search plans up to" : definition.kind === "grid" ? "grid has" : "sweep has"} ${points} ${definition.kind === "dimensioning" ? "probes" : "points"}; this workspace allows ${quotas.pointsPerSweep} (quota pointsPerSweep)`,
      pointsField(definition),
    );
  return points;
}

/**
 * Worker slots a new submission takes at once: a run one; a sweep or grid all its points (they are queued
 * together); a dimensioning search one probe at a time.
 */
export function slotsNeeded(definition?: SweepDefinition): number {
  if (!definition || definition.kind === "dimensioning") return 1;
  return plannedPoints(definition);
}

/** The 429 message when the workspace has no room; null when it has. */
export function concurrencyRefusal(active: number, needed: number, quotas: Quotas): string | null {
  if (active + needed <= quotas.concurrentRuns) return null;
  const what = needed === 1 ? "a run" : `${needed} point runs`;
  if (needed > quotas.concurrentRuns)
    return `this submission needs ${what} at once, more than the ${quotas.concurrentRuns} this workspace allows (quota concurrentRuns); split it into smaller sweeps`;
  return `this workspace already has ${active} runs queued or running and allows ${quotas.concurrentRuns} at once (quota concurrentRuns); ${what} more would exceed it: wait for some to finish or cancel them`;
}
