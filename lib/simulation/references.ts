import { z } from "zod";
import * as tt from "../teletraffic";
import type { Scenario } from "./scenario";
import { overflowStreamMoments, streamMoments } from "./stream-moments";
import { meanCallRate, mmppOf, offeredTraffic } from "./traffic";

export { offeredTraffic, overflowStreamMoments };
export { batchPeakedness, mmppOfferedMoments } from "../teletraffic";

/** Direct overflow solves above this (N + 1) × K³ are background work (about 100 ms). */
const INTERACTIVE_OVERFLOW_WORK = 20_000_000;

/** An analytic value for (part of) the scenario, from lib/teletraffic. */
export const referenceSchema = z.object({
  method: z.string(),
  assumptions: z.string(),
  /** True when the scenario satisfies every assumption of the method, so the simulation should agree within its CI. */
  exact: z.boolean(),
  callCongestion: z.number().optional(),
  /** Refused attempts / all attempts (retrial models). */
  attemptCongestion: z.number().optional(),
  timeCongestion: z.number().optional(),
  carriedTraffic: z.number().optional(),
  lossProbability: z.number().optional(),
  waitingProbability: z.number().optional(),
  meanWait: z.number().optional(),
  meanWaiting: z.number().optional(),
  attemptsPerCall: z.number().optional(),
  meanRetrying: z.number().optional(),
  abandonmentProbability: z.number().optional(),
  /** Share of batches losing at least one call. */
  batchCongestion: z.number().optional(),
  /** Estimated probability mass the method left out (orbit truncation); the value is exact to about this. */
  truncationBound: z.number().optional(),
  /** Per profile segment (time-varying load): start, duration and the method's call (and time) congestion there. */
  segments: z.array(z.object({ start: z.number(), duration: z.number(), callCongestion: z.number(), timeCongestion: z.number().optional() })).optional(),
  /** True when the case is too large for an interactive answer: callers offer it as a background job. */
  background: z.boolean().optional(),
  /** Set instead of values when the method cannot be evaluated for these inputs (the reason). */
  unavailable: z.string().optional(),
});
export type Reference = z.infer<typeof referenceSchema>;
type Values = Omit<Reference, "method" | "assumptions" | "exact" | "unavailable" | "background">;

/** What every rule needs to know about a scenario, computed once. */
interface Facts {
  n: number;
  h: number;
  /** mean offered traffic at the group under study, erlangs (overflow: the overflow traffic) */
  traffic: number;
  exponentialHolding: boolean;
  retrying: boolean;
  waiting: boolean;
  pureLoss: boolean;
}

function factsOf(s: Scenario): Facts {
  const h = tt.lawMean(s.holding);
  const retrying = s.retrials !== undefined && s.retrials.persistence > 0;
  return {
    n: s.servers,
    h,
    traffic: meanCallRate(s) * h,
    exponentialHolding: s.holding.law === "exponential",
    retrying,
    waiting: s.waitingPositions > 0,
    pureLoss: s.waitingPositions === 0 && !retrying,
  };
}

/**
 * One reference method: which scenarios it applies to (and whether it is exact for them), its
 * size limits, and how to compute it. Every rule is pure; `work` estimates the cost in the units
 * of `interactiveWork`, above which an interactive caller gets a `background` flag instead.
 */
export interface ReferenceRule {
  method: string | ((s: Scenario) => string);
  applies(s: Scenario, f: Facts): { exact: boolean; assumptions: string } | undefined;
  limits: string;
  work?(s: Scenario, f: Facts): number;
  interactiveWork?: number;
  compute(s: Scenario, f: Facts): Values;
}

const exponentialOrUndefined = (law: Scenario["patience"]) => law === undefined || law.law === "exponential";

/** The exact Markov chain (retrials and/or waiting room) applies to Poisson and finite-source fresh calls. */
function markovModel(s: Scenario, f: Facts): tt.MarkovSystemModel | undefined {
  const a = s.arrivals;
  if (a.process !== "poisson" && a.process !== "finite-source") return undefined;
  if (!f.retrying && !f.waiting) return undefined;
  const r = s.retrials;
  if (f.retrying && (r!.delay.law !== "exponential" || r!.maxAttempts !== undefined)) return undefined;
  if (!exponentialOrUndefined(s.patience)) return undefined;
  return {
    servers: f.n,
    waitingPositions: s.waitingPositions,
    meanHolding: f.h,
    patienceRate: s.patience ? 1 / tt.lawMean(s.patience) : 0,
    arrivals: a.process === "poisson" ? { kind: "poisson", rate: a.rate } : { kind: "finite-source", sources: a.sources, idleRate: a.idleRate },
    persistence: f.retrying ? r!.persistence : 0,
    retryRate: f.retrying ? 1 / tt.lawMean(r!.delay) : 0,
  };
}

/** The waiting-room values of a result as reference fields. */
function waitingValues(r: { lossProbability: number; waitingProbability: number; meanWait: number; meanQueueLength: number; abandonmentProbability: number }): Values {
  return {
    lossProbability: r.lossProbability,
    waitingProbability: r.waitingProbability,
    meanWait: r.meanWait,
    meanWaiting: r.meanQueueLength,
    abandonmentProbability: r.abandonmentProbability,
  };
}

