// What the replication threads load (issue #11, worker pool start-up): the bundled thread entry must
// not pull in zod or the scenario schema, whose loading was most of a thread's start-up time.
import { mkdtempSync, readFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { bundleWorkers, workerEntries } from "../../../lib/ops/bundle";

describe("replication-worker bundle", () => {
  it("includes the engine but neither zod nor the schema modules", async () => {
    const outDir = mkdtempSync(path.join(os.tmpdir(), "spillway-bundle-"));
    const entry = workerEntries.find((e) => e.name === "replication-worker")!;
    await bundleWorkers({ outDir, entries: [entry] });
    const inputs = Object.keys((JSON.parse(readFileSync(path.join(outDir, "manifest.json"), "utf8")) as { inputs: Record<string, string> }).inputs);
    expect(inputs).toContain("lib/simulation/engine.ts");
    expect(inputs).toContain("lib/simulation/fast-loop.ts");
    expect(inputs.filter((file) => file.startsWith("node_modules/zod/"))).toEqual([]);
    for (const schemaModule of ["lib/simulation/scenario.ts", "lib/teletraffic/laws.ts", "lib/teletraffic/index.ts"]) expect(inputs).not.toContain(schemaModule);
  });
});
