import tQuantile from "@stdlib/stats-base-dists-t-quantile";
import { solveDense } from "../teletraffic/dense";
import { erlangB } from "../teletraffic/erlang-b";
import type { ReplicationRecord } from "./aggregate";
import type { Interval } from "./estimators";
import { LawSampler, weibullShapeForCv } from "./laws";
import { lnGamma, type Law, type Scenario } from "./scenario";

/**
 * Variance reduction for call congestion, computed on the folded per-replication records only (so
 * the CLI, thread pool and queue worker give bit-identical results).
 *
 * 1. The **intensity estimator** (time-congestion estimator generalised): where fresh calls arrive
 *    one at a time with a stochastic intensity lambda(t) (Poisson, MMPP, on-off, time-varying,
 *    finite sources, overflow), E[refused calls] = E[integral of lambda(t) 1{refusing} dt]
 *    (PASTA for Poisson, Wolff 1982; the intensity form, Bremaud, Point Processes and Queues, 1981,
 *    and Melamed & Whitt, Operations Research 38, 1990). It drops the binomial noise of counting.
 * 2. **Control variates** with known expectation 0 (Lavenberg & Welch, Management Science 27, 1981;
 *    Nelson, Operations Research 38, 1990), all per replication:
 *    - arrivals: calls - integral of lambda (the realised vs the known mean interarrival time);
 *    - holding times: sum of drawn holding times - draws x mean (Wald's identity);
 *    - the same two restricted to the states near refusal (predictable weights keep the mean 0);
 *    - MMPP/on-off: phase sojourn lengths weighted by the phase's rate, overall and near refusal;
 *      renewal: interarrival times drawn near refusal (Wald's identity again);
 *    - overflow: each primary group's overflow count - Erlang B(n_i, A_i) x its arrivals (exact by PASTA);
 *    - with the intensity estimator, refused calls - integral of lambda while refusing (the direct
 *      count against its compensator), which mixes in the direct count at the best weight;
 *    - Little's law: busy-server time / mean holding - admitted calls, which turns the estimator
 *      into the combination of the direct and the indirect estimator (Srikant & Whitt,
 *      Operations Research 47, 1999), where loss equals call congestion.
 *    The coefficients are fitted by least squares across replications; the interval is Student t
 *    on n - 1 - q degrees of freedom with the Lavenberg-Welch variance s^2 (1/n + v' S^-1 v).
 *    The controls used are fixed by the model and the replication count, never by the data
 *    (except that a control with no variation is skipped), so the selection does not bias the
 *    interval. At most floor((n - 2) / 5) controls are used: the variance inflation
 *    (n - 2) / (n - 2 - q) of estimated coefficients then stays below about 1.25.
 */

export interface ControlledInterval extends Interval {
  method: string;
  degreesOfFreedom: number;
}

interface Control {
  name: string;
  /** Per-replication numerator with known expectation 0 (divided by the mean denominator). */
  values: number[];
}

/** Fewest degrees of freedom left after fitting the coefficients; see maxControls. */
export function maxControls(replications: number): number {
  return Math.max(0, Math.floor((replications - 2) / 5));
}

/**
 * Processes whose fresh calls arrive singly with a stochastic intensity kept by the engine; also
 * renewal arrivals run on the Markov path (phase-type laws: the current phase's completion rate is
 * the intensity, markov-path.ts), which every record must then come from.
 */
export function hasArrivalIntensity(scenario: Scenario, records: readonly Pick<ReplicationRecord, "path">[] = []): boolean {
  if (scenario.arrivals.process === "renewal") return records.length > 0 && records.every((r) => r.path === "markov");
  return ["poisson", "mmpp", "on-off", "time-varying", "finite-source", "overflow"].includes(scenario.arrivals.process);
}