/** Retrial parameters the exact chains need: exponential delays, no attempt limit, exponential patience if any. */
function exactRetrials(s: Scenario, f: Facts): { persistence: number; meanRetryDelay: number; meanPatience?: number } | undefined {
  if (!f.retrying) return undefined;
  const r = s.retrials!;
  if (r.delay.law !== "exponential" || r.maxAttempts !== undefined || !exponentialOrUndefined(s.patience)) return undefined;
  return { persistence: r.persistence, meanRetryDelay: tt.lawMean(r.delay), meanPatience: s.patience ? tt.lawMean(s.patience) : undefined };
}

/** Values of a retrial chain's result as reference fields. */
type RetrialMeasures = Pick<
  tt.OrbitChainResult,
  | "firstAttemptBlocking"
  | "timeCongestion"
  | "carriedTraffic"
  | "lossProbability"
  | "attemptCongestion"
  | "attemptsPerCall"
  | "meanOrbit"
  | "neglectedMass"
  | "batchCongestion"
  | "waitingProbability"
  | "meanWait"
  | "meanQueueLength"
  | "abandonmentProbability"
>;

function retrialValues(r: RetrialMeasures, f: Facts): Values {
  const values: Values = {
    callCongestion: r.firstAttemptBlocking,
    timeCongestion: r.timeCongestion,
    carriedTraffic: r.carriedTraffic,
    lossProbability: r.lossProbability,
    attemptCongestion: r.attemptCongestion,
    attemptsPerCall: r.attemptsPerCall,
    meanRetrying: r.meanOrbit,
    truncationBound: r.neglectedMass,
  };
  if (r.batchCongestion !== undefined) values.batchCongestion = r.batchCongestion;
  if (f.waiting) Object.assign(values, waitingValues(r));
  return values;
}

const orbitLimits = `interactive up to states × lower band × upper band = ${tt.INTERACTIVE_ORBIT_WORK} at the first orbit cap; at most ${tt.MAX_ORBIT_BAND} band entries; the orbit is truncated where the neglected mass is below ${tt.TRUNCATION_BOUND}`;

/** Retrials on MMPP (and on-off) arrivals: the exact chain on (phase, calls, orbit). */
const mmppRetrialRule: ReferenceRule = {
  method: "MMPP retrial exact chain",
  limits: orbitLimits,
  interactiveWork: tt.INTERACTIVE_ORBIT_WORK,
  work: (s, f) => {
    const m = mmppOf(s.arrivals);
    const r = exactRetrials(s, f);
    return m && r ? tt.mmppRetrialWork({ servers: f.n, waitingPositions: s.waitingPositions, meanHolding: f.h, ...r, ...m }) : 0;
  },
  applies: (s, f) =>
    mmppOf(s.arrivals) && exactRetrials(s, f)
      ? {
          exact: f.exponentialHolding,
          assumptions: `Markov-modulated Poisson fresh calls, exponential holding, ${f.waiting ? `FIFO waiting with Q positions${s.patience ? ", exponential patience" : ""}, ` : ""}refused calls retry with the persistence after exponential delays, no attempt limit`,
        }
      : undefined,
  compute: (s, f) => retrialValues(tt.mmppRetrialSystem({ servers: f.n, waitingPositions: s.waitingPositions, meanHolding: f.h, ...exactRetrials(s, f)!, ...mmppOf(s.arrivals)! }), f),
};

/** Retrials on overflow arrivals: the exact chain on (primary states, calls at the final group, orbit). */
const overflowRetrialRule: ReferenceRule = {
  method: "overflow retrial exact chain",
  limits: `interactive up to states × lower band × upper band = ${tt.INTERACTIVE_OVERFLOW_RETRIAL_WORK} at the first orbit cap (the band is mostly empty); at most ${tt.MAX_ORBIT_BAND} band entries; levels are Π(nᵢ + 1) primary states × (N + Q + 1); the orbit is truncated where the neglected mass is below ${tt.TRUNCATION_BOUND}`,
  interactiveWork: tt.INTERACTIVE_OVERFLOW_RETRIAL_WORK,
  work: (s, f) => {
    const r = exactRetrials(s, f);
    return s.arrivals.process === "overflow" && r ? tt.overflowRetrialWork({ servers: f.n, waitingPositions: s.waitingPositions, persistence: r.persistence, primaries: s.arrivals.primaries }) : 0;
  },
  applies: (s, f) =>
    s.arrivals.process === "overflow" && exactRetrials(s, f)
      ? {
          exact: f.exponentialHolding,
          assumptions: `Poisson traffic to each primary group, overflow offered to the group under study, exponential holding with one mean, ${f.waiting ? `FIFO waiting with Q positions${s.patience ? ", exponential patience" : ""}, ` : ""}refused calls retry at the group under study with the persistence after exponential delays, no attempt limit`,
        }
      : undefined,
  compute: (s, f) => {
    if (s.arrivals.process !== "overflow") throw new Error("not overflow arrivals");
    return retrialValues(tt.overflowRetrialSystem({ servers: f.n, waitingPositions: s.waitingPositions, meanHolding: f.h, primaries: s.arrivals.primaries, ...exactRetrials(s, f)! }), f);
  },
};

