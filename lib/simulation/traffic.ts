import { erlangBUnchecked } from "../teletraffic/erlang-b-kernel";
import { batchMean, lawMean } from "../teletraffic/law-formulas";
import { stationaryOfGenerator } from "../teletraffic/qbd";
import type { Arrivals, Scenario } from "./scenario";

/**
 * What a scenario implies about its traffic: the MMPP phase law, mean call rates and offered
 * traffic. Used by the scenario's workload rules, the engine, the run planner and the references.
 * Imports no zod (the replication threads load it); the offered stream's moments and peakedness,
 * which need the analytic library, are in stream-moments.ts.
 */
export { batchMean, lawMean, stationaryOfGenerator };

/** MMPP phase rates and switching matrix for `mmpp` and its `on-off` special case. */
export function mmppOf(arrivals: Arrivals): { rates: number[]; switching: number[][] } | undefined {
  if (arrivals.process === "mmpp") return { rates: arrivals.rates, switching: arrivals.switching };
  if (arrivals.process === "on-off")
    return {
      rates: [arrivals.onRate, 0],
      switching: [
        [0, 1 / arrivals.meanOn],
        [1 / arrivals.meanOff, 0],
      ],
    };
  return undefined;
}

function mmppMeanRate(rates: number[], switching: number[][]): number {
  if (rates.length === 1) return rates[0];
  try {
    const pi = stationaryOfGenerator(switching);
    return rates.reduce((s, r, i) => s + r * pi[i], 0);
  } catch {
    // a reducible matrix is reported by the scenario schema itself; the workload rule needs a number
    return Math.max(...rates);
  }
}

/** Mean fresh-call rate at the group under study with no blocking (overflow: the overflow rate). */
export function freshCallRate(a: Arrivals, meanHolding: number): number {
  switch (a.process) {
    case "poisson":
      return a.rate;
    case "mmpp":
      return mmppMeanRate(a.rates, a.switching);
    case "on-off":
      return (a.onRate * a.meanOn) / (a.meanOn + a.meanOff);
    case "renewal":
      return 1 / lawMean(a.interarrival);
    case "batch":
      return a.rate * batchMean(a.batchSize);
    case "overflow":
      return a.primaries.reduce((s, p) => s + p.traffic * erlangBUnchecked(p.servers, p.traffic), 0) / meanHolding;
    case "finite-source":
      // Engset's intended traffic S β / (1 + β): what the sources would offer with no blocking
      return (a.sources * a.idleRate) / (1 + a.idleRate * meanHolding);
    case "time-varying":
      return a.profile.reduce((s, p) => s + p.rate * p.duration, 0) / a.profile.reduce((s, p) => s + p.duration, 0);
  }
}

/** Fresh arrivals per time unit that cost work: for overflow every primary-group arrival counts. */
export function arrivalEventRate(a: Arrivals, meanHolding: number): number {
  if (a.process === "overflow") return a.primaries.reduce((s, p) => s + p.traffic, 0) / meanHolding;
  return freshCallRate(a, meanHolding);
}

/** Mean fresh-call rate offered to the group under study (for overflow: the overflow rate). */
export function meanCallRate(scenario: Scenario): number {
  return freshCallRate(scenario.arrivals, lawMean(scenario.holding));
}

/** Mean offered traffic in erlangs before retrials; for overflow, the primaries' total traffic. */
export function offeredTraffic(scenario: Scenario): number {
  if (scenario.arrivals.process === "overflow") return scenario.arrivals.primaries.reduce((s, p) => s + p.traffic, 0);
  return meanCallRate(scenario) * lawMean(scenario.holding);
}