/** Variance of a law, Infinity when it does not exist (Pareto shape <= 2). */
export function lawVariance(law: Law): number {
  switch (law.law) {
    case "exponential":
      return law.mean * law.mean;
    case "deterministic":
      return 0;
    case "erlang":
      return (law.mean * law.mean) / law.k;
    case "hyperexponential": {
      if (law.scv !== undefined) return law.scv * law.mean! * law.mean!;
      const p = law.probabilities!;
      const m = law.means!;
      const mean = p.reduce((s, q, i) => s + q * m[i], 0);
      return p.reduce((s, q, i) => s + q * 2 * m[i] * m[i], 0) - mean * mean;
    }
    case "lognormal":
    case "gamma":
      return (law.cv * law.mean) ** 2;
    case "weibull": {
      const shape = law.shape ?? weibullShapeForCv(law.cv!);
      const mean = new LawSampler(law).mean;
      return mean * mean * (Math.exp(lnGamma(1 + 2 / shape) - 2 * lnGamma(1 + 1 / shape)) - 1);
    }
    case "pareto":
      return law.shape <= 2 ? Infinity : (law.mean * law.mean) / (law.shape * (law.shape - 2));
    case "uniform":
      return (law.max - law.min) ** 2 / 12;
    case "empirical": {
      const n = law.samples.length;
      const mean = law.samples.reduce((a, b) => a + b, 0) / n;
      return law.samples.reduce((s, x) => s + (x - mean) ** 2, 0) / n;
    }
  }
}

/** The controls that apply to call congestion for this scenario, in priority order. */
export function callCongestionControls(scenario: Scenario, records: readonly ReplicationRecord[]): Control[] {
  const controls: Control[] = [];
  const intensity = hasArrivalIntensity(scenario, records);
  const holdingMean = new LawSampler(scenario.holding).mean;
  const holdingUsable = Number.isFinite(lawVariance(scenario.holding)) && lawVariance(scenario.holding) > 0;
  controls.push({ name: "arrivals", values: records.map((r) => r.calls - r.intensityIntegral) });
  if (holdingUsable) controls.push({ name: "holding times", values: records.map((r) => (r.holdingSum - r.holdingDraws * holdingMean) / holdingMean) });
  const process = scenario.arrivals.process;
  if (process === "mmpp" || process === "on-off") {
    controls.push({ name: "phase sojourns", values: records.map((r) => r.phaseSojournDeviation) });
    controls.push({ name: "near-refusal phase sojourns", values: records.map((r) => r.nearRefusalPhaseSojournDeviation) });
  }
  if (intensity) controls.push({ name: "near-refusal arrivals", values: records.map((r) => r.nearRefusalCalls - r.nearRefusalIntensityIntegral) });
  if (process === "renewal" && Number.isFinite(lawVariance(scenario.arrivals.interarrival)) && lawVariance(scenario.arrivals.interarrival) > 0)
    controls.push({ name: "near-refusal interarrival times", values: records.map((r) => r.nearRefusalGapDeviation) });
  if (holdingUsable)
    controls.push({ name: "near-refusal holding times", values: records.map((r) => (r.nearRefusalHoldingSum - r.nearRefusalHoldingDraws * holdingMean) / holdingMean) });
  if (scenario.arrivals.process === "overflow") {
    scenario.arrivals.primaries.forEach((p, i) => {
      if (p.servers === 0) return;
      const b = erlangB(p.servers, p.traffic);
      controls.push({ name: `primary ${i + 1} overflow`, values: records.map((r) => (r.primaryOverflows[i] ?? 0) - b * (r.primaryArrivals[i] ?? 0)) });
    });
  }
  if (littleApplies(scenario) && holdingUsable)
    controls.push({ name: "Little's law (indirect estimator)", values: records.map((r) => r.busyIntegral / holdingMean - (r.calls - r.blockedFirst)) });
  // Refused calls minus their compensator ∫λ·1{refusing}: mean 0 (the same martingale), so with the
  // intensity estimator this control mixes in the direct count at the variance-optimal weight. Last:
  // it helps most where the drawn-time controls are few (the Markov path, small groups).
  if (intensity) controls.push({ name: "refusals (direct count)", values: records.map((r) => r.blockedFirst - r.refusingIntensityIntegral) });
  return controls;
}

/** Loss equals call congestion (no retrials, no abandonment), so carried = offered x (1 - call congestion). */
function littleApplies(scenario: Scenario): boolean {
  return !scenario.retrials && !scenario.patience && scenario.arrivals.process !== "batch";
}

/**
 * Regression (control-variate) estimator of the ratio sum(y) / sum(x) with zero-mean controls,
 * on the linearised per-replication values u_i = R + (y_i - R x_i) / xbar (the delta method of
 * `ratioInterval`); with no control it is exactly `ratioInterval`.
 */
