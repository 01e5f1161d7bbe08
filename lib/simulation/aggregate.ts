import type { ReplicationStats } from "./engine";

/**
 * The one canonical reduction of a run (CLI, thread pool and queue worker all use it).
 *
 * A run is cut into chunks of consecutive replications (the chunk size is part of the run
 * plan, see plan.ts). A chunk's partial aggregate keeps every replication's scalar counters
 * (needed for the between-replication confidence intervals and the per-replication charts) and
 * the occupancy vector summed in replication-index order. Chunks are then merged in chunk
 * order. Floating-point addition is not associative, so this one order is what makes the same
 * scenario and seed give bit-identical estimates from the CLI, from one worker or from five.
 *
 * Everything here is JSON-safe (plain numbers and arrays), so a chunk result can be stored in
 * PostgreSQL and merged later by another process.
 */

/** One replication's counters without the occupancy vector (folded into the chunk's sum). */
export type ReplicationRecord = Omit<ReplicationStats, "occupancy">;

export interface PartialAggregate {
  /** Index of the first replication covered. */
  firstReplication: number;
  /** Consecutive replications, in index order, starting at `firstReplication`. */
  records: ReplicationRecord[];
  /** Time at each busy count 0..servers, summed over `records` in index order. */
  occupancy: number[];
}

export function recordOf(stats: ReplicationStats): ReplicationRecord {
  const { occupancy: _occupancy, ...record } = stats;
  return record;
}

/**
 * Builds a chunk's aggregate from its replications, which must be consecutive; they may be
 * given in any order (threads finish in any order) and are summed in index order.
 */
export function aggregateReplications(stats: readonly ReplicationStats[], servers: number): PartialAggregate {
  const sorted = [...stats].sort((a, b) => a.index - b.index);
  const occupancy = new Float64Array(servers + 1);
  for (let i = 0; i < sorted.length; i++) {
    if (i > 0 && sorted[i].index !== sorted[i - 1].index + 1) throw new Error(`replications of a chunk must be consecutive (got ${sorted[i - 1].index} then ${sorted[i].index})`);
    const o = sorted[i].occupancy;
    for (let k = 0; k <= servers; k++) occupancy[k] += o[k] ?? 0;
  }
  return { firstReplication: sorted[0]?.index ?? 0, records: sorted.map(recordOf), occupancy: Array.from(occupancy) };
}

/**
 * Incremental form of `aggregateReplications` for long chunks: replications arrive in any order,
 * each occupancy vector is added as soon as its predecessors are in (so a chunk of many
 * replications of a large group never holds more than a few vectors) and then released.
 */
export class ChunkFolder {
  private readonly occupancy: Float64Array;
  private readonly records: ReplicationRecord[] = [];
  private next: number;
  private readonly pending = new Map<number, ReplicationStats>();

  constructor(
    private readonly firstReplication: number,
    private readonly count: number,
    servers: number,
  ) {
    this.occupancy = new Float64Array(servers + 1);
    this.next = firstReplication;
  }

  add(stats: ReplicationStats): void {
    if (stats.index < this.firstReplication || stats.index >= this.firstReplication + this.count) throw new Error(`replication ${stats.index} is not in this chunk`);
    this.pending.set(stats.index, stats);
    for (let s = this.pending.get(this.next); s; s = this.pending.get(this.next)) {
      const o = s.occupancy;
      for (let k = 0; k < this.occupancy.length; k++) this.occupancy[k] += o[k] ?? 0;
      this.records.push(recordOf(s));
      this.pending.delete(this.next++);
    }
  }

  get complete(): boolean {
    return this.records.length === this.count;
  }

  result(): PartialAggregate {
    if (!this.complete) throw new Error(`chunk incomplete: ${this.records.length} of ${this.count} replications`);
    return { firstReplication: this.firstReplication, records: this.records.slice(), occupancy: Array.from(this.occupancy) };
  }
}

/** Merges chunk aggregates that follow each other (in chunk order). */
export function mergeAggregates(parts: readonly PartialAggregate[]): PartialAggregate {
  if (parts.length === 0) throw new Error("nothing to merge");
  const sorted = [...parts].sort((a, b) => a.firstReplication - b.firstReplication);
  const occupancy = new Float64Array(sorted[0].occupancy.length);
  const records: ReplicationRecord[] = [];
  let expected = sorted[0].firstReplication;
  for (const part of sorted) {
    if (part.firstReplication !== expected) throw new Error(`chunks are not contiguous: expected replication ${expected}, got ${part.firstReplication}`);
    if (part.occupancy.length !== occupancy.length) throw new Error("chunks disagree on the number of servers");
    for (let k = 0; k < occupancy.length; k++) occupancy[k] += part.occupancy[k];
    for (const r of part.records) records.push(r);
    expected += part.records.length;
  }
  return { firstReplication: sorted[0].firstReplication, records, occupancy: Array.from(occupancy) };
}

/** Sum of fresh calls measured in an aggregate. */
export function aggregateCalls(aggregate: PartialAggregate): number {
  let calls = 0;
  for (const r of aggregate.records) calls += r.calls;
  return calls;
}