/** Retrials on renewal arrivals: the embedded chain at arrivals on (calls, orbit). */
const renewalRetrialRule: ReferenceRule = {
  method: "renewal retrial embedded chain",
  limits: `interactive up to 3 S² × series terms + S³ = ${tt.INTERACTIVE_RENEWAL_RETRIAL_WORK} (S states, first two orbit caps); N, Q <= 200, at most 3000 states; interarrival laws whose series needs more than 20 000 terms (long tails) are refused`,
  interactiveWork: tt.INTERACTIVE_RENEWAL_RETRIAL_WORK,
  work: (s, f) => {
    const r = exactRetrials(s, f);
    return s.arrivals.process === "renewal" && r ? tt.renewalRetrialWork(f.n, s.waitingPositions, s.arrivals.interarrival, f.h, r.persistence, r.meanRetryDelay) : 0;
  },
  applies: (s, f) =>
    s.arrivals.process === "renewal" && exactRetrials(s, f)
      ? {
          exact: f.exponentialHolding,
          assumptions: `renewal fresh calls (${s.arrivals.interarrival.law} interarrival law), exponential holding, ${f.waiting ? `FIFO waiting with Q positions${s.patience ? ", exponential patience" : ""}, ` : ""}refused calls retry with the persistence after exponential delays, no attempt limit`,
        }
      : undefined,
  compute: (s, f) => {
    if (s.arrivals.process !== "renewal") throw new Error("not renewal arrivals");
    const r = tt.renewalRetrialSystem({ servers: f.n, waitingPositions: s.waitingPositions, meanHolding: f.h, interarrival: s.arrivals.interarrival, ...exactRetrials(s, f)! });
    return retrialValues(r, f);
  },
};

/** Retrials on Poisson batches: the exact chain on (calls, orbit) with binomial orbit jumps. */
const batchRetrialRule: ReferenceRule = {
  method: "batch retrial exact chain",
  limits: orbitLimits,
  interactiveWork: tt.INTERACTIVE_ORBIT_WORK,
  work: (s, f) => {
    const r = exactRetrials(s, f);
    if (s.arrivals.process !== "batch" || !r) return 0;
    return tt.batchRetrialWork({ servers: f.n, waitingPositions: s.waitingPositions, meanHolding: f.h, traffic: f.traffic, batchSize: s.arrivals.batchSize, admission: s.arrivals.admission, ...r });
  },
  applies: (s, f) =>
    s.arrivals.process === "batch" && exactRetrials(s, f)
      ? {
          exact: f.exponentialHolding,
          assumptions: `Poisson batches (${s.arrivals.batchSize.law} sizes), ${s.arrivals.admission} admission, exponential holding, ${f.waiting ? `FIFO waiting with Q positions${s.patience ? ", exponential patience" : ""}, ` : ""}each refused call retries with the persistence after exponential delays, no attempt limit`,
        }
      : undefined,
  compute: (s, f) => {
    if (s.arrivals.process !== "batch") throw new Error("not batch arrivals");
    const a = s.arrivals;
    return retrialValues(
      tt.batchRetrialSystem({ servers: f.n, waitingPositions: s.waitingPositions, meanHolding: f.h, traffic: f.traffic, batchSize: a.batchSize, admission: a.admission, ...exactRetrials(s, f)! }),
      f,
    );
  },
};

function peakedRule(method: "Wilkinson equivalent random" | "Hayward"): ReferenceRule {
  return {
    method,
    limits: "interactive for streams with mean <= 10^5 erlangs (equivalent random: peakedness >= 1)",
    applies(s, f) {
      if (!f.pureLoss || s.arrivals.process === "poisson" || s.arrivals.process === "finite-source" || s.arrivals.process === "time-varying") return undefined;
      const m = streamMoments(s);
      if (!m || Math.abs(m.peakedness - 1) < 1e-9) return undefined;
      if (method === "Wilkinson equivalent random" && m.peakedness < 1) return undefined;
      const what =
        s.arrivals.process === "overflow" && s.arrivals.primaries.length === 1
          ? "; with one primary group it reproduces that group's moments exactly"
          : "";
      return {
        exact: false,
        assumptions:
          method === "Hayward"
            ? `peaked stream: B(N/Z, M/Z) with Z = ${m.peakedness.toPrecision(4)} of the ${m.what} stream for exponential holding`
            : `${m.what} stream replaced by the overflow of one Poisson group with the same mean and variance (peakedness ${m.peakedness.toPrecision(4)} for exponential holding)${what}`,
      };
    },
    compute(s, f) {
      const m = streamMoments(s)!;
      const b = tt.peakedStreamBlocking(m.mean, m.variance, f.n);
      const blocking = method === "Hayward" ? b.hayward : b.equivalentRandom;
      if (blocking === undefined) throw new Error(b.unavailable);
      return { callCongestion: blocking, carriedTraffic: m.mean * (1 - blocking) };
    },
  };
}

/** Method names of the time-varying references (result.ts sets their per-segment values beside the estimates). */
export const TIME_VARYING_METHODS = {
  pointwise: "pointwise stationary approximation",
  modifiedLoad: "modified offered load approximation",
  periodic: "M(t)/M/N/N periodic exact solution",
  periodicQueue: "M(t)/M/N/N+Q periodic exact solution",
  periodicRetrial: "periodic retrial exact chain",
} as const;

