import { z } from "zod";
import { assertFiniteResult, inputError, parseInput, TeletrafficConvergenceError } from "./errors";
import { erlangBCarriedPerServerUnchecked, erlangBComplementUnchecked, erlangBUnchecked, logErlangBUnchecked, stepLogB, TINY } from "./erlang-b-kernel";
import { solveBracketed } from "./solve";

/** Largest group (integer or real) the O(N) recursion is allowed to walk. */
export const MAX_SERVERS = 10_000_000;
export const MAX_TRAFFIC = 10_000_000;
/** Largest group for which the full state distribution is returned. */
export const MAX_DISTRIBUTION_SERVERS = 1_000_000;

export const serversField = z
  .number()
  .min(0)
  .max(MAX_SERVERS)
  .describe(`number of servers N (real N >= 0 allowed, via the incomplete-gamma continuation; at most ${MAX_SERVERS})`);
export const trafficField = z
  .number()
  .min(0)
  .max(MAX_TRAFFIC)
  .describe(`offered traffic A in erlangs (0 <= A <= ${MAX_TRAFFIC})`);
export const targetField = z
  .number()
  .gt(0)
  .lt(1)
  .describe("target blocking probability (grade of service), strictly between 0 and 1");

export const erlangBInputSchema = z
  .object({ servers: serversField, traffic: trafficField })
  .describe("Erlang B loss system M/M/N/N: N servers offered A erlangs of Poisson traffic");
export type ErlangBInput = z.infer<typeof erlangBInputSchema>;

export const erlangBStateDistributionInputSchema = z
  .object({
    servers: z.number().int().min(0).max(MAX_DISTRIBUTION_SERVERS).describe(`integer number of servers N (at most ${MAX_DISTRIBUTION_SERVERS})`),
    traffic: trafficField,
  })
  .describe("truncated Poisson distribution of the number of busy servers in M/M/N/N");
export type ErlangBStateDistributionInput = z.infer<typeof erlangBStateDistributionInputSchema>;

export const maxTrafficInputSchema = z
  .object({
    servers: serversField.refine((n) => n > 0, "must be > 0 (no traffic meets a target below 1 on zero servers)"),
    target: targetField,
  })
  .describe("largest offered traffic A with B(N, A) <= target");
export type MaxTrafficInput = z.infer<typeof maxTrafficInputSchema>;

export const minServersInputSchema = z
  .object({
    traffic: z.number().gt(0).max(MAX_TRAFFIC).describe(`offered traffic A in erlangs (0 < A <= ${MAX_TRAFFIC})`),
    target: targetField,
  })
  .describe("smallest group (integer, or real) with B(N, A) <= target");
export type MinServersInput = z.infer<typeof minServersInputSchema>;

export { erlangBCarriedPerServerUnchecked, erlangBComplementUnchecked, erlangBUnchecked, logErlangBUnchecked } from "./erlang-b-kernel";

// ---------------------------------------------------------------------------------------------
// Public API

/**
 * Erlang B blocking B(N, A) of M/M/N/N (Erlang 1917). Integer N: the recursion on B, which is
 * forward-stable; real N: the incomplete-gamma continuation B(x, A) = A^x e^-A / Γ(x+1, A)
 * evaluated at the fractional part, then the same recursion. B(0, A) = 1, B(N > 0, 0) = 0.
 */
export function erlangB(servers: number, traffic: number): number {
  const input = parseInput(erlangBInputSchema, { servers, traffic });
  return erlangBUnchecked(input.servers, input.traffic);
}

/** ln B(N, A): use when B is below the float range (e.g. N = 100 000, A = 10). */
export function logErlangB(servers: number, traffic: number): number {
  const input = parseInput(erlangBInputSchema, { servers, traffic });
  return logErlangBUnchecked(input.servers, input.traffic);
}

