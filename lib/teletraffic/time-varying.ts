import { z } from "zod";
import { assertFiniteResult, parseInput } from "./errors";
import { erlangBUnchecked } from "./erlang-b";

/**
 * Work is counted in Erlang B recursion steps: each evaluation of B(N, A) walks the recursion in plain
 * floating point only until B falls below 1e-280, then adds the rest of the way in closed form
 * (erlang-b-kernel.ts), so it costs at most min(N, ⌈2A⌉ + 931) + 1 steps: beyond j = 2A every step
 * multiplies B by A/j < 1/2, and 2^-931 < 1e-280. Measured on this 2-core machine (December 2026):
 * 6.5 to 10 ns per step (N = 100 000, 1000 segments of one holding time at 900/1100 erlangs:
 * 3.1e7 steps estimated, 0.22 s; before the closed-form tail it walked every step to N in logs, 51 s).
 */
/** Estimated steps answered interactively, about 0.1 s; the analytic pool allows 20 × this (lib/analytic-pool/limits.ts). */
export const INTERACTIVE_TIME_VARYING_WORK = 10_000_000;
/** Estimated steps above which the input is refused outright (about 13 s at the measured cost; the estimate is an upper bound). */
export const MAX_TIME_VARYING_WORK = 2_000_000_000;
/** What the work estimate counts, as refusals name it. */
export const TIME_VARYING_WORK_MEASURE = "the estimated work, Erlang B evaluations (segments × quadrature nodes) × steps each (the smaller of N + 1 and 2 × peak load + 932)";
/** Gauss–Legendre nodes per piece of at most one mean holding time. */
const NODES = 8;
/** After this many mean holding times the modified offered load equals λ h to double precision. */
const SETTLED = 40;

/** The periodic piecewise-constant arrival rate, shared with the exact periodic solution (periodic-loss.ts). */
export const profileField = z
  .array(z.object({ duration: z.number().gt(0).max(1e12), rate: z.number().min(0).max(1e9) }))
  .min(1)
  .max(1000)
  .describe("the arrival-rate cycle: segments {duration, rate}, repeated for ever");
export const timeVaryingServersField = z.number().int().min(1).max(100_000).describe("integer number of servers N");
export const timeVaryingHoldingField = z.number().gt(0).max(1e12).default(1).describe("mean exponential holding time, default 1");

/** A profile with no traffic at all has no call congestion to report. */
export function refineProfileHasTraffic(profile: Array<{ rate: number }>, ctx: z.RefinementCtx): void {
  if (!profile.some((s) => s.rate > 0)) ctx.addIssue({ code: "custom", path: ["profile"], message: "at least one segment needs a rate > 0" });
}

export const timeVaryingInputSchema = z
  .object({
    servers: timeVaryingServersField,
    profile: profileField,
    meanHolding: timeVaryingHoldingField,
  })
  .superRefine((v, ctx) => {
    refineProfileHasTraffic(v.profile, ctx);
    // zod runs this refinement even when a field failed: size the work only for well-formed input
    if (!Number.isInteger(v.servers) || !(v.meanHolding > 0)) return;
    const { evaluations, stepsPerEvaluation, peakLoad, work } = timeVaryingWorkParts(v.servers, v.profile, v.meanHolding);
    if (work > MAX_TIME_VARYING_WORK) {
      ctx.addIssue({
        code: "custom",
        path: ["profile"],
        message: `estimated work ${work} Erlang B steps (${evaluations} evaluations over ${v.profile.length} segments × ${stepsPerEvaluation} steps each, the smaller of N + 1 = ${v.servers + 1} and 2 × peak load ${Number(peakLoad.toPrecision(6))} erlangs + 932) exceeds ${MAX_TIME_VARYING_WORK}; use fewer or shorter segments (up to ${SETTLED} holding times of each are integrated) or fewer servers`,
      });
    }
  })
  .describe("time-varying Poisson arrivals on N servers: pointwise stationary and modified offered load approximations of blocking per segment and over the cycle");
export type TimeVaryingInput = z.input<typeof timeVaryingInputSchema>;

/** Estimated Erlang B recursion steps of `timeVaryingLoss` (see INTERACTIVE_TIME_VARYING_WORK), in O(segments). */
export function timeVaryingWork(servers: number, profile: ReadonlyArray<{ duration: number; rate: number }>, meanHolding: number): number {
  return timeVaryingWorkParts(servers, profile, meanHolding).work;
}

export function timeVaryingWorkParts(
  servers: number,
  profile: ReadonlyArray<{ duration: number; rate: number }>,
  meanHolding: number,
): { evaluations: number; stepsPerEvaluation: number; peakLoad: number; work: number } {
  let evaluations = 0;
  let peakRate = 0;
  for (const s of profile) {
    // the pointwise value, NODES per piece, and the settled rest (timeVaryingLoss)
    evaluations += NODES * Math.max(1, Math.ceil(Math.min(s.duration, SETTLED * meanHolding) / meanHolding)) + 2;
    peakRate = Math.max(peakRate, s.rate);
  }
  // the load m(t) never exceeds the peak rate × h, and B(N, A) is evaluated only at loads up to that
  const peakLoad = peakRate * meanHolding;
  const stepsPerEvaluation = Math.min(servers + 1, Math.ceil(2 * peakLoad) + 932);
  return { evaluations, stepsPerEvaluation, peakLoad, work: evaluations * stepsPerEvaluation };
}