function timeVaryingRule(method: "pointwise stationary approximation" | "modified offered load approximation"): ReferenceRule {
  const pointwise = method === TIME_VARYING_METHODS.pointwise;
  return {
    method,
    limits: `interactive up to segments × nodes × (N + 1) = ${tt.INTERACTIVE_TIME_VARYING_WORK}`,
    interactiveWork: tt.INTERACTIVE_TIME_VARYING_WORK,
    work: (s, f) => (s.arrivals.process === "time-varying" ? tt.timeVaryingWork(f.n, s.arrivals.profile, f.h) : 0),
    applies(s, f) {
      if (s.arrivals.process !== "time-varying" || !f.pureLoss) return undefined;
      return {
        exact: false,
        assumptions: pointwise
          ? "Erlang B at each segment's own traffic λ h, as if every segment were in equilibrium (Green & Kolesar 1991)"
          : "Erlang B at the load the same arrivals would hold on infinitely many servers, m' = λ(t) − m/h (Jagerman 1975; Massey & Whitt 1994); exponential holding for m(t)",
      };
    },
    compute(s, f) {
      if (s.arrivals.process !== "time-varying") throw new Error("not a time-varying profile");
      const r = tt.timeVaryingLoss({ servers: f.n, profile: s.arrivals.profile, meanHolding: f.h });
      const call = pointwise ? r.pointwiseCallCongestion : r.modifiedLoadCallCongestion;
      return {
        callCongestion: call,
        timeCongestion: pointwise ? r.pointwiseTimeCongestion : r.modifiedLoadTimeCongestion,
        carriedTraffic: f.traffic * (1 - call),
        segments: r.segments.map((g) => ({ start: g.start, duration: g.duration, callCongestion: pointwise ? g.pointwiseBlocking : g.modifiedLoadBlocking })),
      };
    },
  };
}

/** The exact periodic solution of the forward equations (lib/teletraffic/periodic-loss.ts). */
const periodicRule: ReferenceRule = {
  method: TIME_VARYING_METHODS.periodic,
  limits: `interactive up to about ${tt.INTERACTIVE_PERIODIC_WORK} state updates ((N + 1) × uniformisation terms over the cycles needed); at most ${tt.MAX_PERIODIC_WORK}`,
  interactiveWork: tt.INTERACTIVE_PERIODIC_WORK,
  work: (s, f) => (s.arrivals.process === "time-varying" ? tt.periodicLossWork(f.n, s.arrivals.profile, f.h) : 0),
  applies: (s, f) =>
    s.arrivals.process === "time-varying" && f.pureLoss && f.exponentialHolding
      ? {
          exact: true,
          assumptions:
            "Poisson arrivals at the profile's piecewise-constant periodic rate, exponential holding, blocked calls cleared; the periodic steady state of the forward equations (errors below the stated bound)",
        }
      : undefined,
  compute(s, f) {
    if (s.arrivals.process !== "time-varying") throw new Error("not a time-varying profile");
    const r = tt.periodicLossSystem({ servers: f.n, profile: s.arrivals.profile, meanHolding: f.h });
    return {
      callCongestion: r.callCongestion,
      timeCongestion: r.timeCongestion,
      carriedTraffic: r.carriedTraffic,
      truncationBound: r.errorBound,
      segments: r.segments.map((g) => ({ start: g.start, duration: g.duration, callCongestion: g.callCongestion, timeCongestion: g.timeCongestion })),
    };
  },
};

/** The exact periodic solution with waiting positions (and exponential patience): the same forward equations on N + Q + 1 states. */
const periodicQueueRule: ReferenceRule = {
  method: TIME_VARYING_METHODS.periodicQueue,
  limits: `interactive up to about ${tt.INTERACTIVE_PERIODIC_QUEUE_WORK} state updates ((N + Q + 51) × uniformisation terms over the cycles needed); at most ${tt.MAX_PERIODIC_WORK}`,
  interactiveWork: tt.INTERACTIVE_PERIODIC_QUEUE_WORK,
  work: (s, f) =>
    s.arrivals.process === "time-varying" ? tt.periodicQueueWork(f.n, s.waitingPositions, s.arrivals.profile, f.h, s.patience ? tt.lawMean(s.patience) : undefined) : 0,
  applies: (s, f) =>
    s.arrivals.process === "time-varying" && f.waiting && !f.retrying && f.exponentialHolding && exponentialOrUndefined(s.patience)
      ? {
          exact: true,
          assumptions: `Poisson arrivals at the profile's piecewise-constant periodic rate, exponential holding, FIFO waiting with Q positions${s.patience ? ", exponential patience" : ", no abandonment"}, no retrials; the periodic steady state of the forward equations (errors below the stated bound)`,
        }
      : undefined,
  compute(s, f) {
    if (s.arrivals.process !== "time-varying") throw new Error("not a time-varying profile");
    const r = tt.periodicQueueSystem({
      servers: f.n,
      waitingPositions: s.waitingPositions,
      profile: s.arrivals.profile,
      meanHolding: f.h,
      meanPatience: s.patience ? tt.lawMean(s.patience) : undefined,
    });
    return {
      callCongestion: r.callCongestion,
      timeCongestion: r.timeCongestion,
      carriedTraffic: r.carriedTraffic,
      ...waitingValues(r),
      truncationBound: r.errorBound,
      segments: r.segments.map((g) => ({ start: g.start, duration: g.duration, callCongestion: g.callCongestion, timeCongestion: g.timeCongestion })),
    };
  },
};

