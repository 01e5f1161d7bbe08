// Sizing by formula, the holds/breaks verdict against a target, and the dimensioning search.
import { minServersForBlocking } from "../teletraffic/erlang-b";
import { LIMITS, type Scenario } from "../simulation/index";
import { trafficAtGroup } from "./parameters";

/** Formulas a grid or search compares the simulation with: the group they would install for the target. */
export const sizingFormulas = {
  "erlang-b": {
    label: "Erlang B",
    /** Smallest N with B(N, A) <= target at the mean traffic offered to the group (Poisson assumed). */
    servers: (s: Scenario, target: number) => minServersForBlocking({ traffic: trafficAtGroup(s), target }).servers,
  },
} satisfies Record<string, { label: string; servers: (s: Scenario, target: number) => number }>;
export type SizingFormula = keyof typeof sizingFormulas;
export const sizingFormulaNames = Object.keys(sizingFormulas) as [SizingFormula, ...SizingFormula[]];

export function formulaServers(formula: SizingFormula, s: Scenario, target: number): number {
  return Math.max(1, Math.min(LIMITS.servers, sizingFormulas[formula].servers(s, target)));
}

export type Verdict = "holds" | "breaks" | "inconclusive";

/**
 * Does a simulated grade of service meet the target? "holds" when the whole confidence interval is
 * at or below the target (its upper bound meets it), "breaks" when the whole interval is above it,
 * "inconclusive" when the interval straddles the target (more replications would decide).
 */
export function verdictOf(interval: { ciLow: number; ciHigh: number }, target: number): Verdict {
  if (interval.ciHigh <= target) return "holds";
  if (interval.ciLow > target) return "breaks";
  return "inconclusive";
}

export interface Probe {
  servers: number;
  /** Upper confidence bound at or below the target; undefined while the probe runs or when it failed. */
  meets?: boolean;
}

export type ProbeDecision =
  | { kind: "probe"; servers: number }
  | { kind: "done"; servers: number }
  | { kind: "exhausted"; message: string };

/**
 * The next group size to simulate. Start at the formula's N; while every probe meets the target
 * step down, while none does step up, by 1, 2, 4, ... servers (a bracket in O(log distance)
 * probes); then bisect between the largest failing N below the smallest meeting N (above which
 * nothing failed) until they are neighbours. The answer is that smallest meeting N.
 */
export function nextProbe(formulaN: number, probes: readonly Probe[], maxProbes: number, maxServers: number = LIMITS.servers): ProbeDecision {
  if (probes.length === 0) return { kind: "probe", servers: formulaN };
  const decided = probes.filter((p) => p.meets !== undefined);
  const meeting = decided.filter((p) => p.meets).map((p) => p.servers);
  const failing = decided.filter((p) => !p.meets).map((p) => p.servers);
  const tried = new Set(probes.map((p) => p.servers));
  if (decided.length < probes.length) return { kind: "exhausted", message: "a probe has no result" };
  // Meeting N above every failing one (noise can make neighbours disagree; the failure wins).
  const highestFailing = failing.length ? Math.max(...failing) : 0;
  const above = meeting.filter((n) => n > highestFailing);
  let decision: ProbeDecision;
  if (above.length === 0) {
    if (highestFailing >= maxServers) return { kind: "exhausted", message: `even ${maxServers} servers (the largest group a scenario may have) do not meet the target` };
    decision = { kind: "probe", servers: Math.min(maxServers, highestFailing + 2 ** (failing.length - 1)) };
  } else {
    const hi = Math.min(...above);
    if (failing.length === 0) {
      if (hi === 1) return { kind: "done", servers: 1 };
      decision = { kind: "probe", servers: Math.max(1, hi - 2 ** (meeting.length - 1)) };
    } else {
      if (hi - highestFailing <= 1) return { kind: "done", servers: hi };
      decision = { kind: "probe", servers: Math.floor((highestFailing + hi) / 2) };
    }
  }
  if (tried.has(decision.servers)) return { kind: "exhausted", message: `the search revisited ${decision.servers} servers; the simulated blocking is not monotone in N here (more replications would settle it)` };
  if (probes.length >= maxProbes) return { kind: "exhausted", message: `no answer within ${maxProbes} probes` };
  return decision;
}
