import { z } from "zod";
import { assertFiniteResult, inputError, parseInput } from "./errors";
import { logAddExp } from "./numeric";
import { lawSchema, type Law } from "./laws";
import { transformOf } from "./transform";

export const MAX_RENEWAL_SERVERS = 1_000_000;
/** Beyond this the transform at j μ rounds to 1 and ln(1 - φ) loses all digits. */
export const MAX_RENEWAL_TRAFFIC = 10_000_000;
/** servers × transform cost above which an evaluation is no longer interactive (about 100 ms). */
export const INTERACTIVE_RENEWAL_WORK = 1_000_000;
/** Hard bound on servers × transform cost (about 10 s). */
export const MAX_RENEWAL_WORK = 200_000_000;

/** Interarrival laws: the program's one law vocabulary (the scenario file uses the same schema). */
export const interarrivalLawSchema = lawSchema;
export type InterarrivalLaw = Law;

export const renewalLossInputSchema = z
  .object({
    servers: z.number().int().min(0).max(MAX_RENEWAL_SERVERS).describe(`integer number of servers N (0..${MAX_RENEWAL_SERVERS})`),
    interarrival: interarrivalLawSchema.describe("interarrival-time law of the renewal arrival stream (any law of the scenario file)"),
    meanHolding: z.number().gt(0).max(1e12).default(1).describe("mean of the exponential holding time, default 1"),
  })
  .superRefine((v, ctx) => {
    const work = renewalWork(v.servers, v.interarrival);
    if (work > MAX_RENEWAL_WORK)
      ctx.addIssue({ code: "custom", path: ["servers"], message: `servers × transform cost = ${work} exceeds ${MAX_RENEWAL_WORK} (numerical and empirical transforms cost more per server)` });
  })
  .describe(`GI/M/N/N loss system with renewal arrivals; offered traffic (mean holding / mean interarrival) at most ${MAX_RENEWAL_TRAFFIC} erlangs`);
export type RenewalLossInput = z.input<typeof renewalLossInputSchema>;

/** Work units of one Palm–Takács evaluation: N transform evaluations. */
export function renewalWork(servers: number, law: Law): number {
  return servers * transformOf(law).cost;
}

export interface RenewalLossResult {
  method: string;
  law: string;
  servers: number;
  meanInterarrival: number;
  meanHolding: number;
  offeredTraffic: number;
  /** call congestion: probability that an arriving call finds all N servers busy */
  callCongestion: number;
  /** time congestion: fraction of time all N servers are busy */
  timeCongestion: number;
  carriedTraffic: number;
  /** peakedness of the stream on an infinite group with this exponential holding: 1/(1 − φ(μ)) − A (Takács) */
  peakedness: number;
  /** "closed form" or "numerical" (trapezoid rule, relative accuracy about 1e-12) */
  transform: string;
}

/**
 * Peakedness of a renewal stream offered to infinitely many servers with exponential holding of
 * rate μ: Z = 1/(1 − φ(μ)) − λ/μ (Takács 1962; e.g. Iversen, handbook, overflow chapter). Poisson
 * gives 1/(1 − λ/(λ+μ)) − λ/μ = 1.
 */
export function renewalPeakedness(law: Law, meanHolding: number): number {
  const transform = transformOf(law);
  const { logOneMinusPhi } = transform.logs(1 / meanHolding);
  return Math.exp(-logOneMinusPhi) - meanHolding / transform.mean;
}

/**
 * GI/M/N/N by the Palm–Takács formula (Takács 1962, "Introduction to the Theory of Queues";
 * Cohen 1957): with φ_i = φ(i μ) and C_j = Π_{i<=j} φ_i / (1 - φ_i), the call congestion is
 * B = 1 / Σ_{j=0}^{N} binom(N, j) / C_j (all terms positive, summed in log space).
 * Time congestion from two balance identities: arrivals that find N busy came after an arrival that
 * left N busy with no departure in between, π_N = (π_{N-1} + π_N) φ_N; and the rate into state N,
 * λ π_{N-1}, equals N μ p_N. Hence p_N = (A / N) B (1 - φ_N) / φ_N.
 */
export function renewalLossSystem(input: RenewalLossInput): RenewalLossResult {
  const { servers: n, interarrival, meanHolding } = parseInput(renewalLossInputSchema, input);
  const transform = transformOf(interarrival);
  const mu = 1 / meanHolding;
  const offeredTraffic = meanHolding / transform.mean;
  if (!(offeredTraffic > 0) || !(offeredTraffic <= MAX_RENEWAL_TRAFFIC)) {
    throw inputError("interarrival", `offered traffic (mean holding / mean interarrival) = ${offeredTraffic} must be in (0, ${MAX_RENEWAL_TRAFFIC}] erlangs`);
  }
  let callCongestion = 1;
  let timeCongestion = 1;
  let admittedFraction = 0;
  if (n > 0) {
    // term_j = ln binom(N, j) - ln C_j, built incrementally
    let logBinom = 0;
    let logC = 0;
    let logSum = 0; // j = 0 term is 1
    let logRest = -Infinity; // Σ_{j>=1}: 1 − B = rest / sum without cancellation
    let last = { logPhi: 0, logOneMinusPhi: 0 };
    for (let j = 1; j <= n; j++) {
      last = transform.logs(j * mu);
      if (last.logPhi === -Infinity) throw inputError("interarrival", "transform underflows: the arrival stream is too thin for this group");
      logBinom += Math.log((n - j + 1) / j);
      logC += last.logPhi - last.logOneMinusPhi;
      logSum = logAddExp(logSum, logBinom - logC);
      logRest = logAddExp(logRest, logBinom - logC);
    }
    callCongestion = Math.exp(-logSum);
    admittedFraction = Math.exp(logRest - logSum);
    timeCongestion = Math.exp(Math.log(offeredTraffic / n) - logSum + last.logOneMinusPhi - last.logPhi);
  }
  return assertFiniteResult(
    {
      method: `GI/M/N/N, Palm–Takács formula (exact), log-space sum; ${transform.exact} transform`,
      law: interarrival.law,
      servers: n,
      meanInterarrival: transform.mean,
      meanHolding,
      offeredTraffic,
      callCongestion,
      timeCongestion,
      carriedTraffic: offeredTraffic * admittedFraction,
      peakedness: Math.exp(-transform.logs(mu).logOneMinusPhi) - offeredTraffic,
      transform: transform.exact === "numerical" ? "numerical (trapezoid rule, relative accuracy about 1e-12)" : "closed form",
    },
    "renewalLossSystem",
  );
}
