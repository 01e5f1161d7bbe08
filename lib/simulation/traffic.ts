import {
  batchMean,
  batchPeakedness,
  erlangB,
  lawMean,
  mmppOfferedMoments,
  overflowMoments,
  renewalPeakedness,
  stationaryOfGenerator,
} from "../teletraffic";
import type { Arrivals, Scenario } from "./scenario";

/**
 * What a scenario implies about its traffic, in one place: the MMPP phase law, mean call rates,
 * offered traffic and the moments and peakedness of the offered stream. Used by the scenario's
 * workload rules, the engine, the run planner and the references.
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
      return a.primaries.reduce((s, p) => s + p.traffic * erlangB(p.servers, p.traffic), 0) / meanHolding;
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

/** Overflow traffic moments of the primaries, treated as independent (Riordan's formulas per primary). */
export function overflowStreamMoments(primaries: { traffic: number; servers: number }[]): { mean: number; variance: number } {
  let mean = 0;
  let variance = 0;
  for (const p of primaries) {
    const m = overflowMoments({ traffic: p.traffic, servers: p.servers }); // servers 0: the direct Poisson stream, peakedness 1
    mean += m.mean;
    variance += m.variance;
  }
  return { mean, variance };
}

/**
 * Mean, variance and peakedness of the fresh stream on an infinite group with exponential holding
 * of the scenario's mean; undefined for a time-varying profile (not a stationary stream).
 */
export function streamMoments(scenario: Scenario): { mean: number; variance: number; peakedness: number; what: string } | undefined {
  const a = scenario.arrivals;
  const h = lawMean(scenario.holding);
  const traffic = meanCallRate(scenario) * h;
  const mmpp = mmppOf(a);
  let variance: number;
  let what: string = a.process;
  if (mmpp) {
    const m = mmppOfferedMoments(mmpp.rates, mmpp.switching, h);
    return { ...m, peakedness: m.variance / m.mean, what: "MMPP" };
  }
  switch (a.process) {
    case "poisson":
      variance = traffic;
      break;
    case "renewal":
      variance = traffic * renewalPeakedness(a.interarrival, h);
      break;
    case "batch":
      variance = traffic * batchPeakedness(a.batchSize);
      what = "batch Poisson";
      break;
    case "overflow": {
      const m = overflowStreamMoments(a.primaries);
      return { ...m, peakedness: m.variance / m.mean, what: "overflow" };
    }
    case "finite-source":
      // busy sources on an infinite group are binomial(S, β/(1 + β)): Z = 1/(1 + β)
      variance = traffic / (1 + a.idleRate * h);
      what = "finite-source";
      break;
    default:
      return undefined;
  }
  return { mean: traffic, variance, peakedness: variance / traffic, what };
}
