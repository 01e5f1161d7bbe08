import { describe, expect, it } from "vitest";
import { spawnSync } from "node:child_process";
import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { analyticOperations } from "../../../lib/teletraffic";
import { analyticCommands } from "../../../lib/cli/analytic-commands";
import { erlangB, maxTrafficForBlocking } from "../../../lib/teletraffic";

const root = path.resolve(__dirname, "../../..");
const tsx = path.join(root, "node_modules", ".bin", "tsx");

function cli(...args: string[]) {
  const r = spawnSync(tsx, ["lib/cli/main.ts", ...args], { cwd: root, encoding: "utf8" });
  return { status: r.status, stdout: r.stdout, stderr: r.stderr };
}

describe("CLI (spawned: tsx lib/cli/main.ts)", () => {
  it("erlang-b --servers 30 --traffic 20 --json prints one JSON object with the blocking (Erlang B)", () => {
    const r = cli("erlang-b", "--servers", "30", "--traffic", "20", "--json");
    expect(r.status).toBe(0);
    expect(r.stdout.trim().split("\n")).toHaveLength(1);
    expect(JSON.parse(r.stdout).blocking).toBe(erlangB(30, 20));
  });
  it("erlang-b --servers 24 --target 0.02 --json gives the largest traffic", () => {
    const r = cli("erlang-b", "--servers", "24", "--target", "0.02", "--json");
    expect(r.status).toBe(0);
    expect(JSON.parse(r.stdout).traffic).toBe(maxTrafficForBlocking({ servers: 24, target: 0.02 }).traffic);
  });
  it("erlang-b --traffic 20 --target 0.01 --json gives the smallest integer group (30: common practice, no source)", () => {
    const r = cli("erlang-b", "--traffic", "20", "--target", "0.01", "--json");
    expect(r.status).toBe(0);
    expect(JSON.parse(r.stdout).servers).toBe(30);
  });
  it("fractional servers evaluate the continuation; without --json a table is printed", () => {
    const r = cli("erlang-b", "--servers", "29.6", "--traffic", "20");
    expect(r.status).toBe(0);
    expect(r.stdout).toContain("blocking");
    expect(r.stdout).not.toContain("{");
  });
  it("bad input exits 2 with a single stderr line naming the field", () => {
    const r = cli("erlang-b", "--servers", "-3", "--traffic", "20");
    expect(r.status).toBe(2);
    expect(r.stdout).toBe("");
    const lines = r.stderr.trim().split("\n");
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatch(/servers/);
  });
  it("a misspelt optional flag exits 2 instead of being dropped for the default (--mean-holdng)", () => {
    const r = cli("engset", "--sources", "10", "--servers", "3", "--idle-rate", "0.1", "--mean-holdng", "3", "--json");
    expect(r.status).toBe(2);
    expect(r.stdout).toBe("");
    expect(r.stderr).toMatch(/--mean-holdng/);
    // the nested renewal-loss shortcuts (--law, --k, --mean) are still accepted
    const ok = cli("renewal-loss", "--servers", "3", "--law", "erlang", "--k", "2", "--mean", "0.5", "--json");
    expect(ok.status).toBe(0);
  });
  it("a flag without a value exits 2", () => {
    const r = cli("mmpp-loss", "--servers");
    expect(r.status).toBe(2);
    expect(r.stderr.trim().split("\n")).toHaveLength(1);
  });
});

describe("CLI flag mapping (run() called directly)", () => {
  const command = (name: string) => analyticCommands.find((c) => c.name === name)!;
  it("has one command per operation", () => {
    expect(analyticCommands.map((c) => c.name)).toContain("overflow-loss");
    expect(analyticCommands).toHaveLength(Object.keys(analyticOperations).length);
  });
  it("kebab flags, lists, JSON matrices and law flags map onto the schema", async () => {
    const mmpp = await command("mmpp-loss").run(["--servers", "10", "--rates", "16,0", "--switching", "[[0,1],[1,0]]", "--mean-holding", "1"]);
    expect(mmpp.json.phases).toBe(2);
    const one = await command("mmpp-loss").run(["--servers", "10", "--rates", "8", "--switching", "[[0]]"]);
    expect(one.json.timeCongestion).toBe(one.json.callCongestion);
    const renewal = await command("renewal-loss").run(["--servers", "10", "--law", "erlang", "--k", "2", "--mean", "0.125"]);
    expect(renewal.json.law).toBe("erlang");
    const h2 = await command("renewal-loss").run(["--servers", "10", "--interarrival.law", "hyperexponential", "--interarrival.probabilities", "0.4,0.6", "--interarrival.means", "0.2,0.075"]);
    expect(h2.json.callCongestion).toBeGreaterThan(0);
  });
  it("--input file.json supplies the input object, later flags override it", async () => {
    const dir = mkdtempSync(path.join(tmpdir(), "spillway-cli-"));
    const file = path.join(dir, "input.json");
    writeFileSync(file, JSON.stringify({ servers: 30, traffic: 25 }));
    const r = await command("erlang-b").run(["--input", file, "--traffic", "20"]);
    expect(r.json.blocking).toBe(erlangB(30, 20));
  });
  it("invalid values throw input errors from run()", () => {
    expect(() => command("batch-loss").run(["--servers", "10", "--traffic", "5", "--mean-batch-size", "2", "--admission", "most"])).toThrow(/admission/);
    expect(() => command("engset").run(["--sources", "x"])).toThrow();
  });
});