export function controlledRatio(y: readonly number[], x: readonly number[], controls: readonly Control[], confidence: number, limit = maxControls(y.length)): ControlledInterval & { used: string[] } {
  const n = y.length;
  let sy = 0;
  let sx = 0;
  for (let i = 0; i < n; i++) {
    sy += y[i];
    sx += x[i];
  }
  const xbar = sx / n;
  const ratio = sx > 0 ? sy / sx : NaN;
  const u = y.map((yi, i) => ratio + (yi - ratio * x[i]) / xbar);
  const ubar = ratio;
  // Accept controls in order, each only if it still varies after the ones accepted (Gram-Schmidt).
  const used: Control[] = [];
  const basis: number[][] = []; // centred, orthogonalised columns
  const raw: number[][] = []; // centred columns
  for (const c of controls) {
    if (used.length >= limit) break;
    const v = c.values.map((value) => value / xbar);
    const mean = v.reduce((a, b) => a + b, 0) / n;
    const centred = v.map((value) => value - mean);
    let residual = centred.slice();
    for (const b of basis) {
      const bb = dot(b, b);
      const f = dot(residual, b) / bb;
      residual = residual.map((value, i) => value - f * b[i]);
    }
    const size = dot(centred, centred);
    if (!(size > 0) || dot(residual, residual) <= 1e-10 * size) continue;
    used.push(c);
    basis.push(residual);
    raw.push(centred);
  }
  const q = used.length;
  const df = n - 1 - q;
  if (!(sx > 0) || n < 2) return { estimate: ratio, standardError: NaN, halfWidth: NaN, ciLow: NaN, ciHigh: NaN, method: "", degreesOfFreedom: n - 1, used: [] };
  const vbar = used.map((c) => c.values.reduce((a, b) => a + b / xbar, 0) / n);
  const centredU = u.map((value) => value - ubar);
  // S beta = s, S the centred cross-products of the controls.
  const S = raw.map((a) => raw.map((b) => dot(a, b)));
  const s = raw.map((a) => dot(a, centredU));
  const beta = solveDense(S, s);
  const estimate = ubar - beta.reduce((acc, b, j) => acc + b * vbar[j], 0);
  let ss = 0;
  for (let i = 0; i < n; i++) {
    let e = centredU[i];
    for (let j = 0; j < q; j++) e -= beta[j] * raw[j][i];
    ss += e * e;
  }
  const s2 = df > 0 ? ss / df : NaN;
  const quad = q > 0 ? dot(vbar, solveDense(S, vbar)) : 0;
  const standardError = Math.sqrt(s2 * (1 / n + quad));
  const halfWidth = df > 0 ? tQuantile(0.5 + confidence / 2, df) * standardError : NaN;
  return { estimate, standardError, halfWidth, ciLow: estimate - halfWidth, ciHigh: estimate + halfWidth, method: "", degreesOfFreedom: df, used: used.map((c) => c.name) };
}

function dot(a: readonly number[], b: readonly number[]): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += a[i] * b[i];
  return s;
}


/**
 * The reported call-congestion estimate: the intensity estimator where it is valid, else the
 * direct count, with the control variates that apply; `method` says which.
 */
export function callCongestionEstimate(scenario: Scenario, records: readonly ReplicationRecord[], confidence: number): ControlledInterval {
  const intensity = hasArrivalIntensity(scenario, records);
  const y = records.map((r) => (intensity ? r.refusingIntensityIntegral : r.blockedFirst));
  const x = records.map((r) => r.calls);
  const ci = controlledRatio(y, x, callCongestionControls(scenario, records), confidence);
  const base = intensity ? (scenario.arrivals.process === "poisson" ? "time congestion seen by Poisson arrivals (PASTA)" : "intensity estimator") : "direct count";
  const method = ci.used.length ? `${base} with control variates (${ci.used.join(", ")})` : base;
  return { estimate: ci.estimate, standardError: ci.standardError, halfWidth: ci.halfWidth, ciLow: ci.ciLow, ciHigh: ci.ciHigh, method, degreesOfFreedom: ci.degreesOfFreedom };
}
