// The `simulate` command end to end, through the real CLI entry (tsx lib/cli/main.ts).
import { spawnSync } from "node:child_process";
import { mkdtempSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { simulationResultSchema } from "../../../lib/simulation";

const root = path.join(__dirname, "../../..");
const tsx = path.join(root, "node_modules/.bin/tsx");
const dir = mkdtempSync(path.join(os.tmpdir(), "spillway-sim-"));

function cli(...args: string[]) {
  const r = spawnSync(tsx, ["lib/cli/main.ts", "simulate", ...args], { cwd: root, encoding: "utf8" });
  return { status: r.status, stdout: r.stdout, stderr: r.stderr };
}

function file(name: string, text: string): string {
  const p = path.join(dir, name);
  writeFileSync(p, text);
  return p;
}

const small = {
  servers: 5,
  arrivals: { process: "poisson", rate: 4 },
  holding: { law: "exponential", mean: 1 },
  run: { seed: 3, replications: 4, callsPerReplication: 5000 },
};

describe("simulate CLI", () => {
  it("--json prints exactly one JSON object matching simulationResultSchema", () => {
    const r = cli(file("ok.json", JSON.stringify(small)), "--json");
    expect(r.status).toBe(0);
    expect(r.stdout.trim().split("\n")).toHaveLength(1);
    const parsed = simulationResultSchema.parse(JSON.parse(r.stdout));
    expect(parsed.replications).toBe(4);
    expect(parsed.references[0].method).toBe("Erlang B");
  });

  it("--threads 2 gives the same JSON as one thread; without --json it prints the table", () => {
    const p = file("ok2.json", JSON.stringify(small));
    expect(cli(p, "--json", "--threads", "2").stdout).toBe(cli(p, "--json").stdout);
    const table = cli(p).stdout;
    expect(table).toContain("call congestion");
    expect(table).toContain("95% CI");
    expect(table).toContain("[1] Erlang B (exact)");
  });

  it("without --json, a time-varying run also prints its per-segment table (formatter: segment-table.test.ts)", () => {
    const varying = { ...small, arrivals: { process: "time-varying", profile: [{ duration: 2, rate: 2 }, { duration: 1, rate: 7 }] }, run: { seed: 3, replications: 4, callsPerReplication: 1000 } };
    const r = cli(file("varying.json", JSON.stringify(varying)));
    expect(r.status).toBe(0);
    const lines = r.stdout.split("\n");
    const header = lines.findIndex((l) => l.startsWith("time in cycle"));
    expect(lines[header - 1]).toMatch(/^Per profile segment/);
    expect(lines[header]).toMatch(/offered \(E\)\s+calls\s+call congestion\s+95% CI\s+time congestion\s+exact\s+PSA\s+MOL$/);
    expect(lines[header + 2]).toMatch(/^0 \.\. 2 /);
    expect(lines[header + 3]).toMatch(/^2 \.\. 3 /);
    expect(lines[header + 4]).toBe("");
  });

  const bad: Array<[string, () => string, RegExp]> = [
    ["a missing file", () => path.join(dir, "nope.json"), /^simulate: cannot read .*nope\.json: no such file$/],
    ["invalid JSON, with the line", () => file("broken.json", '{\n  "servers": 5,\n  "arrivals": { "process": "poisson" "rate": 4 }\n}'), /broken\.json: invalid JSON at line 3, column \d+/],
    ["an invalid field", () => file("field.json", JSON.stringify({ ...small, arrivals: { process: "poisson", rate: -4 } })), /field\.json: arrivals\.rate: must be > 0$/],
    ["a bad flag value", () => file("flag.json", JSON.stringify(small)) + "\u0000--threads\u0000zero", /--threads: must be an integer from 1 to 64/],
  ];
  for (const [name, make, pattern] of bad) {
    it(`exits 2 with one line on stderr for ${name}`, () => {
      const r = cli(...make().split("\u0000"));
      expect(r.status).toBe(2);
      expect(r.stdout).toBe("");
      const lines = r.stderr.trim().split("\n");
      expect(lines).toHaveLength(1);
      expect(lines[0]).toMatch(pattern);
    });
  }
});
