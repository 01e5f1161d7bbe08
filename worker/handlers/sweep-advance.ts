// sweep-advance: a point run ended; count it, plan the next probe, or finish the sweep.
import type { Payload } from "../../lib/jobs/contracts";
import { withSweepLocked } from "../../db/queries/sweep-work";
import type { WorkerContext } from "../context";
import { advanceSweep } from "../sweeps";

export async function sweepAdvance(ctx: WorkerContext, { sweepId }: Payload<"sweep-advance">): Promise<void> {
  await withSweepLocked(ctx.db, ctx.boss, sweepId, async (tx, sweep, send) => {
    if (sweep) await advanceSweep(tx, sweep, send);
  });
}
