import { z } from "zod";
import { assertFiniteResult, inputError, parseInput } from "./errors";
import { log1mexp, logAddExp } from "./numeric";

export const MAX_RENEWAL_SERVERS = 1_000_000;
/** Beyond this the transform at j μ rounds to 1 and ln(1 - φ) loses all digits. */
export const MAX_RENEWAL_TRAFFIC = 10_000_000;

const positiveMean = z.number().gt(0).max(1e12);

/** Interarrival laws, same shapes as the simulation's scenario file. */
export const interarrivalLawSchema = z
  .discriminatedUnion("law", [
    z.object({ law: z.literal("exponential"), mean: positiveMean.describe("mean interarrival time") }),
    z.object({
      law: z.literal("erlang"),
      k: z.number().int().min(1).max(100_000).describe("number of exponential phases k (scv = 1/k)"),
      mean: positiveMean.describe("mean interarrival time"),
    }),
    z
      .object({
        law: z.literal("hyperexponential"),
        mean: positiveMean.optional().describe("mean interarrival time (with scv: balanced-means two-branch fit)"),
        scv: z.number().min(1).max(1e6).optional().describe("squared coefficient of variation, >= 1"),
        probabilities: z.array(z.number().gt(0).max(1)).min(1).max(10).optional().describe("branch probabilities, summing to 1"),
        means: z.array(positiveMean).min(1).max(10).optional().describe("branch means"),
      })
      .superRefine((v, ctx) => {
        const byMoments = v.mean !== undefined || v.scv !== undefined;
        const byBranches = v.probabilities !== undefined || v.means !== undefined;
        if (byMoments === byBranches) {
          ctx.addIssue({ code: "custom", path: ["mean"], message: "give either {mean, scv} or {probabilities, means}" });
        } else if (byMoments && (v.mean === undefined || v.scv === undefined)) {
          ctx.addIssue({ code: "custom", path: [v.mean === undefined ? "mean" : "scv"], message: "both mean and scv are needed" });
        } else if (byBranches) {
          if (!v.probabilities || !v.means || v.probabilities.length !== v.means.length) {
            ctx.addIssue({ code: "custom", path: ["probabilities"], message: "probabilities and means must be arrays of the same length" });
          } else if (Math.abs(v.probabilities.reduce((s, p) => s + p, 0) - 1) > 1e-9) {
            ctx.addIssue({ code: "custom", path: ["probabilities"], message: "must sum to 1" });
          }
        }
      }),
    z.object({ law: z.literal("deterministic"), value: positiveMean.describe("constant interarrival time") }),
    z.object({
      law: z.literal("gamma"),
      mean: positiveMean.describe("mean interarrival time"),
      cv: z.number().gt(0).max(1000).describe("coefficient of variation (shape = 1/cv²)"),
    }),
  ])
  .describe("interarrival-time law of a renewal arrival stream");
export type InterarrivalLaw = z.infer<typeof interarrivalLawSchema>;

export const renewalLossInputSchema = z
  .object({
    servers: z.number().int().min(0).max(MAX_RENEWAL_SERVERS).describe(`integer number of servers N (0..${MAX_RENEWAL_SERVERS})`),
    interarrival: interarrivalLawSchema,
    meanHolding: z.number().gt(0).max(1e12).default(1).describe("mean of the exponential holding time, default 1"),
  })
  .describe(`GI/M/N/N loss system with renewal arrivals; offered traffic (mean holding / mean interarrival) at most ${MAX_RENEWAL_TRAFFIC} erlangs`);
export type RenewalLossInput = z.input<typeof renewalLossInputSchema>;

/** ln φ(s) and ln(1 - φ(s)) of the interarrival Laplace–Stieltjes transform, each without cancellation. */
interface TransformLogs {
  mean: number;
  logs(s: number): { logPhi: number; logOneMinusPhi: number };
}

export const balancedHyperexponentialInputSchema = z
  .object({
    mean: positiveMean.describe("mean of the fitted law"),
    scv: z.number().min(1).max(1e6).describe("squared coefficient of variation, >= 1"),
  })
  .describe("two-branch hyperexponential with balanced means p1 m1 = p2 m2");

/** Balanced-means two-branch hyperexponential fit (Whitt 1982, "Approximating a point process by a renewal process"). */
export function balancedHyperexponential(mean: number, scv: number): { probabilities: number[]; means: number[] } {
  parseInput(balancedHyperexponentialInputSchema, { mean, scv });
  return balancedHyperexponentialUnchecked(mean, scv);
}

function balancedHyperexponentialUnchecked(mean: number, scv: number): { probabilities: number[]; means: number[] } {
  const p1 = 0.5 * (1 + Math.sqrt((scv - 1) / (scv + 1)));
  const p2 = 1 - p1;
  return { probabilities: [p1, p2], means: [mean / (2 * p1), mean / (2 * p2)] };
}

function gammaLogs(shape: number, mean: number): TransformLogs {
  return {
    mean,
    logs(s) {
      // ln φ = −shape ln(1 + x), x = mean s / shape, written as −mean s · ln(1 + x)/x. Why: for
      // cv below about 1e-154, shape = 1/cv² is Infinity and −Infinity · ln1p(0) was NaN; the
      // rewritten form tends to the deterministic −mean s.
      const x = (mean / shape) * s;
      const logPhi = -mean * s * (x === 0 ? 1 : Math.log1p(x) / x);
      return { logPhi, logOneMinusPhi: log1mexp(logPhi) };
    },
  };
}

function transformOf(law: InterarrivalLaw): TransformLogs {
  switch (law.law) {
    case "exponential":
      return {
        mean: law.mean,
        logs: (s) => ({ logPhi: -Math.log1p(law.mean * s), logOneMinusPhi: Math.log(law.mean * s) - Math.log1p(law.mean * s) }),
      };
    case "erlang":
      return gammaLogs(law.k, law.mean);
    case "gamma":
      return gammaLogs(1 / (law.cv * law.cv), law.mean);
    case "deterministic":
      return { mean: law.value, logs: (s) => ({ logPhi: -law.value * s, logOneMinusPhi: log1mexp(-law.value * s) }) };
    case "hyperexponential": {
      const branches = law.probabilities && law.means ? { probabilities: law.probabilities, means: law.means } : balancedHyperexponentialUnchecked(law.mean!, law.scv!);
      const mean = branches.probabilities.reduce((s, p, i) => s + p * branches.means[i], 0);
      return {
        mean,
        logs(s) {
          let phi = 0;
          let oneMinus = 0; // Σ p m s / (1 + m s): no subtraction
          for (let i = 0; i < branches.probabilities.length; i++) {
            const ms = branches.means[i] * s;
            phi += branches.probabilities[i] / (1 + ms);
            oneMinus += (branches.probabilities[i] * ms) / (1 + ms);
          }
          return { logPhi: Math.log(phi), logOneMinusPhi: Math.log(oneMinus) };
        },
      };
    }
  }
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
      method: "GI/M/N/N, Palm–Takács formula (exact), log-space sum",
      law: interarrival.law,
      servers: n,
      meanInterarrival: transform.mean,
      meanHolding,
      offeredTraffic,
      callCongestion,
      timeCongestion,
      carriedTraffic: offeredTraffic * admittedFraction,
    },
    "renewalLossSystem",
  );
}
