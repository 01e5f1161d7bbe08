import type { ReplicationStats } from "./engine";
import { createReplication, enginePathFor, type EnginePath, type ReplicationLoop } from "./dispatch";
import { BatchSizeSampler, LawSampler } from "./laws";
import { mser5Cut } from "./mser5";
import type { Scenario } from "./scenario";

/** Events per slice between progress reports and cancellation checks (~10-30 ms of work). */
export const SLICE_EVENTS = 1 << 18;

/** Raw observations per replication for MSER-5 (in batches of 5: 1000 batch means). */
const MSER_OBSERVATIONS = 5000;

/** A run stopped through its AbortSignal. */
export class SimulationCancelledError extends Error {
  readonly kind = "cancelled" as const;
  constructor(message = "simulation cancelled") {
    super(message);
    this.name = "SimulationCancelledError";
  }
}

/** Rough rate of fresh calls, only to space the MSER-5 trace in horizon runs. */
function approximateCallRate(scenario: Scenario): number {
  const a = scenario.arrivals;
  switch (a.process) {
    case "poisson":
      return a.rate;
    case "batch":
      return a.rate * new BatchSizeSampler(a.batchSize).mean;
    case "mmpp":
      return Math.max(...a.rates);
    case "on-off":
      return a.onRate;
    case "renewal":
      return 1 / new LawSampler(a.interarrival).mean;
    case "overflow":
      return a.primaries.reduce((s, p) => s + p.traffic, 0) / new LawSampler(scenario.holding).mean;
    case "finite-source":
      return a.sources * a.idleRate;
    case "time-varying":
      return Math.max(...a.profile.map((s) => s.rate));
  }
}

/** Time averages of an integral over consecutive trace intervals (one MSER-5 observation each). */
function intervalAverages(traceTime: readonly number[], integral: readonly number[]): number[] {
  const observations: number[] = [];
  for (let i = 1; i < traceTime.length; i++) {
    const dt = traceTime[i] - traceTime[i - 1];
    observations.push(dt > 0 ? (integral[i] - integral[i - 1]) / dt : 0);
  }
  return observations;
}

/**
 * One replication including, for `warmup: "auto"`, an MSER-5 pilot: the pilot runs the same
 * random streams without warm-up and records, over consecutive groups of fresh calls, the
 * time-average of every state that can drift (busy servers, calls retrying, calls waiting);
 * MSER-5 picks a truncation point for each, the latest wins, and the replication is run again
 * discarding that many fresh calls (same streams, so the same trajectory). A state that never
 * leaves 0 (no retrials, no waiting line) has no say.
 */
export class ReplicationJob {
  private current: ReplicationLoop;
  private pilot: boolean;
  private readonly traceEvery: number;
  private warmupAtBound = 0;

  constructor(
    private readonly scenario: Scenario,
    readonly index: number,
    /** The loop to run (default: the dispatch rule's); tests pin the reference loop with it. */
    private readonly path: EnginePath = enginePathFor(scenario),
  ) {
    this.pilot = scenario.run.warmup === "auto";
    const expectedCalls = scenario.run.callsPerReplication ?? (scenario.run.horizon ?? 0) * approximateCallRate(scenario);
    this.traceEvery = Math.max(1, Math.floor(expectedCalls / MSER_OBSERVATIONS));
    this.current = createReplication(scenario, index, this.pilot ? { warmupCalls: 0, traceEvery: this.traceEvery } : {}, path);
  }

  advance(maxEvents: number): boolean {
    if (!this.current.advance(maxEvents)) return false;
    if (!this.pilot) return true;
    const { traceTime, traceBusy, traceOrbit, traceQueue } = this.current;
    let discard = 0;
    for (const integral of [traceBusy, traceOrbit, traceQueue]) {
      if (integral.length === 0 || integral[integral.length - 1] === 0) continue; // the state stayed at 0
      const cut = mser5Cut(intervalAverages(traceTime, integral));
      discard = Math.max(discard, cut.discard);
      if (cut.atBound) this.warmupAtBound = 1;
    }
    this.pilot = false;
    // Cutting after `discard` observations starts measuring at trace point `discard`.
    this.current = createReplication(this.scenario, this.index, { warmupCalls: this.current.traceCalls[discard] ?? 0 }, this.path);
    return false;
  }

  progress(): number {
    const p = this.current.progress();
    return this.scenario.run.warmup === "auto" ? (this.pilot ? p / 2 : 0.5 + p / 2) : p;
  }

  stats(): ReplicationStats {
    const stats = this.current.stats();
    stats.warmupAtBound = this.warmupAtBound;
    return stats;
  }
}

/** The pure part: one replication, run to the end, depending only on (scenario, index). */
export function runReplication(scenario: Scenario, index: number): ReplicationStats {
  const job = new ReplicationJob(scenario, index);
  while (!job.advance(Number.MAX_SAFE_INTEGER));
  return job.stats();
}