/** p_j = (A^j/j!) / Σ_{i<=N} A^i/i!, j = 0..N; built outward from the mode so nothing overflows. */
export function erlangBStateDistribution(servers: number, traffic: number): number[] {
  const { servers: n, traffic: a } = parseInput(erlangBStateDistributionInputSchema, { servers, traffic });
  const p = new Float64Array(n + 1);
  const mode = Math.min(n, Math.floor(a));
  p[mode] = 1;
  for (let j = mode + 1; j <= n; j++) p[j] = (p[j - 1] * a) / j;
  for (let j = mode - 1; j >= 0; j--) p[j] = (p[j + 1] * (j + 1)) / a; // mode = 0 when a = 0: loop skipped
  let sum = 0;
  for (let j = 0; j <= n; j++) sum += p[j];
  return Array.from(p, (v) => v / sum);
}

export interface ErlangBSummary {
  method: string;
  servers: number;
  traffic: number;
  blocking: number;
  carriedTraffic: number;
  lostTraffic: number;
  occupancyPerServer: number;
}

export function erlangBSummary(input: ErlangBInput): ErlangBSummary {
  const { servers, traffic } = parseInput(erlangBInputSchema, input);
  const blocking = erlangBUnchecked(servers, traffic);
  // Why the complement: A (1 − B) cancelled for B near 1; N = 0.001, A = 1e7 carried 0.00100000008 > N,
  // and N = 1e-12, A = 1 carried 5.9608e-13 for 5.9635e-13 (B itself came out 1 + 2e-16 at N = 1e-16)
  const carriedTraffic = traffic * erlangBComplementUnchecked(servers, traffic);
  return assertFiniteResult(
    {
      method: Number.isInteger(servers)
        ? "Erlang B (M/M/N/N), stable recursion"
        : "Erlang B, incomplete-gamma continuation to real N",
      servers,
      traffic,
      blocking,
      carriedTraffic,
      lostTraffic: traffic * blocking,
      // A (1 − B)/N, not carried / N: at N = 1e-300 the quotient of two tiny numbers; tends to
      // A e^A E_1(A) as N → 0+ (0.596 at A = 1), and is 0 at N = 0 (no servers)
      occupancyPerServer: erlangBCarriedPerServerUnchecked(servers, traffic),
    },
    "erlangBSummary",
  );
}

export interface MaxTrafficResult {
  method: string;
  servers: number;
  target: number;
  traffic: number;
  blocking: number;
  carriedTraffic: number;
  occupancyPerServer: number;
  iterations: number;
}

/** Largest A with B(N, A) <= target (relative accuracy about 1e-13 in A). */
export function maxTrafficForBlocking(input: MaxTrafficInput): MaxTrafficResult {
  const { servers, target } = parseInput(maxTrafficInputSchema, input);
  const traffic = maxTrafficUnchecked(servers, target);
  const blocking = erlangBUnchecked(servers, traffic.root);
  return assertFiniteResult(
    {
      method: "Erlang B inverse in A (safeguarded Newton on ln B in ln A, d ln B / d ln A = N - A (1 - B))",
      servers,
      target,
      traffic: traffic.root,
      blocking,
      carriedTraffic: traffic.root * erlangBComplementUnchecked(servers, traffic.root),
      occupancyPerServer: erlangBCarriedPerServerUnchecked(servers, traffic.root),
      iterations: traffic.iterations,
    },
    "maxTrafficForBlocking",
  );
}

