import "server-only";
// Analytic evaluations in a pool of worker threads, so no request holds the web server's event loop: each has a
// time budget, each user a cap on evaluations in flight, and known-too-large inputs are refused up front.
import path from "node:path";
import { Piscina } from "piscina";
import { analyticPoolConfig, bundleDir } from "@/lib/config";
import type { AnalyticOperationName } from "@/lib/teletraffic/operations";
import type { EvaluationOutcome, EvaluationTask, PoolOperation } from "./worker";
import { exceedsInteractiveLimit } from "./limits";

/** A refusal or failure with a `kind` the API maps to its status (lib/api/respond.ts). */
export class AnalyticPoolError extends Error {
  constructor(
    readonly kind: "too-large" | "busy" | "input" | "convergence" | "no-answer",
    message: string,
    readonly field?: string,
  ) {
    super(message);
  }
}

const tooLarge = (detail: string) =>
  new AnalyticPoolError(
    "too-large",
    `This case is too large for an interactive answer (${detail}). Submit it as a background job (POST /api/v1/workspaces/{workspace}/runs), which has no time limit, or reduce its size.`,
  );

function workerFile(): { filename: string; execArgv: string[] } {
  const dir = bundleDir();
  if (dir) return { filename: path.join(dir, "analytic-worker.js"), execArgv: [] };
  // Development and unit tests without a bundle: load the TypeScript entry through tsx.
  return { filename: path.join(process.cwd(), "lib/analytic-pool/worker.ts"), execArgv: ["--import", "tsx"] };
}

const globalForPool = globalThis as unknown as { spillwayAnalyticPool?: Piscina };

function pool(): Piscina {
  if (!globalForPool.spillwayAnalyticPool) {
    const threads = analyticPoolConfig.threads();
    const { filename, execArgv } = workerFile();
    globalForPool.spillwayAnalyticPool = new Piscina({
      filename,
      execArgv,
      minThreads: threads,
      maxThreads: threads,
      // A short queue: beyond it the server is saturated and says so instead of piling up work.
      maxQueue: threads * 8,
      idleTimeout: 60_000,
    });
  }
  return globalForPool.spillwayAnalyticPool;
}

const inFlight = new Map<string, number>();

/**
 * Evaluates an analytic operation in the pool for a user. Throws AnalyticPoolError: "too-large" (size limit or
 * time budget, 422), "busy" (the user's cap or a full queue, 429), or the method's own input/convergence/no-answer.
 */
export async function evaluateInPool(operation: PoolOperation, input: unknown, options: { userId: string; budgetMs?: number }): Promise<Record<string, unknown>> {
  const over = exceedsInteractiveLimit(operation as AnalyticOperationName, input);
  if (over) throw tooLarge(`${over.measure} is ${over.size}, above the interactive limit of ${over.max}`);
  const perUser = analyticPoolConfig.perUser();
  const running = inFlight.get(options.userId) ?? 0;
  if (running >= perUser) {
    throw new AnalyticPoolError("busy", `You already have ${running} evaluations running (the limit is ${perUser}); wait for one to finish.`);
  }
  inFlight.set(options.userId, running + 1);
  const budgetMs = options.budgetMs ?? analyticPoolConfig.budgetMs();
  try {
    const task: EvaluationTask = { operation, input };
    // Aborting a running task terminates its thread, so an over-budget case stops using the core at once.
    const outcome: EvaluationOutcome = await pool().run(task, { signal: AbortSignal.timeout(budgetMs) });
    if (outcome.ok) return outcome.result;
    throw new AnalyticPoolError(outcome.kind as AnalyticPoolError["kind"], outcome.message, outcome.field);
  } catch (error) {
    if (error instanceof AnalyticPoolError) throw error;
    const name = (error as Error).name;
    if (name === "AbortError" || name === "TimeoutError") throw tooLarge(`it did not finish within ${budgetMs / 1000} s`);
    if (/queue is at limit/i.test((error as Error).message)) throw new AnalyticPoolError("busy", "The server is evaluating as many cases as it can; try again in a moment.");
    throw error;
  } finally {
    const left = (inFlight.get(options.userId) ?? 1) - 1;
    if (left > 0) inFlight.set(options.userId, left);
    else inFlight.delete(options.userId);
  }
}

/** Stops the pool's threads (tests and shutdown). */
export async function closeAnalyticPool(): Promise<void> {
  const current = globalForPool.spillwayAnalyticPool;
  globalForPool.spillwayAnalyticPool = undefined;
  await current?.destroy();
}
