import { z } from "zod";
import { assertFiniteResult, parseInput, TeletrafficConvergenceError } from "./errors";

export const MAX_SOURCES = 10_000_000;

const sourcesField = z.number().int().min(1).max(MAX_SOURCES).describe(`number of traffic sources S (1..${MAX_SOURCES})`);
const engsetServersField = z.number().int().min(0).max(MAX_SOURCES).describe("integer number of servers N (N >= S means no blocking)");
const meanHoldingField = z.number().gt(0).max(1e12).default(1).describe("mean holding time h (> 0), default 1");

export const engsetInputSchema = z
  .object({
    sources: sourcesField,
    servers: engsetServersField,
    idleRate: z.number().min(0).max(1e12).describe("call rate of one idle source γ (calls per unit time, >= 0)"),
    meanHolding: meanHoldingField,
  })
  .describe("Engset loss system: S sources, N servers, each idle source calls at rate γ, exponential holding");
export type EngsetInput = z.input<typeof engsetInputSchema>;

export interface EngsetResult {
  method: string;
  sources: number;
  servers: number;
  idleRate: number;
  meanHolding: number;
  /** β = γ h, the offered traffic per idle source */
  offeredPerIdleSource: number;
  /** intended traffic S β / (1 + β): what the sources would carry with no blocking */
  intendedTraffic: number;
  /** attempt-based offered traffic: call attempts of idle sources (blocked ones included) × mean holding */
  attemptTraffic: number;
  carriedTraffic: number;
  /** time congestion E: fraction of time all N servers are busy */
  timeCongestion: number;
  /** call congestion B: fraction of call attempts blocked (= time congestion with S - 1 sources) */
  callCongestion: number;
  /** traffic congestion C = (intended − carried) / intended */
  trafficCongestion: number;
  callAttemptRate: number;
}

/** Truncated binomial p_j ∝ C(S, j) β^j, j = 0..min(N, S), built outward from the mode. */
function engsetDistribution(sources: number, servers: number, beta: number): Float64Array {
  const top = Math.min(servers, sources);
  const p = new Float64Array(top + 1);
  if (beta === 0) {
    p[0] = 1;
    return p;
  }
  const mode = Math.min(top, Math.floor(((sources + 1) * beta) / (1 + beta)));
  p[mode] = 1;
  for (let j = mode; j < top; j++) p[j + 1] = (p[j] * (sources - j) * beta) / (j + 1);
  for (let j = mode; j > 0; j--) p[j - 1] = (p[j] * j) / ((sources - j + 1) * beta);
  let sum = 0;
  for (let j = 0; j <= top; j++) sum += p[j];
  for (let j = 0; j <= top; j++) p[j] /= sum;
  return p;
}

function engsetFromBeta(sources: number, servers: number, beta: number) {
  const p = engsetDistribution(sources, servers, beta);
  const top = p.length - 1;
  let carried = 0;
  let attempts = 0; // Σ (S - j) p_j
  for (let j = 0; j <= top; j++) {
    carried += j * p[j];
    attempts += (sources - j) * p[j];
  }
  const blockingPossible = servers < sources;
  const timeCongestion = servers <= sources ? p[servers] : 0;
  const callCongestion = blockingPossible && attempts > 0 ? ((sources - servers) * p[servers]) / attempts : 0;
  const offeredTraffic = (sources * beta) / (1 + beta);
  // C = (S − N) E / S (Iversen, Teletraffic Engineering Handbook, Engset chapter), from the balance
  // Y = β (S − Y − (S − N) E). Why not (A − Y)/A: that difference cancels to rounding noise when C is
  // small (S = 1000, N = 10, β = 1e-4 gave 1.4e-16 for the exact 2.36e-17; S = 100, N = 50, β = 0.1 gave 0).
  const trafficCongestion = blockingPossible ? ((sources - servers) * timeCongestion) / sources : 0;
  return { timeCongestion, callCongestion, trafficCongestion, carried, attempts, offeredTraffic };
}

