import { Replication, type ReplicationOptions, type ReplicationStats } from "./engine";
import { FastReplication, fastLoopRefusal } from "./fast-loop";
import { MarkovReplication, markovPathRefusal } from "./markov-path";
import type { Scenario } from "./scenario";

/** Which loop runs a replication: recorded in every ReplicationStats and in the result. */
export type EnginePath = "reference" | "specialised" | "markov";

/** What every loop offers the replication job (engine.ts, fast-loop.ts, markov-path.ts). */
export interface ReplicationLoop {
  readonly index: number;
  readonly traceTime: number[];
  readonly traceBusy: number[];
  readonly traceOrbit: number[];
  readonly traceQueue: number[];
  readonly traceCalls: number[];
  advance(maxEvents: number): boolean;
  progress(): number;
  stats(): ReplicationStats;
}

/**
 * The dispatch rule, in order:
 * 1. `markov` when the model is a Markov chain throughout (markov-path.ts: exponential holding;
 *    Poisson, MMPP/on-off, finite-source or overflow arrivals, or renewal arrivals with a phase-type
 *    law (exponential, Erlang, hyperexponential); no waiting line, no repeated attempts):
 *    expected sojourns give lower-variance time averages and there is no event list;
 * 2. `specialised` (fast-loop.ts) for every other shape it runs: all but time-varying arrivals and
 *    lattice laws (deterministic, empirical) combined with retrials or patience;
 * 3. `reference` (engine.ts) otherwise, or when `generalLoop` asks for it.
 */
export function enginePathFor(scenario: Scenario, options: ReplicationOptions = {}): EnginePath {
  if (options.generalLoop) return "reference";
  if (markovPathRefusal(scenario) === undefined) return "markov";
  if (fastLoopRefusal(scenario) === undefined) return "specialised";
  return "reference";
}

/** One replication on the loop the dispatch rule picks (or the one forced by `path`). */
export function createReplication(scenario: Scenario, index: number, options: ReplicationOptions = {}, path = enginePathFor(scenario, options)): ReplicationLoop {
  const { generalLoop: _general, ...rest } = options;
  switch (path) {
    case "markov":
      return new MarkovReplication(scenario, index, rest);
    case "specialised":
      return new FastReplication(scenario, index, rest);
    case "reference": {
      const loop = new Replication(scenario, index, options);
      const stats = loop.stats.bind(loop);
      return Object.assign(loop, { stats: (): ReplicationStats => ({ ...stats(), path: "reference" }) });
    }
  }
}
