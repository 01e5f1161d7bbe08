// Issue #10 item 2: analytic evaluations run in worker threads (bundled entries) with a time budget and a
// per-user cap, so an expensive case never holds the event loop that answers everyone else.
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { bundleWorkers } from "@/lib/ops/bundle";
import { closeAnalyticPool, evaluateInPool } from "@/lib/analytic-pool";
import { nonFinitePath } from "@/lib/analytic-pool/worker";

// About 2.9 s of work on one core here: an exact overflow chain of 19 519 states, just inside the interactive
// size limit, so it really runs on a thread until the (shortened) budget stops it.
const expensive = { primaries: [{ traffic: 150, servers: 130 }, { traffic: 100, servers: 0 }], servers: 148 };
const cheap = { servers: 24, target: 0.02 };
let bundleDir: string;

beforeAll(async () => {
  bundleDir = mkdtempSync(path.join(tmpdir(), "spillway-bundles-"));
  expect(await bundleWorkers({ outDir: bundleDir })).toBe(true);
  expect(await bundleWorkers({ outDir: bundleDir })).toBe(false); // unchanged sources: no rebuild
  process.env.SPILLWAY_BUNDLE_DIR = bundleDir;
  process.env.SPILLWAY_ANALYTIC_THREADS = "2";
  // Warm both threads so start-up is not mistaken for a stall.
  await Promise.all([evaluateInPool("erlang-b", cheap, { userId: "warm-1" }), evaluateInPool("erlang-b", cheap, { userId: "warm-2" })]);
});
afterAll(async () => {
  await closeAnalyticPool();
  delete process.env.SPILLWAY_BUNDLE_DIR;
  rmSync(bundleDir, { recursive: true, force: true });
});

/** Largest delay of a 10 ms timer while `work` runs: what any other request on this event loop would wait. */
async function worstTimerLag<T>(work: Promise<T>): Promise<number> {
  let worst = 0;
  let last = performance.now();
  const timer = setInterval(() => {
    const now = performance.now();
    worst = Math.max(worst, now - last - 10);
    last = now;
  }, 10);
  await work.catch(() => {});
  clearInterval(timer);
  return worst;
}

describe("the analytic pool", () => {
  it("answers another user's cheap case promptly while an expensive one runs, then stops the expensive one with 422", async () => {
    // A budget well under the case's time (it needs 1.4–2.9 s of one core here, measured idle and loaded),
    // so the budget, not the case's speed on the day, decides how it ends.
    const slow = evaluateInPool("overflow-loss", expensive, { userId: "engineer", budgetMs: 700 });
    const outcome = slow.then(
      () => "finished",
      (error) => error,
    );
    await new Promise((r) => setTimeout(r, 150)); // the expensive case is now running on a thread
    const started = performance.now();
    const answer = await evaluateInPool("erlang-b", cheap, { userId: "reviewer" });
    // Responsiveness, not speed: an idle event loop answers in a few ms; a held one would take seconds.
    expect(performance.now() - started).toBeLessThan(200);
    expect(answer.traffic).toBeCloseTo(16.63, 2); // 24 circuits at 2 %: common practice, no source
    const lag = await worstTimerLag(slow);
    expect(lag).toBeLessThan(100);
    const error = await outcome;
    expect(error).toMatchObject({ kind: "too-large" });
    expect(error.message).toMatch(/too large for an interactive answer.*background job/);
  });

  it("caps evaluations in flight per user", async () => {
    const first = evaluateInPool("overflow-loss", expensive, { userId: "busy", budgetMs: 1_000 }).catch((e) => e);
    const second = evaluateInPool("overflow-loss", expensive, { userId: "busy", budgetMs: 1_000 }).catch((e) => e);
    await expect(evaluateInPool("erlang-b", cheap, { userId: "busy" })).rejects.toMatchObject({ kind: "busy" });
    await Promise.all([first, second]);
    expect((await evaluateInPool("erlang-b", cheap, { userId: "busy" })).traffic).toBeCloseTo(16.63, 2);
  });

  it("refuses known-too-large inputs at once and turns non-finite results into a 422 kind", async () => {
    const huge = { primaries: [{ traffic: 300, servers: 399 }, { traffic: 300, servers: 0 }], servers: 498 };
    await expect(evaluateInPool("overflow-loss", huge, { userId: "u" })).rejects.toMatchObject({
      kind: "too-large",
      message: expect.stringMatching(/state space .* is 199600, above the interactive limit of 20000/),
    });
    // Finite inputs that overflow inside the method (issue #10 item 6): never a 500.
    await expect(evaluateInPool("finite-queue", { servers: 10, traffic: 1e-200, waitingPositions: 5 }, { userId: "u" })).rejects.toMatchObject({ kind: "no-answer" });
    await expect(evaluateInPool("erlang-b", { servers: 30, traffic: -1 }, { userId: "u" })).rejects.toMatchObject({ kind: "input", field: "traffic" });
  });

  it("answers the issue's extreme but valid inputs with a finite result or a 4xx kind, never a server fault", async () => {
    const cases: [Parameters<typeof evaluateInPool>[0], unknown][] = [
      ["finite-queue", { servers: 10, traffic: 1e-200, waitingPositions: 5 }],
      ["equivalent-random", { mean: 1e-20, variance: 2e-20, servers: 5 }],
      ["hayward", { mean: 1e-310, variance: 1e-309, servers: 3 }],
      ["mmpp-loss", { servers: 10, rates: [5, 1], switching: [[0, 1e-300], [1e-300, 0]] }],
      ["mmpp-loss", { servers: 50, rates: [1e9, 0], switching: [[0, 1e-9], [1e9, 0]] }],
    ];
    for (const [operation, input] of cases) {
      const outcome = await evaluateInPool(operation, input, { userId: "extremes" }).then(
        (result) => ({ result }),
        (error) => ({ kind: (error as { kind?: string }).kind }),
      );
      if ("result" in outcome) expect(nonFinitePath(outcome.result)).toBeNull();
      else expect(["input", "convergence", "no-answer", "too-large"]).toContain(outcome.kind);
    }
  });
});