/** Retrials under a time-varying load: the periodic chain on (calls, orbit), bracketed by two bounding laws. */
const periodicRetrialRule: ReferenceRule = {
  method: TIME_VARYING_METHODS.periodicRetrial,
  limits: `interactive up to about ${tt.INTERACTIVE_PERIODIC_RETRIAL_WORK} state updates (2 × states × uniformisation terms × cycles); at most ${tt.MAX_PERIODIC_RETRIAL_WORK}; the orbit is capped where its tail is below ${tt.TRUNCATION_BOUND}`,
  interactiveWork: tt.INTERACTIVE_PERIODIC_RETRIAL_WORK,
  work: (s, f) => (s.arrivals.process === "time-varying" ? tt.periodicRetrialWork(periodicRetrialInput(s, f)!) : 0),
  applies: (s, f) =>
    s.arrivals.process === "time-varying" && f.exponentialHolding && periodicRetrialInput(s, f)
      ? {
          exact: true,
          assumptions: `Poisson fresh calls at the profile's piecewise-constant periodic rate, exponential holding, ${f.waiting ? `FIFO waiting with Q positions${s.patience ? ", exponential patience" : ""}, ` : ""}refused calls retry with the persistence after exponential delays, no attempt limit; the periodic steady state of the forward equations (errors below the stated bound)`,
        }
      : undefined,
  compute(s, f) {
    const r = tt.periodicRetrialSystem(periodicRetrialInput(s, f)!);
    return {
      ...retrialValues(r, f),
      truncationBound: Math.max(r.errorBound, r.neglectedMass),
      segments: r.segments.map((g) => ({ start: g.start, duration: g.duration, callCongestion: g.firstAttemptBlocking, timeCongestion: g.timeCongestion })),
    };
  },
};

function periodicRetrialInput(s: Scenario, f: Facts): tt.PeriodicRetrialInput | undefined {
  const r = exactRetrials(s, f);
  if (s.arrivals.process !== "time-varying" || !r) return undefined;
  return { servers: f.n, waitingPositions: s.waitingPositions, profile: s.arrivals.profile, meanHolding: f.h, ...r };
}

