// run-finalise: a cancelled run keeps what its finished chunks give, marked partial.
import type { Payload } from "../../lib/jobs/contracts";
import type { WorkerContext } from "../context";
import { finaliseCancelled } from "../runs";

export async function runFinalise(ctx: WorkerContext, { runId }: Payload<"run-finalise">): Promise<void> {
  await finaliseCancelled(ctx, runId);
}
