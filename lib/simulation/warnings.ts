import tQuantile from "@stdlib/stats-base-dists-t-quantile";
import { z } from "zod";
import type { PartialAggregate, ReplicationRecord } from "./aggregate";
import { relaxationTime, RELAXATION_TIMES_PER_REPLICATION, unseenMeanShare, UNSEEN_SHARE_LIMIT } from "./diagnostics";
import type { SimulationResult } from "./result";
import { lawMean, type Law, type Scenario } from "./scenario";

/**
 * Reasons not to trust a figure, attached to every result (empty when all is well) and shown by
 * the CLI, the API and the run page. Rules live in one registry: each looks at the scenario, the
 * folded aggregate and the built result, and returns zero or more warnings. Every rule is a
 * pure function of these, so the warnings are as reproducible as the estimates.
 */
export const warningSchema = z.object({
  code: z.string(),
  message: z.string(),
  /** The result field the warning is about (e.g. "callCongestion"), when it is about one. */
  measure: z.string().optional(),
});
export type Warning = z.infer<typeof warningSchema>;

type BuiltResult = Omit<SimulationResult, "warnings">;

export interface WarningRule {
  code: string;
  check(scenario: Scenario, aggregate: PartialAggregate, result: BuiltResult): Warning[];
}

const fmt = (v: number, digits = 3) => String(Number(v.toPrecision(digits)));
const pct = (v: number) => `${fmt(100 * v, 2)} %`;

/** Every law of a scenario with its field name and about how many draws a replication makes of it. */
function lawsOf(scenario: Scenario, records: readonly ReplicationRecord[]): Array<{ field: string; law: Law; draws: number }> {
  const n = Math.max(1, records.length);
  const mean = (f: (r: ReplicationRecord) => number) => records.reduce((s, r) => s + f(r), 0) / n;
  const laws = [{ field: "holding", law: scenario.holding, draws: mean((r) => r.holdingDraws) }];
  const a = scenario.arrivals;
  if (a.process === "renewal") laws.push({ field: "arrivals.interarrival", law: a.interarrival, draws: mean((r) => r.calls) });
  if (scenario.retrials && scenario.retrials.persistence > 0) laws.push({ field: "retrials.delay", law: scenario.retrials.delay, draws: mean((r) => r.attempts - r.calls) });
  if (scenario.patience) laws.push({ field: "patience", law: scenario.patience, draws: mean((r) => r.waited) });
  return laws;
}

/** Trials behind each probability measure, for the zero-event bound. */
const PROBABILITY_TRIALS: Record<string, string> = {
  callCongestion: "calls",
  callCongestionDirect: "calls",
  timeCongestion: "calls (arrival instants)",
  firstAttemptBlocking: "calls",
  lossProbability: "calls",
  attemptCongestion: "attempts",
  waitingProbability: "admitted calls",
  abandonmentProbability: "admitted calls",
};

/** Mean and standard error of per-replication values. */
function meanAndError(values: readonly number[]): { mean: number; se: number } {
  const n = values.length;
  const mean = values.reduce((a, b) => a + b, 0) / n;
  const ss = values.reduce((s, v) => s + (v - mean) ** 2, 0);
  return { mean, se: n > 1 ? Math.sqrt(ss / (n * (n - 1))) : NaN };
}

/** Two-sided test level of the drift and consistency rules: 99.9 %, so an ordinary run trips them with probability 0.001. */
const TEST_LEVEL = 0.999;

