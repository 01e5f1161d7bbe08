// The one-sentence verdict of a run: at the target grade of service, does the formula's sizing still hold under
// the simulated traffic, and by how much does it miss? Pure, so it is unit-tested with hand-made results.
import { erlangB, minServersForBlocking } from "../teletraffic";
import type { Reference } from "../simulation";
import { formatErlangs, formatPercent, formatPoints } from "./format";

/**
 * The workspace default target grade of service: 1 % blocking in the busy hour (common practice for circuit
 * groups, no source). The run page lets the reader change it; the value travels in the page address (?gos=).
 */
export const DEFAULT_TARGET_GOS = 0.01;

export function parseTarget(raw: string | null | undefined): number {
  const v = Number(raw);
  return Number.isFinite(v) && v > 0 && v < 1 ? v : DEFAULT_TARGET_GOS;
}

export interface Estimate {
  estimate: number;
  ciLow: number;
  ciHigh: number;
}

export type VerdictKind = "holds" | "breaks" | "undecided";

export interface Verdict {
  kind: VerdictKind;
  sentence: string;
  /** Simulated minus target, as a probability (positive = misses the target). */
  margin: number;
  /** Erlang B's smallest group for the target at the same mean offered traffic. */
  formulaServers: number | null;
  /** Erlang B's blocking at the simulated group. */
  formulaBlocking: number | null;
  /** The mean offered traffic Erlang B was evaluated at (erlangs). */
  traffic: number | null;
}

/** Erlang B at the same mean load is always the first reference; its traffic follows from carried = A (1 - B). */
export function erlangBTraffic(references: Reference[]): number | null {
  const ref = references[0];
  if (!ref || ref.carriedTraffic === undefined || ref.callCongestion === undefined || ref.callCongestion >= 1) return null;
  return ref.carriedTraffic / (1 - ref.callCongestion);
}

export function verdictFor(input: { servers: number; callCongestion: Estimate; confidence: number; references: Reference[]; target: number }): Verdict {
  const { servers, callCongestion: sim, target, confidence } = input;
  const traffic = erlangBTraffic(input.references);
  let formulaServers: number | null = null;
  let formulaBlocking: number | null = null;
  if (traffic !== null && traffic > 0) {
    try {
      formulaServers = minServersForBlocking({ traffic, target }).servers;
      formulaBlocking = erlangB(servers, traffic);
    } catch {
      formulaServers = null;
    }
  }
  const ci = `${Math.round(confidence * 100)} % interval ${formatPercent(sim.ciLow)} to ${formatPercent(sim.ciHigh)}`;
  const kind: VerdictKind = sim.ciHigh <= target ? "holds" : sim.ciLow > target ? "breaks" : "undecided";
  const margin = sim.estimate - target;
  const formulaSays =
    formulaBlocking === null || traffic === null
      ? `With ${servers} circuits`
      : formulaServers === servers
        ? `Erlang B sizes ${formatErlangs(traffic)} at ${servers} circuits for ${formatPercent(target)} (promising ${formatPercent(formulaBlocking)}); under this traffic`
        : `Erlang B sizes ${formatErlangs(traffic)} at ${formulaServers} circuits for ${formatPercent(target)}; at the ${servers} simulated it promises ${formatPercent(formulaBlocking)}, and under this traffic`;
  const sentence =
    kind === "breaks"
      ? `${formulaSays} the call congestion is ${formatPercent(sim.estimate)} (${ci}): the sizing breaks, missing the ${formatPercent(target)} target by ${formatPoints(margin).replace(/^\+/, "")} (${(sim.estimate / target).toPrecision(2)} × the target).`
      : kind === "holds"
        ? `${formulaSays} the call congestion is ${formatPercent(sim.estimate)} (${ci}): the sizing holds, ${formatPoints(-margin).replace(/^\+/, "")} inside the ${formatPercent(target)} target.`
        : `${formulaSays} the call congestion is ${formatPercent(sim.estimate)} (${ci}): the interval straddles the ${formatPercent(target)} target, so this run cannot tell whether the sizing holds; run more replications.`;
  return { kind, sentence, margin, formulaServers, formulaBlocking, traffic };
}