/** Engset (1918) by the exact truncated binomial; the three congestion measures differ for finite S. */
export function engset(input: EngsetInput): EngsetResult {
  const { sources, servers, idleRate, meanHolding } = parseInput(engsetInputSchema, input);
  const beta = idleRate * meanHolding;
  const r = engsetFromBeta(sources, servers, beta);
  return assertFiniteResult(
    {
      method: "Engset (finite sources, exact truncated binomial)",
      sources,
      servers,
      idleRate,
      meanHolding,
      offeredPerIdleSource: beta,
      intendedTraffic: r.offeredTraffic,
      attemptTraffic: beta * r.attempts,
      carriedTraffic: r.carried,
      timeCongestion: r.timeCongestion,
      callCongestion: r.callCongestion,
      trafficCongestion: r.trafficCongestion,
      callAttemptRate: idleRate * r.attempts,
    },
    "engset",
  );
}

export const engsetIdleRateInputSchema = z
  .object({
    sources: sourcesField,
    servers: engsetServersField,
    intendedPerSource: z
      .number()
      .gt(0)
      .lt(1)
      .optional()
      .describe("intended traffic per source in erlangs, 0 < a < 1: what a source would carry with no blocking, β/(1 + β) (the engset operation's intendedTraffic / S)"),
    attemptPerSource: z
      .number()
      .gt(0)
      .lt(1)
      .optional()
      .describe("attempt-based offered traffic per source in erlangs, 0 < α < 1: call attempts (blocked ones included) × mean holding / S, attempts made only while idle"),
    meanHolding: meanHoldingField,
    tolerance: z.number().gt(0).max(1e-3).default(1e-13).describe("relative error bound on β = idle rate × mean holding at which the search stops"),
  })
  .superRefine((v, ctx) => {
    if ((v.intendedPerSource === undefined) === (v.attemptPerSource === undefined))
      ctx.addIssue({ code: "custom", path: ["attemptPerSource"], message: "give exactly one of intendedPerSource or attemptPerSource" });
  })
  .describe("inverse Engset: idle-source call rate from the intended or the attempt-based offered traffic per source");
export type EngsetIdleRateInput = z.input<typeof engsetIdleRateInputSchema>;

export interface EngsetIdleRateResult extends EngsetResult {
  /** which traffic was given: "intended" or "attempt-based" */
  given: "intended" | "attempt-based";
  /** bound on the relative error of β (hence of the idle rate) when the search stopped */
  errorBound: number;
  iterations: number;
}

/**
 * Intended traffic a = β/(1 + β) inverts in closed form. Attempt-based traffic α = β (S − Y(β))/S
 * (attempts of idle sources × h per source; Iversen, handbook, Engset chapter, where it appears as
 * the fixed point β = α / (1 − α(1 − C))) is increasing in β, so β is found by a bracketed root in
 * ln β (Illinois with bisection safeguard) that stops when the bracket, a guaranteed error bound,
 * is below the tolerance. Each step costs O(min(N, S)); about 60 steps in the worst case.
 */
export function engsetIdleRateForOfferedTraffic(input: EngsetIdleRateInput): EngsetIdleRateResult {
  const { sources, servers, intendedPerSource, attemptPerSource, meanHolding, tolerance } = parseInput(engsetIdleRateInputSchema, input);
  let beta: number;
  let iterations = 0;
  let errorBound = 0;
  if (intendedPerSource !== undefined) {
    beta = intendedPerSource / (1 - intendedPerSource);
  } else {
    const alpha = attemptPerSource!;
    const attemptTraffic = (b: number) => (b * (sources - engsetFromBeta(sources, servers, b).carried)) / sources;
    // α(β) <= β (no blocking lowers it) and α(β) >= β/(1 + β) (with N >= S the two are equal), so
    // β lies in [α, α/(1 − α)]
    let lo = Math.log(alpha);
    let hi = Math.log(alpha / (1 - alpha));
    const f = (u: number) => Math.log(attemptTraffic(Math.exp(u))) - Math.log(alpha);
    let fLo = f(lo);
    let fHi = f(hi);
    iterations = 2;
    if (fLo >= 0) hi = lo;
    else if (fHi <= 0) lo = hi;
    else {
      // Illinois false position with bisection whenever the bracket does not halve
      let side = 0;
      while (hi - lo > tolerance && iterations < 400) {
        const width = hi - lo;
        let u = lo - (fLo * (hi - lo)) / (fHi - fLo);
        if (!(u > lo && u < hi)) u = 0.5 * (lo + hi);
        const fu = f(u);
        iterations++;
        if (fu === 0) {
          lo = hi = u;
          break;
        }
        if (fu < 0) {
          lo = u;
          fLo = fu;
          if (side === -1) fHi /= 2;
          side = -1;
        } else {
          hi = u;
          fHi = fu;
          if (side === 1) fLo /= 2;
          side = 1;
        }
        if (hi - lo > 0.5 * width) {
          const m = 0.5 * (lo + hi);
          const fm = f(m);
          iterations++;
          if (fm < 0) {
            lo = m;
            fLo = fm;
          } else {
            hi = m;
            fHi = fm;
          }
          side = 0;
        }
      }
      if (hi - lo > tolerance) throw new TeletrafficConvergenceError(`engsetIdleRateForOfferedTraffic: bracket still ${hi - lo} wide after ${iterations} steps`, iterations);
    }
    // the root lies in [e^lo, e^hi]: relative error of either end at most e^(hi − lo) − 1
    errorBound = Math.max(Math.expm1(hi - lo), Number.EPSILON);
    beta = Math.exp(0.5 * (lo + hi));
  }
  const result = engset({ sources, servers, idleRate: beta / meanHolding, meanHolding });
  return {
    ...result,
    method:
      intendedPerSource !== undefined
        ? "Engset inverse from intended traffic: β = a / (1 − a), then exact Engset"
        : "Engset inverse from attempt-based traffic: bracketed root in ln β with a guaranteed error bound, then exact Engset",
    given: intendedPerSource !== undefined ? "intended" : "attempt-based",
    errorBound,
    iterations,
  };
}