export function maxTrafficUnchecked(servers: number, target: number): { root: number; iterations: number } {
  const logTarget = Math.log(target);
  // Why ln A: with Newton in A and halving of [0, hi] as the fallback, a root far below the start
  // (N = 3, target 1e-300: A ≈ 1.8e-100; N = 1, target 1e-100) was reached only by halving and the
  // 200 steps ran out (a plain Error). In u = ln A, ln B ≈ N u − ln Γ(N+1) is nearly linear for small
  // A, and the bracket [ln 5e-324, ln(N/(1−t))] halves to 1e-15 in about 60 steps.
  const floor = Number.MIN_VALUE;
  const logBAtFloor = logErlangBUnchecked(servers, floor);
  if (logBAtFloor > logTarget) {
    // tiny real N: 1/B(x, A) ≈ 1 + x ln(1/A), so B falls below the target only at an A that underflows
    throw inputError("target", `${target} is below B(N, A) = ${Math.exp(logBAtFloor)} even at the smallest positive traffic ${floor}; the largest traffic meeting it underflows to 0`);
  }
  if (logErlangBUnchecked(servers, MAX_TRAFFIC) <= logTarget) {
    // Why: beyond the traffic domain the root is ill-conditioned (relative error about 1e-16 / (1 − target)
    // in A): N = 5, target 1 − 1e-15 gave A = 1.8e15 where the root is 5.0e15 (60 % off).
    throw inputError("target", `${target}: the largest traffic meeting it is above ${MAX_TRAFFIC} erlangs, outside the traffic domain`);
  }
  let lo = Math.log(floor); // ln B(lo) - ln t <= 0
  // A (1 - B) <= N, so at A = N / (1 - target) the blocking is already >= target.
  let hi = Math.min(Math.log(servers / (1 - target)), Math.log(MAX_TRAFFIC));
  let x = Math.min(servers, Math.exp(hi) * 0.5);
  if (servers > 10) x = Math.min(Math.exp(hi) * 0.999, Math.max(1e-3, servers - Math.sqrt(servers) * Math.sqrt(Math.max(0, -2 * Math.log(target * Math.sqrt(servers))))));
  let u = Math.min(hi, Math.max(lo, Math.log(x)));
  for (let i = 1; i <= 200; i++) {
    x = Math.exp(u);
    const logB = logErlangBUnchecked(servers, x);
    const g = logB - logTarget;
    if (g === 0) return { root: stepDownToTarget(servers, x, target), iterations: i };
    if (g < 0) lo = u;
    else hi = u;
    // d ln B / d ln A = A (N/A − 1 + B) = N − A (1 − B) > 0 (carried traffic is below N)
    const slope = servers + x * Math.expm1(logB);
    let next = u - g / slope;
    const tol = 1e-15 * Math.max(1, Math.abs(u));
    if (Math.abs(next - u) <= tol || hi - lo <= tol) return { root: polishTraffic(servers, Math.exp(next > lo && next < hi ? next : u), logTarget, lo, hi, target), iterations: i };
    // after 100 steps (Newton wandering on rounding noise of ln B near 1) only bisect: the bracket,
    // at most 760 wide in ln A, is then below 1e-15 long before step 200
    if (!(next > lo && next < hi) || i > 100) next = 0.5 * (lo + hi);
    u = next;
  }
  throw new TeletrafficConvergenceError("maxTrafficForBlocking: safeguarded Newton in ln A did not settle within 200 steps", 200);
}

/** ln A carries only about |ln A| ulps of A: two Newton steps in A itself restore full relative accuracy. */
function polishTraffic(servers: number, traffic: number, logTarget: number, lo: number, hi: number, target: number): number {
  let x = traffic;
  const xLo = Math.exp(lo);
  const xHi = Math.exp(hi);
  for (let k = 0; k < 2; k++) {
    const logB = logErlangBUnchecked(servers, x);
    const next = x - (logB - logTarget) / (servers / x - 1 + Math.exp(logB));
    if (!(next >= xLo && next <= xHi)) break;
    x = next;
  }
  return stepDownToTarget(servers, x, target);
}

/** Steps down by a few ulps until the blocking, as the caller will recompute it, meets the target. */
function stepDownToTarget(servers: number, traffic: number, target: number): number {
  let x = traffic;
  // k stops at 51 (factor 1/2): from k = 52 on the factor would be <= 0
  for (let k = 0; k < 52 && !meetsTarget(servers, x, target); k++) x *= 1 - 2 ** (k - 52);
  return x;
}