export const warningRules: WarningRule[] = [
  {
    code: "no-event-observed",
    // A probability estimated at exactly zero has a zero-width interval that means nothing; the
    // result reports [0, upper] instead (result.ts), and this says so.
    check(_scenario, _aggregate, result) {
      const out: Warning[] = [];
      for (const [measure, trials] of Object.entries(PROBABILITY_TRIALS)) {
        const m = result[measure as keyof BuiltResult] as { estimate: number; ciHigh: number; upperBoundOnly?: boolean } | undefined;
        if (!m?.upperBoundOnly || measure === "firstAttemptBlocking") continue; // the same object as callCongestion
        if (measure === "callCongestionDirect" && result.callCongestion.upperBoundOnly) continue; // said once for call congestion
        out.push({
          code: "no-event-observed",
          measure,
          message: `No event observed over the measured ${trials}, so there is no two-sided interval; at ${pct(result.confidence)} confidence the value is below ${fmt(m.ciHigh)} (one-sided upper bound).`,
        });
      }
      // The same per profile segment, one warning per measure naming the segments; segments with
      // rate 0 are left out: no call arrives there, so nothing is refused whatever the busy time.
      for (const measure of ["callCongestion", "timeCongestion", "lossProbability"] as const) {
        const hit = (result.segments ?? []).filter((g) => g.rate > 0 && g[measure]?.upperBoundOnly);
        if (hit.length === 0) continue;
        out.push({
          code: "no-event-observed",
          measure: `segments.${measure}`,
          message: `No event observed in profile segment${hit.length > 1 ? "s" : ""} ${hit.map((g) => g.index + 1).join(", ")} (of ${result.segments!.length}), so ${measure} there has no two-sided interval; at ${pct(result.confidence)} confidence each value is below its ciHigh (one-sided upper bound over the segment's calls).`,
        });
      }
      return out;
    },
  },
  {
    code: "infinite-variance",
    check(scenario, aggregate) {
      return lawsOf(scenario, aggregate.records)
        .filter(({ law }) => law.law === "pareto" && law.shape <= 2)
        .map(({ field, law }) => ({
          code: "infinite-variance",
          message: `${field}: a Pareto law with shape ${(law as { shape: number }).shape} <= 2 has infinite variance; the central limit theorem behind the intervals does not hold and every replication underestimates the mean draw, so the estimates and intervals cannot be trusted at any run length.`,
        }));
    },
  },
  {
    code: "heavy-tail",
    // Criterion: the share of the law's mean carried by draws rarer than 1 in n (n = draws per
    // replication) exceeds 1 %; a typical replication never sees them, so every replication is
    // biased the same way and more replications do not help, only longer ones (diagnostics.ts).
    check(scenario, aggregate) {
      const out: Warning[] = [];
      for (const { field, law, draws } of lawsOf(scenario, aggregate.records)) {
        if (law.law === "pareto" && law.shape <= 2) continue; // said by infinite-variance
        if (!(draws >= 2)) continue; // no draws counted (or one): nothing to judge
        const share = unseenMeanShare(law, draws);
        if (share > UNSEEN_SHARE_LIMIT)
          out.push({
            code: "heavy-tail",
            message: `${field}: draws rarer than 1 in ${fmt(draws)} (the draws of one replication) carry ${pct(share)} of the law's mean, so a typical replication misses them and the estimates lean one way; use longer replications (fewer of them), not more.`,
          });
      }
      return out;
    },
  },
  {
    code: "run-too-short",
    check(scenario, aggregate) {
      const records = aggregate.records;
      if (records.length === 0) return [];
      const tau = relaxationTime(scenario);
      if (!Number.isFinite(tau.time)) return []; // infinite variance is said by its own rule
      const period = records.reduce((s, r) => s + r.time, 0) / records.length;
      if (period >= RELAXATION_TIMES_PER_REPLICATION * tau.time) return [];
      return [
        {
          code: "run-too-short",
          message: `Each replication measures ${fmt(period)} time units, ${fmt(period / tau.time, 2)} relaxation times of the system (${fmt(tau.time)}, set by ${tau.source}); at least ${RELAXATION_TIMES_PER_REPLICATION} are needed for the replication averages to be unbiased and near normal. Lengthen the replications.`,
        },
      ];
    },
  },
  {
    code: "warmup-at-bound",
    check(_scenario, aggregate) {
      const hit = aggregate.records.filter((r) => r.warmupAtBound > 0).length;
      if (hit === 0) return [];
      return [
        {
          code: "warmup-at-bound",
          message: `The automatic warm-up (MSER-5) cut at its last admissible point (half the pilot) in ${hit} of ${aggregate.records.length} replications: the state was still settling, so the measured period may still carry the start-up. Lengthen the replications or give a longer warmupCalls.`,
        },
      ];
    },
  },
  {
    code: "still-growing",
    // Per replication, the mean level in the second half of the measured period minus that in the
    // first half; across replications a one-sided t test at 99.9 % and a rise of at least 5 % of
    // the level (so a real trend, not a negligible one) flag a state still drifting.
    check(scenario, aggregate) {
      const records = aggregate.records.filter((r) => r.halfTime > 0 && r.time > r.halfTime);
      if (records.length < 2) return [];
      const states: Array<[string, string, (r: ReplicationRecord) => number, (r: ReplicationRecord) => number]> = [];
      if (scenario.retrials && scenario.retrials.persistence > 0) states.push(["meanRetrying", "calls retrying", (r) => r.halfOrbitIntegral, (r) => r.orbitIntegral]);
      if (scenario.waitingPositions > 0) states.push(["meanWaiting", "waiting line", (r) => r.halfQueueIntegral, (r) => r.queueIntegral]);
      const out: Warning[] = [];
      for (const [measure, label, half, whole] of states) {
        const first = records.map((r) => half(r) / r.halfTime);
        const rise = records.map((r, i) => (whole(r) - half(r)) / (r.time - r.halfTime) - first[i]);
        const { mean, se } = meanAndError(rise);
        const level = first.reduce((a, b) => a + b, 0) / first.length;
        const bound = tQuantile(TEST_LEVEL, records.length - 1) * se;
        if (mean > bound && mean > 0.05 * Math.max(level, 1e-9))
          out.push({
            code: "still-growing",
            measure,
            message: `The ${label} still grows after the warm-up: on average ${fmt(level)} in the first half of the measured period and ${fmt(level + mean)} in the second. The system is not in equilibrium (it may have none), so loss and carried traffic are not steady-state values.`,
          });
      }
      return out;
    },
  },
  {
    code: "inconsistent-result",
    // Little's law on the servers: carried traffic = fresh call rate x (1 - loss) x mean holding.
    // Per replication, the loss the carried traffic implies (1 - busy time / (calls x h)) is
    // compared with the loss counted; a paired t test at 99.9 % and a gap of at least 10 % of
    // the larger value flag a result that contradicts itself.
    check(scenario, aggregate, result) {
      const records = aggregate.records.filter((r) => r.calls > 0);
      if (records.length < 2) return [];
      const h = lawMean(scenario.holding);
      const measure = result.lossProbability ? "lossProbability" : "callCongestion";
      const counted = (r: ReplicationRecord) => (result.lossProbability ? r.lost : r.blockedFirst) / r.calls;
      const implied = (r: ReplicationRecord) => 1 - r.busyIntegral / (r.calls * h);
      const gap = records.map((r) => counted(r) - implied(r));
      const { mean, se } = meanAndError(gap);
      const lossCounted = records.reduce((s, r) => s + counted(r), 0) / records.length;
      const lossImplied = lossCounted - mean;
      const bound = tQuantile(0.5 + TEST_LEVEL / 2, records.length - 1) * se;
      if (!(Math.abs(mean) > bound) || Math.abs(mean) < 0.1 * Math.max(Math.abs(lossCounted), Math.abs(lossImplied))) return [];
      return [
        {
          code: "inconsistent-result",
          measure,
          message: `The counted loss (${fmt(lossCounted)}) disagrees with the loss implied by the carried traffic (1 - carried / (call rate x mean holding) = ${fmt(lossImplied)}): calls still in the system at the end, a drifting state or heavy-tailed holding times make the counts unrepresentative.`,
        },
      ];
    },
  },
];

export function warningsFor(scenario: Scenario, aggregate: PartialAggregate, result: BuiltResult): Warning[] {
  return warningRules.flatMap((rule) => rule.check(scenario, aggregate, result));
}