export const engsetServersInputSchema = z
  .object({
    sources: sourcesField,
    idleRate: z.number().gt(0).max(1e12).describe("call rate of one idle source γ"),
    meanHolding: meanHoldingField,
    target: z.number().gt(0).lt(1).describe("target congestion, strictly between 0 and 1"),
    measure: z.enum(["time", "call"]).default("call").describe('"time": time congestion E; "call": call congestion B (E with S − 1 sources)'),
  })
  .describe("Engset sizing: smallest N <= S meeting a target time or call congestion (N = S refuses no call); measureOneLess = the measure with one server fewer");
export type EngsetServersInput = z.input<typeof engsetServersInputSchema>;

/**
 * Smallest N with E_S(N) <= target (time) or E_{S−1}(N) <= target (call), walking the Engset
 * recursion E(n) = (S − n + 1) β E(n − 1) / (n + (S − n + 1) β E(n − 1)), E(0) = 1 (Iversen,
 * handbook, Engset chapter) in log form, so targets far below the float range are met exactly.
 * Never more than S servers: with N = S every source has its own server and no call is refused
 * (E_{S−1}(S) = 0); the time congestion E_S(S) = (β/(1 + β))^S there is the share of time all
 * sources are busy, which refuses nobody, so a time target it misses is not a reason for N = S + 1.
 */
export function engsetServers(input: EngsetServersInput): EngsetResult & { target: number; measure: string; measureOneLess: number } {
  const { sources, idleRate, meanHolding, target, measure } = parseInput(engsetServersInputSchema, input);
  const beta = idleRate * meanHolding;
  const s = measure === "time" ? sources : sources - 1;
  const logTarget = Math.log(target);
  let logE = 0;
  let previous = 1;
  let n = 0;
  // E(S' + 1) = 0 (a group larger than the sources is never all busy), so the walk ends by n = S' + 1 <= S + 1; it stops at S
  while (logE > logTarget && n < sources) {
    previous = Math.exp(logE);
    n += 1;
    const x = Math.log((s - n + 1) * beta) + logE; // ln((S' − n + 1) β E(n − 1)); −Infinity at n = S' + 1
    logE = x === -Infinity ? -Infinity : x - Math.log(n + Math.exp(x));
  }
  const result = engset({ sources, servers: n, idleRate, meanHolding });
  const oneEach =
    n === sources
      ? `; N = S: every source has its own server, so no call is ever refused (call congestion 0${
          logE > logTarget ? `; the time congestion ${Number(Math.exp(logE).toPrecision(6))} above the target is the share of time all sources are busy, which refuses nobody` : ""
        })`
      : "";
  return { ...result, method: `smallest N by walking the Engset recursion, at most S${oneEach}; ${result.method}`, target, measure, measureOneLess: previous };
}