/** Every reference the lab can set beside a run, in the order they are shown. */
export const referenceRules: ReferenceRule[] = [
  {
    method: "Erlang B",
    limits: "always interactive (O(N), N <= 10^5 in scenarios)",
    applies: (s, f) => ({
      exact: (s.arrivals.process === "poisson" || (s.arrivals.process === "renewal" && s.arrivals.interarrival.law === "exponential")) && f.pureLoss,
      assumptions: "Poisson arrivals at the same mean offered traffic, any holding-time law (insensitivity), blocked calls cleared, no waiting",
    }),
    compute: (_, f) => {
      const b = tt.erlangB(f.n, f.traffic);
      return { callCongestion: b, timeCongestion: b, carriedTraffic: f.traffic * (1 - b) };
    },
  },
  {
    method: "Engset",
    limits: "always interactive (O(min(N, S)))",
    applies: (s, f) =>
      s.arrivals.process === "finite-source" && !f.waiting
        ? { exact: !f.retrying, assumptions: "finite sources with exponential idle times, any holding-time law (insensitivity), blocked calls return to idle" }
        : undefined,
    compute: (s, f) => {
      const a = s.arrivals as Extract<Scenario["arrivals"], { process: "finite-source" }>;
      const e = tt.engset({ sources: a.sources, servers: f.n, idleRate: a.idleRate, meanHolding: f.h });
      return { callCongestion: e.callCongestion, timeCongestion: e.timeCongestion, carriedTraffic: e.carriedTraffic };
    },
  },
  {
    method: "GI/M/N/N (Palm-Takacs)",
    limits: `interactive up to N × transform cost = ${tt.INTERACTIVE_RENEWAL_WORK} (closed-form laws cost 1, lognormal/Weibull/Pareto 400, empirical one per sample)`,
    interactiveWork: tt.INTERACTIVE_RENEWAL_WORK,
    work: (s, f) => (s.arrivals.process === "renewal" ? tt.renewalWork(f.n, s.arrivals.interarrival) : 0),
    applies: (s, f) =>
      s.arrivals.process === "renewal" && !f.waiting
        ? { exact: f.exponentialHolding && !f.retrying, assumptions: `renewal arrivals (${s.arrivals.interarrival.law} interarrival law), exponential holding, blocked calls cleared` }
        : undefined,
    compute: (s, f) => {
      const a = s.arrivals as Extract<Scenario["arrivals"], { process: "renewal" }>;
      const r = tt.renewalLossSystem({ servers: f.n, interarrival: a.interarrival, meanHolding: f.h });
      return { callCongestion: r.callCongestion, timeCongestion: r.timeCongestion, carriedTraffic: r.carriedTraffic };
    },
  },
  {
    method: "GI/M/N/N+Q embedded chain",
    limits: `interactive up to (N + Q + 1)² × series terms = ${tt.INTERACTIVE_RENEWAL_QUEUE_WORK}; at most ${tt.MAX_RENEWAL_QUEUE_WORK}; N, Q <= 2000`,
    interactiveWork: tt.INTERACTIVE_RENEWAL_QUEUE_WORK,
    work: (s, f) =>
      s.arrivals.process === "renewal" ? tt.renewalQueueWork(f.n, s.waitingPositions, s.arrivals.interarrival, f.h, s.patience ? tt.lawMean(s.patience) : undefined) : 0,
    applies: (s, f) =>
      s.arrivals.process === "renewal" && f.waiting && !f.retrying && exponentialOrUndefined(s.patience)
        ? {
            exact: f.exponentialHolding,
            assumptions: `renewal arrivals (${s.arrivals.interarrival.law} interarrival law), exponential holding, FIFO waiting with Q positions${s.patience ? ", exponential patience" : ""}, refused calls cleared`,
          }
        : undefined,
    compute: (s, f) => {
      const a = s.arrivals as Extract<Scenario["arrivals"], { process: "renewal" }>;
      const r = tt.renewalQueueSystem({ servers: f.n, waitingPositions: s.waitingPositions, interarrival: a.interarrival, meanHolding: f.h, meanPatience: s.patience ? tt.lawMean(s.patience) : undefined });
      return { callCongestion: r.callCongestion, timeCongestion: r.timeCongestion, carriedTraffic: r.carriedTraffic, ...waitingValues(r), truncationBound: r.seriesError };
    },
  },
  {
    method: "MMPP/M/N/N exact chain",
    limits: `interactive up to (N + 1) × phases³ = ${tt.INTERACTIVE_MMPP_WORK}; phases × (N + 1) <= ${tt.MAX_MMPP_STATES}`,
    interactiveWork: tt.INTERACTIVE_MMPP_WORK,
    work: (s, f) => (f.n + 1) * (mmppOf(s.arrivals)?.rates.length ?? 1) ** 3,
    applies: (s, f) =>
      mmppOf(s.arrivals) && !f.waiting
        ? { exact: f.exponentialHolding && !f.retrying, assumptions: "Markov-modulated Poisson arrivals, exponential holding, blocked calls cleared" }
        : undefined,
    compute: (s, f) => {
      const m = mmppOf(s.arrivals)!;
      const r = tt.mmppLossSystem({ servers: f.n, rates: m.rates, switching: m.switching, meanHolding: f.h });
      return { callCongestion: r.callCongestion, timeCongestion: r.timeCongestion, carriedTraffic: r.carriedTraffic };
    },
  },
  {
    method: "MMPP/M/N/N+Q exact chain",
    limits: `interactive up to (N + Q + 1) × phases³ = ${tt.INTERACTIVE_MMPP_WORK}; phases × (N + Q + 1) <= ${tt.MAX_MMPP_STATES}`,
    interactiveWork: tt.INTERACTIVE_MMPP_WORK,
    work: (s, f) => (f.n + s.waitingPositions + 1) * (mmppOf(s.arrivals)?.rates.length ?? 1) ** 3,
    applies: (s, f) =>
      mmppOf(s.arrivals) && f.waiting && !f.retrying && exponentialOrUndefined(s.patience)
        ? { exact: f.exponentialHolding, assumptions: "Markov-modulated Poisson arrivals, exponential holding, FIFO waiting with Q positions, exponential patience if any, no retrials" }
        : undefined,
    compute: (s, f) => {
      const m = mmppOf(s.arrivals)!;
      const r = tt.mmppQueueSystem({
        servers: f.n,
        waitingPositions: s.waitingPositions,
        rates: m.rates,
        switching: m.switching,
        meanHolding: f.h,
        meanPatience: s.patience ? tt.lawMean(s.patience) : undefined,
      });
      return { callCongestion: r.callCongestion, timeCongestion: r.timeCongestion, carriedTraffic: r.carriedTraffic, ...waitingValues(r) };
    },
  },
  {
    method: "batch Poisson exact chain",
    limits: `geometric sizes O(N + Q); other laws interactive up to (N + Q + 1) × largest batch = ${tt.INTERACTIVE_BATCH_WORK}`,
    interactiveWork: tt.INTERACTIVE_BATCH_WORK,
    work: (s) => (s.arrivals.process === "batch" ? tt.batchWork(s.servers, s.waitingPositions, s.arrivals.batchSize) : 0),
    applies: (s, f) =>
      s.arrivals.process === "batch" && !f.retrying && exponentialOrUndefined(s.patience)
        ? {
            exact: f.exponentialHolding,
            assumptions: `Poisson batches (${s.arrivals.batchSize.law} sizes), exponential holding, ${s.arrivals.admission} admission${f.waiting ? ", FIFO waiting positions, exponential patience if any" : ""}, refused calls cleared`,
          }
        : undefined,
    compute: (s, f) => {
      const a = s.arrivals as Extract<Scenario["arrivals"], { process: "batch" }>;
      const r = tt.batchLossSystem({
        servers: f.n,
        waitingPositions: s.waitingPositions,
        traffic: f.traffic,
        batchSize: a.batchSize,
        admission: a.admission,
        meanHolding: f.h,
        meanPatience: s.patience ? tt.lawMean(s.patience) : undefined,
      });
      const values: Values = { callCongestion: r.callCongestion, timeCongestion: r.timeCongestion, carriedTraffic: r.carriedTraffic, batchCongestion: r.batchCongestion };
      if (f.waiting)
        Object.assign(values, {
          lossProbability: r.lossProbability,
          waitingProbability: r.waitingProbability,
          meanWait: r.meanWait,
          meanWaiting: r.meanQueueLength,
          abandonmentProbability: r.abandonmentProbability,
        });
      return values;
    },
  },
  {
    method: "overflow network exact chain",
    limits: `interactive while (N + Q + 1) × K³ <= ${INTERACTIVE_OVERFLOW_WORK} (K = Π(nᵢ + 1)); direct solve up to ${tt.MAX_OVERFLOW_WORK}, Gauss–Seidel beyond, up to ${tt.MAX_OVERFLOW_STATES} states`,
    interactiveWork: INTERACTIVE_OVERFLOW_WORK,
    work: (s, f) => (s.arrivals.process === "overflow" ? (f.n + s.waitingPositions + 1) * s.arrivals.primaries.reduce((k, p) => k * (p.servers + 1), 1) ** 3 : 0),
    applies: (s, f) =>
      s.arrivals.process === "overflow" && (!f.waiting || (!f.retrying && exponentialOrUndefined(s.patience)))
        ? {
            exact: f.exponentialHolding && !f.retrying,
            assumptions: `Poisson traffic to each primary group, overflow offered to the group under study, exponential holding with one mean, ${
              f.waiting ? `FIFO waiting with Q positions at the group under study${s.patience ? ", exponential patience" : ""}, refused calls cleared` : "blocked calls cleared"
            }`,
          }
        : undefined,
    compute: (s, f) => {
      const a = s.arrivals as Extract<Scenario["arrivals"], { process: "overflow" }>;
      const o = tt.overflowLossSystem({
        primaries: a.primaries,
        servers: f.n,
        waitingPositions: s.waitingPositions,
        // The chain runs in mean holding times.
        meanPatience: f.waiting && s.patience ? tt.lawMean(s.patience) / f.h : undefined,
      });
      const values: Values = { callCongestion: o.blocking, timeCongestion: o.timeCongestion, carriedTraffic: o.overflowOffered - o.overflowLost };
      if (o.waiting)
        Object.assign(values, waitingValues(o.waiting), {
          carriedTraffic: o.overflowOffered * (1 - o.waiting.lossProbability),
          meanWait: o.waiting.meanWait * f.h,
        });
      return values;
    },
  },
  {
    method: (s) =>
      s.retrials && s.retrials.persistence > 0 ? "retrial model exact chain" : s.arrivals.process === "finite-source" ? "Engset with waiting positions" : "M/M/N/N+Q",
    limits: `interactive up to ${tt.INTERACTIVE_MARKOV_STATES} states (orbit levels × (N + Q + 1)); at most ${tt.MAX_MARKOV_STATES}; an unbounded orbit is truncated where the neglected mass is below ${tt.TRUNCATION_BOUND}`,
    interactiveWork: tt.INTERACTIVE_MARKOV_STATES,
    work: (s, f) => {
      const model = markovModel(s, f);
      return model ? tt.markovSystemStates(model) : 0;
    },
    applies: (s, f) => {
      if (!markovModel(s, f)) return undefined;
      const parts = [
        s.arrivals.process === "poisson" ? "Poisson fresh calls" : "finite sources with exponential idle times",
        "exponential holding",
        f.waiting ? `FIFO waiting with Q positions${s.patience ? ", exponential patience" : ", no abandonment"}` : "no waiting",
        f.retrying ? "refused calls retry with the persistence after exponential delays, no attempt limit" : "no retrials",
      ];
      return { exact: f.exponentialHolding, assumptions: parts.join(", ") };
    },
    compute: (s, f) => {
      const r = tt.solveMarkovSystem(markovModel(s, f)!);
      const values: Values = {
        callCongestion: r.firstAttemptBlocking,
        timeCongestion: r.timeCongestion,
        carriedTraffic: r.carriedTraffic,
        lossProbability: r.lossProbability,
      };
      if (f.retrying)
        Object.assign(values, { attemptCongestion: r.attemptCongestion, attemptsPerCall: r.attemptsPerCall, meanRetrying: r.meanOrbit, truncationBound: r.neglectedMass });
      if (f.waiting)
        Object.assign(values, {
          waitingProbability: r.waitingProbability,
          meanWait: r.meanWait,
          meanWaiting: r.meanQueueLength,
          abandonmentProbability: r.abandonmentProbability,
        });
      return values;
    },
  },
  mmppRetrialRule,
  batchRetrialRule,
  overflowRetrialRule,
  renewalRetrialRule,
  peakedRule("Wilkinson equivalent random"),
  peakedRule("Hayward"),
  {
    method: "extended Erlang B",
    limits: "always interactive (O(N) per fixed-point step)",
    applies: (s, f) =>
      f.retrying && !f.waiting
        ? { exact: false, assumptions: "Poisson fresh calls; a refused attempt returns with probability = persistence, long after, as Poisson traffic; no attempt limit" }
        : undefined,
    compute: (s, f) => {
      const e = tt.extendedErlangB({ servers: f.n, traffic: f.traffic, persistence: s.retrials!.persistence });
      // With all attempts Poisson (its assumption) fresh calls and retries see the same blocking.
      return { callCongestion: e.blocking, attemptCongestion: e.blocking, lossProbability: e.probabilityFreshCallLost, carriedTraffic: e.carriedTraffic };
    },
  },
  periodicRule,
  periodicQueueRule,
  periodicRetrialRule,
  timeVaryingRule("pointwise stationary approximation"),
  timeVaryingRule("modified offered load approximation"),
];

