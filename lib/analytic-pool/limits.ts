// Interactive size limits: inputs whose evaluation cannot finish within the per-request budget are refused up
// front with the same 422 the budget gives, instead of occupying a thread until they are stopped. The time
// budget stays the real guard; a limit is listed only where a size measure predicts the cost.
//
// Measured with the bundled worker on this 2-core machine (December 2026): the exact overflow chain took
// 0.09 s at 6 161 states, 2.1 s at 19 481 and 8.4 s at 40 401, and about 98 s (not converging) at 80 000.
// The closed forms (Erlang B/C, extended Erlang B, Engset and its inverse, Kaufman–Roberts, finite queue)
// answer at the schemas' largest sizes within 0.5 s, so they have no limit here.
import type { z } from "zod";
import { INTERACTIVE_PERIODIC_QUEUE_WORK, INTERACTIVE_PERIODIC_WORK, INTERACTIVE_TIME_VARYING_WORK, periodicLossInputSchema, periodicLossWork, periodicQueueInputSchema, periodicQueueWork, timeVaryingInputSchema, timeVaryingWork } from "../teletraffic";
import { TIME_VARYING_WORK_MEASURE } from "../teletraffic/time-varying";
import type { AnalyticOperationName } from "../teletraffic/operations";

interface Limit {
  /** What is measured, as the refusal names it. */
  measure: string;
  /** The size of this input, or null when the input is malformed (the schema then answers). */
  size(input: Record<string, unknown>): number | null;
  max: number;
}

const overflowStates = (input: Record<string, unknown>): number | null => {
  const { primaries, servers } = input;
  if (!Array.isArray(primaries) || typeof servers !== "number") return null;
  let product = servers + 1;
  for (const group of primaries) {
    const n = (group as { servers?: unknown })?.servers;
    if (typeof n !== "number") return null;
    product *= n + 1;
  }
  return product;
};

/**
 * The time-varying methods estimate their own work from the profile in O(segments); their interactive
 * limits are set at about 0.1 s (see lib/teletraffic), so 20 × that is about 2 s, inside the 3 s budget.
 * The schema's parse is the malformed-input test (null: the schema answers with its own message).
 */
const BUDGET_MULTIPLE = 20;
const workOf =
  <S extends z.ZodType>(schema: S, work: (v: z.output<S>) => number) =>
  (input: Record<string, unknown>): number | null => {
    const v = schema.safeParse(input);
    return v.success ? work(v.data) : null;
  };

export const interactiveLimits: Partial<Record<AnalyticOperationName, Limit>> = {
  "overflow-loss": { measure: "the state space Π(n_i + 1) × (N + 1)", size: overflowStates, max: 20_000 },
  "periodic-loss": {
    measure: "the estimated work (N + 1) × uniformisation terms × cycles",
    size: workOf(periodicLossInputSchema, (v) => periodicLossWork(v.servers, v.profile, v.meanHolding, v.tolerance)),
    max: BUDGET_MULTIPLE * INTERACTIVE_PERIODIC_WORK,
  },
  "periodic-queue": {
    measure: "the estimated work (N + Q + 51) × uniformisation terms × cycles",
    size: workOf(periodicQueueInputSchema, (v) => periodicQueueWork(v.servers, v.waitingPositions, v.profile, v.meanHolding, v.meanPatience, v.tolerance)),
    max: BUDGET_MULTIPLE * INTERACTIVE_PERIODIC_QUEUE_WORK,
  },
  "time-varying-loss": {
    measure: TIME_VARYING_WORK_MEASURE,
    size: workOf(timeVaryingInputSchema, (v) => timeVaryingWork(v.servers, v.profile, v.meanHolding)),
    max: BUDGET_MULTIPLE * INTERACTIVE_TIME_VARYING_WORK,
  },
};

/** The limit this input exceeds, with its size, or null. */
export function exceedsInteractiveLimit(operation: AnalyticOperationName, input: unknown): { measure: string; size: number; max: number } | null {
  const limit = interactiveLimits[operation];
  if (!limit || !input || typeof input !== "object") return null;
  const size = limit.size(input as Record<string, unknown>);
  return size !== null && size > limit.max ? { measure: limit.measure, size, max: limit.max } : null;
}