export interface TimeVaryingSegment {
  start: number;
  duration: number;
  rate: number;
  /** PSA: Erlang B at the segment's own offered traffic λ h */
  pointwiseBlocking: number;
  /** MOL: time average over the segment of B(N, m(t)) */
  modifiedLoadBlocking: number;
  /** infinite-server mean load m(t) at the segment's start and end */
  loadAtStart: number;
  loadAtEnd: number;
}

export interface TimeVaryingResult {
  method: string;
  servers: number;
  cycle: number;
  offeredTraffic: number;
  segments: TimeVaryingSegment[];
  /** over the cycle: calls lost / calls offered (arrival-weighted) */
  pointwiseCallCongestion: number;
  modifiedLoadCallCongestion: number;
  /** over the cycle: time average of the blocking (the time all servers are busy) */
  pointwiseTimeCongestion: number;
  modifiedLoadTimeCongestion: number;
}

/** Gauss–Legendre nodes and weights on [−1, 1] (Newton on P_n, as in Numerical Recipes' gauleg). */
function gaussLegendre(n: number): { x: number[]; w: number[] } {
  const x: number[] = [];
  const w: number[] = [];
  for (let i = 1; i <= n; i++) {
    let z = Math.cos((Math.PI * (i - 0.25)) / (n + 0.5));
    let dp = 0;
    for (let it = 0; it < 100; it++) {
      let p1 = 1;
      let p2 = 0;
      for (let j = 1; j <= n; j++) {
        const p3 = p2;
        p2 = p1;
        p1 = ((2 * j - 1) * z * p2 - (j - 1) * p3) / j;
      }
      dp = (n * (z * p1 - p2)) / (z * z - 1);
      const dz = p1 / dp;
      z -= dz;
      if (Math.abs(dz) < 1e-16) break;
    }
    x.push(z);
    w.push(2 / ((1 - z * z) * dp * dp));
  }
  return { x, w };
}

const RULE = gaussLegendre(NODES);

/**
 * The periodic mean load m(0) at the cycle start of the same arrivals on infinitely many servers
 * (m' = λ(t) − m/h): one cycle from 0 gives m(T) = A, and m(T) = A + e^{−T/h} m(0) at the periodic
 * solution, so m(0) = A / (1 − e^{−T/h}).
 */
export function periodicInfiniteServerLoad(profile: ReadonlyArray<{ duration: number; rate: number }>, meanHolding: number): number {
  let m = 0;
  let cycle = 0;
  for (const s of profile) {
    m = s.rate * meanHolding + (m - s.rate * meanHolding) * Math.exp(-s.duration / meanHolding);
    cycle += s.duration;
  }
  return m / -Math.expm1(-cycle / meanHolding);
}

/**
 * Pointwise stationary approximation (Green & Kolesar 1991, Management Science 37): Erlang B at
 * each segment's own traffic. Modified offered load (Jagerman 1975, "Nonstationary blocking in
 * telephone traffic", BSTJ 54; Massey & Whitt 1994, Ann. Appl. Probab. 4): Erlang B at the mean
 * load m(t) of the same arrivals on infinitely many servers, m' = λ(t) − m/h. With a piecewise
 * constant rate, m(t) = λ_i h + (m_i − λ_i h) e^{−(t − t_i)/h} inside segment i, and the periodic
 * start m_0 = A / (1 − e^{−T/h}) solves m(T) = A + e^{−T/h} m_0. Each segment is integrated by
 * Gauss–Legendre on pieces of one holding time (the load has settled after 40 of them).
 */
export function timeVaryingLoss(input: TimeVaryingInput): TimeVaryingResult {
  const { servers: n, profile, meanHolding: h } = parseInput(timeVaryingInputSchema, input);
  const cycle = profile.reduce((s, p) => s + p.duration, 0);
  let load = periodicInfiniteServerLoad(profile, h);
  const segments: TimeVaryingSegment[] = [];
  let start = 0;
  let calls = 0;
  let psaLost = 0;
  let molLost = 0;
  let psaTime = 0;
  let molTime = 0;
  for (const s of profile) {
    const a = s.rate * h;
    const psa = erlangBUnchecked(n, a);
    const m0 = load;
    const at = (t: number) => a + (m0 - a) * Math.exp(-t / h);
    const active = Math.min(s.duration, SETTLED * h);
    const pieces = Math.max(1, Math.ceil(active / h));
    const width = active / pieces;
    let integral = 0;
    for (let p = 0; p < pieces; p++) {
      const mid = (p + 0.5) * width;
      for (let i = 0; i < NODES; i++) integral += 0.5 * width * RULE.w[i] * erlangBUnchecked(n, at(mid + 0.5 * width * RULE.x[i]));
    }
    integral += (s.duration - active) * erlangBUnchecked(n, a);
    const mol = integral / s.duration;
    load = at(s.duration);
    segments.push({ start, duration: s.duration, rate: s.rate, pointwiseBlocking: psa, modifiedLoadBlocking: mol, loadAtStart: m0, loadAtEnd: load });
    calls += s.rate * s.duration;
    psaLost += s.rate * s.duration * psa;
    molLost += s.rate * integral;
    psaTime += s.duration * psa;
    molTime += integral;
    start += s.duration;
  }
  return assertFiniteResult(
    {
      method: "pointwise stationary and modified offered load approximations (Erlang B at λ(t) h and at the infinite-server load m(t))",
      servers: n,
      cycle,
      offeredTraffic: (calls / cycle) * h,
      segments,
      pointwiseCallCongestion: psaLost / calls,
      modifiedLoadCallCongestion: molLost / calls,
      pointwiseTimeCongestion: psaTime / cycle,
      modifiedLoadTimeCongestion: molTime / cycle,
    },
    "timeVaryingLoss",
  );
}