/**
 * Why a scenario has no exact reference, first matching reason. Each names what makes the exact
 * solution out of reach, so a reader can tell a mathematical limit from a missing method.
 */
export const exactLimits: Array<{ when(s: Scenario, f: Facts): boolean; reason: string }> = [
  {
    when: (s, f) => s.arrivals.process === "time-varying" && !f.exponentialHolding,
    reason:
      "holding times are not exponential under a time-varying load: out of equilibrium blocking depends on the whole holding-time law, not only its mean (no insensitivity), and every call's elapsed holding time is part of the state, so no finite Markov chain describes it; PSA and MOL are the approximations shown",
  },
  {
    when: (_, f) => !f.exponentialHolding,
    reason:
      "holding times are not exponential and the model is not insensitive to the holding law (only Erlang B and Engset loss systems are): every call's elapsed holding time is part of the state, so no finite Markov chain describes it",
  },
  {
    when: (s, f) => f.retrying && s.retrials!.delay.law !== "exponential",
    reason: "retry delays are not exponential: every retrying call's elapsed delay is part of the state, so the orbit has no finite Markov description",
  },
  {
    when: (s, f) => f.retrying && s.retrials!.maxAttempts !== undefined,
    reason:
      "an attempt limit makes retrying calls differ by the attempts they have used: the exact chain needs one orbit dimension per attempt, (orbit + limit − 1 choose limit − 1) states per orbit size, beyond any exact solve except tiny cases",
  },
  {
    when: (s) => s.patience !== undefined && s.patience.law !== "exponential",
    reason:
      "patience is not exponential: the waiting calls' elapsed waits are part of the state; the known exact M/M/N+G solution (Baccelli & Hébuterne 1981) needs an unlimited waiting room, not Q positions",
  },
  {
    when: (s, f) => s.arrivals.process === "renewal" && f.retrying,
    reason:
      "renewal arrivals with retrials beyond the embedded chain's size: it is dense in (calls, orbit) (N, Q <= 200, 3000 states, the orbit capped where its tail is below 1e-12) and sums the chain between arrivals term by term until the group has emptied (at most 20 000 terms); a computational limit of this method, not a mathematical one",
  },
  {
    when: (s, f) => {
      const r = exactRetrials(s, f);
      if (s.arrivals.process !== "overflow" || !r) return false;
      // The schema's refinement is the size check, from the shape alone.
      return !tt.overflowRetrialInputSchema.safeParse({ servers: f.n, waitingPositions: s.waitingPositions, meanHolding: f.h, primaries: s.arrivals.primaries, ...r }).success;
    },
    reason: `retrials on overflow arrivals beyond the banded solve: the exact chain has Π(nᵢ + 1) × (N + Q + 1) states per orbit level and its band is two levels wide, so it needs (orbit cap + 1) × level × (2 level + 1) stored entries, more than ${tt.MAX_ORBIT_BAND} already at the first orbit cap; a memory limit of this method, not a mathematical one`,
  },
  {
    when: (s, f) => s.arrivals.process === "overflow" && (f.n + s.waitingPositions + 1) * s.arrivals.primaries.reduce((k, p) => k * (p.servers + 1), 1) > tt.MAX_OVERFLOW_STATES,
    reason: `overflow network beyond ${tt.MAX_OVERFLOW_STATES} states (Π(nᵢ + 1) × (N + Q + 1): every primary group's busy count is part of the state): the exact chain exists but is too large to solve here; equivalent random and Hayward are the approximations shown`,
  },
];