// Why the reported quantity: comparing ln B below 1e-280 let exp(ln B) round above the target
// (N = 3, target 1e-300 reported blocking 1.0000000000000237e-300).
function meetsTarget(servers: number, traffic: number, target: number): boolean {
  return erlangBUnchecked(servers, traffic) <= target;
}

export interface MinServersResult {
  method: string;
  traffic: number;
  target: number;
  servers: number;
  blocking: number;
  blockingOneLess: number;
  realServers: number;
  carriedTraffic: number;
  occupancyPerServer: number;
}

/** Smallest integer N with B(N, A) <= target, with the real N* where B(N*, A) = target. */
export function minServersForBlocking(input: MinServersInput): MinServersResult {
  const { traffic, target } = parseInput(minServersInputSchema, input);
  const { servers, blocking, blockingOneLess, logBlocking, logBlockingOneLess } = minServersUnchecked(traffic, target);
  const realServers = realServersUnchecked(traffic, target, servers, logBlocking, logBlockingOneLess);
  return assertFiniteResult(
    {
      method: "Erlang B recursion walked up until B <= target; real N by the continuation",
      traffic,
      target,
      servers,
      blocking,
      blockingOneLess,
      realServers,
      carriedTraffic: traffic * (1 - blocking),
      occupancyPerServer: (traffic * (1 - blocking)) / servers,
    },
    "minServersForBlocking",
  );
}

export function minServersUnchecked(
  traffic: number,
  target: number,
): { servers: number; blocking: number; blockingOneLess: number; logBlocking: number; logBlockingOneLess: number } {
  let n = 0;
  if (target >= TINY) {
    // same arithmetic as walkUp (erlang-b-kernel.ts), so B at the returned N is bit-identical to erlangB(N, A)
    let b = 1;
    let prev = 1;
    while (b > target) {
      if (n >= MAX_SERVERS) throw inputError("traffic", `needs more than ${MAX_SERVERS} servers`);
      prev = b;
      const ab = traffic * b;
      b = ab / (n + 1 + ab);
      n += 1;
    }
    return { servers: n, blocking: b, blockingOneLess: prev, logBlocking: Math.log(b), logBlockingOneLess: Math.log(prev) };
  }
  const logTarget = Math.log(target);
  let logB = 0;
  let prevLogB = 0;
  while (logB > logTarget) {
    if (n >= MAX_SERVERS) throw inputError("traffic", `needs more than ${MAX_SERVERS} servers`);
    prevLogB = logB;
    n += 1;
    logB = stepLogB(logB, n, traffic);
  }
  return { servers: n, blocking: Math.exp(logB), blockingOneLess: Math.exp(prevLogB), logBlocking: logB, logBlockingOneLess: prevLogB };
}

function realServersUnchecked(traffic: number, target: number, servers: number, logB: number, logBPrev: number): number {
  const logTarget = Math.log(target);
  if (logB >= logTarget) return servers; // meets the target only within rounding: the root is N itself
  const lo = servers - 1;
  const fn = (x: number) => logErlangBUnchecked(x, traffic) - logTarget;
  return solveBracketed(fn, lo, servers, { fLo: logBPrev - logTarget, fHi: logB - logTarget, relativeTolerance: 1e-15, absoluteTolerance: 1e-13 }).root;
}

export interface RealServersResult {
  method: string;
  traffic: number;
  target: number;
  realServers: number;
  blocking: number;
}

/** The real N at which B(N, A) = target, using the incomplete-gamma continuation. */
export function realServersForBlocking(input: MinServersInput): RealServersResult {
  const { traffic, target } = parseInput(minServersInputSchema, input);
  const found = minServersUnchecked(traffic, target);
  const realServers = realServersUnchecked(traffic, target, found.servers, found.logBlocking, found.logBlockingOneLess);
  return assertFiniteResult(
    {
      method: "Erlang B continuation to real N, bracketed root in (N-1, N]",
      traffic,
      target,
      realServers,
      blocking: erlangBUnchecked(realServers, traffic),
    },
    "realServersForBlocking",
  );
}
