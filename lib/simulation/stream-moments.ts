import { batchPeakedness, mmppOfferedMoments, overflowMoments, renewalPeakedness } from "../teletraffic";
import { lawMean } from "../teletraffic/law-formulas";
import type { Scenario } from "./scenario";
import { meanCallRate, mmppOf } from "./traffic";

// The offered stream's moments and peakedness (the references' input); apart from traffic.ts because
// they need the analytic library, which the replication threads do not load.

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