export interface ReferenceOptions {
  /** Answering an interactive request: cases above a rule's interactive size come back flagged `background`, not computed. */
  interactive?: boolean;
}

/**
 * Analytic references for the scenario, one per applicable rule, in registry order; then, if none
 * is exact, an entry whose `unavailable` says why. Pure; each rule is bounded by its size limits.
 */
export function referencesFor(scenario: Scenario, options: ReferenceOptions = {}): Reference[] {
  const f = factsOf(scenario);
  const out: Reference[] = [];
  for (const rule of referenceRules) {
    const fit = rule.applies(scenario, f);
    if (!fit) continue;
    const method = typeof rule.method === "string" ? rule.method : rule.method(scenario);
    const base = { method, assumptions: fit.assumptions, exact: fit.exact };
    const work = rule.work?.(scenario, f) ?? 0;
    if (options.interactive && rule.interactiveWork !== undefined && work > rule.interactiveWork) {
      out.push({ ...base, background: true, unavailable: `too large for an interactive answer (${Number(work.toPrecision(3))} > ${rule.interactiveWork} work units; ${rule.limits}); computed with the run` });
      continue;
    }
    try {
      out.push({ ...base, ...rule.compute(scenario, f) });
    } catch (error) {
      out.push({ ...base, exact: false, unavailable: error instanceof Error ? error.message : String(error) });
    }
  }
  if (!out.some((r) => r.exact && !r.unavailable)) {
    const limit = exactLimits.find((l) => l.when(scenario, f));
    if (limit) out.push({ method: "exact reference", assumptions: "none applies to this scenario", exact: false, unavailable: limit.reason });
  }
  return out;
}
