// Errors name the flag typed, repeated flags are refused, and law help comes from the law schema
// (review findings 6, 7 and 12 on the analytic command line).
import { spawnSync } from "node:child_process";
import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { z } from "zod";
import { analyticCommands } from "../../../lib/cli/analytic-commands";
import { CliUsageError, type CliOutput } from "../../../lib/cli/command";
import { parseSubmitArgs } from "../../../lib/cli/remote-commands";
import { simulationCommands } from "../../../lib/cli/simulation-commands";
import { analyticOperations } from "../../../lib/teletraffic";
import { batchSizeSchema, lawSchema } from "../../../lib/teletraffic/laws";

const root = path.resolve(__dirname, "../../..");
const tsx = path.join(root, "node_modules", ".bin", "tsx");
const dir = mkdtempSync(path.join(tmpdir(), "spillway-cli-flags-"));

function cli(...args: string[]) {
  const r = spawnSync(tsx, ["lib/cli/main.ts", ...args], { cwd: root, encoding: "utf8" });
  return { status: r.status, stdout: r.stdout, lines: r.stderr.trim().split("\n") };
}

const command = (name: string) => analyticCommands.find((c) => c.name === name)!;
/** The analytic commands answer synchronously. */
const run = (name: string, argv: string[]) => command(name).run(argv) as CliOutput;

/** The problem lines run() reports (it throws one CliUsageError, one line per problem). */
function problems(name: string, argv: string[]): string[] {
  try {
    command(name).run(argv);
  } catch (error) {
    expect(error).toBeInstanceOf(CliUsageError);
    return (error as Error).message.split("\n");
  }
  throw new Error(`${name} ${argv.join(" ")} did not fail`);
}

const kebab = (key: string) => key.replace(/[A-Z]/g, (c) => `-${c.toLowerCase()}`);

function file(name: string, value: unknown): string {
  const p = path.join(dir, name);
  writeFileSync(p, JSON.stringify(value));
  return p;
}

describe("error messages name the flag typed (finding 6)", () => {
  it("erlang-c --mean-holding 0: one stderr line naming --mean-holding in plain words, exit 2", () => {
    const r = cli("erlang-c", "--servers", "10", "--traffic", "8", "--mean-holding", "0");
    expect(r.status).toBe(2);
    expect(r.stdout).toBe("");
    expect(r.lines).toEqual(["erlang-c: --mean-holding: must be greater than 0"]);
  });

  it("a missing flag says required and points to the command's --help", () => {
    const r = cli("erlang-c", "--traffic", "8");
    expect(r.status).toBe(2);
    expect(r.lines).toEqual(['erlang-c: --servers: required; see "npm run -s cli -- erlang-c --help"']);
  });

  it("a fractional count is 'must be a whole number'; two problems give two lines", () => {
    const r = cli("erlang-c", "--servers", "10.5", "--traffic", "8", "--wait-limit", "-1");
    expect(r.status).toBe(2);
    expect(r.lines).toEqual(["erlang-c: --servers: must be a whole number", "erlang-c: --wait-limit: must be at least 0"]);
  });

  it("every command, every numeric camelCase field: the message names --kebab-flag, never the field (follows renames: read from the schema)", () => {
    let checked = 0;
    for (const name of Object.keys(analyticOperations) as Array<keyof typeof analyticOperations>) {
      const json = z.toJSONSchema(analyticOperations[name].input, { io: "input", unrepresentable: "any" }) as {
        properties?: Record<string, { type?: string }>;
      };
      for (const [key, property] of Object.entries(json.properties ?? {})) {
        if (!/[A-Z]/.test(key) || (property.type !== "number" && property.type !== "integer")) continue;
        const lines = problems(name, [`--${kebab(key)}`, "abc"]);
        expect(lines, `${name} ${key}`).toContain(`--${kebab(key)}: must be a number (got "abc")`);
        expect(lines.join("\n"), `${name} ${key}`).not.toMatch(new RegExp(`\\b${key}\\b`));
        checked++;
      }
    }
    expect(checked).toBeGreaterThan(20);
  });

  it("refinement messages and errors raised after the schema use flag names too", () => {
    expect(problems("batch-loss", ["--servers", "3", "--traffic", "2", "--admission", "partial", "--mean-batch-size", "2", "--mean-patience", "1"])).toEqual([
      "--mean-patience: needs --waiting-positions > 0",
    ]);
    // raised by the operation itself (TeletrafficInputError on field "traffic")
    expect(problems("erlang-b", ["--traffic", "0", "--target", "0.01"])).toEqual(["--traffic: must be > 0 to size a group"]);
  });

  it("law fields: the shortcut or the dotted flag as typed, list entries by position, an unknown law by name", () => {
    expect(problems("renewal-loss", ["--servers", "3", "--law", "erlang", "--k", "1.5", "--mean", "1"])).toEqual(["--k: must be an integer"]);
    expect(problems("renewal-loss", ["--servers", "3", "--interarrival.law", "erlang", "--interarrival.k", "1.5", "--interarrival.mean", "1"])).toEqual([
      "--interarrival.k: must be an integer",
    ]);
    expect(problems("renewal-loss", ["--servers", "3", "--law", "hyperexponential", "--probabilities", "0.5,0.5", "--means", "1,x"])).toEqual([
      '--means (entry 2): must be a number (got "x")',
    ]);
    expect(problems("renewal-loss", ["--servers", "3", "--law", "foo"])[0]).toMatch(/^--law: must be one of exponential, .*empirical \(got "foo"\)$/);
    expect(problems("renewal-loss", ["--servers", "3", "--k", "2"])[0]).toMatch(/^--law: required, one of exponential/);
    expect(problems("renewal-loss", ["--servers", "3", "--law", "exponential", "--mean", "1", "--k", "2"])[0]).toMatch(/^--k: not accepted here/);
    expect(problems("batch-loss", ["--servers", "3", "--traffic", "2", "--admission", "partial", "--batch-size.law", "fixed", "--batch-size.value", "0"])).toEqual([
      "--batch-size.value: must be >= 1",
    ]);
  });

  it("a value from --input keeps its JSON field name; a flag overriding it is named as the flag", () => {
    const f = file("bad.json", { servers: 10.5, traffic: 8, meanHolding: 0 });
    expect(problems("erlang-c", ["--input", f])).toEqual([`servers in ${f}: must be a whole number`, `meanHolding in ${f}: must be greater than 0`]);
    expect(problems("erlang-c", ["--input", f, "--servers", "10", "--mean-holding", "-1"])).toEqual(["--mean-holding: must be greater than 0"]);
    const law = file("law.json", { servers: 3, interarrival: { law: "erlang", k: 0, mean: 1 } });
    expect(problems("renewal-loss", ["--input", law])).toEqual([`interarrival.k in ${law}: must be >= 1`]);
    expect(run("renewal-loss", ["--input", law, "--k", "2"]).json).toMatchObject({ law: "erlang", servers: 3 });
  });
});

describe("a flag given twice is an error (finding 7)", () => {
  it("erlang-b --servers 30 --servers 40 exits 2 naming the flag", () => {
    const r = cli("erlang-b", "--servers", "30", "--servers", "40", "--traffic", "20");
    expect(r.status).toBe(2);
    expect(r.stdout).toBe("");
    expect(r.lines).toEqual(["erlang-b: --servers given twice; give each flag once"]);
  });

  it("also with =, with the shortcut beside its dotted flag, and with a JSON object holding the field", () => {
    expect(problems("erlang-b", ["--servers=30", "--traffic", "20", "--servers", "30"])).toEqual(["--servers given twice; give each flag once"]);
    expect(problems("renewal-loss", ["--servers", "3", "--mean", "1", "--interarrival.mean", "2", "--law", "exponential"])).toEqual([
      "--mean and --interarrival.mean both set interarrival.mean; give it once",
    ]);
    expect(problems("renewal-loss", ["--servers", "3", "--mean", "1", "--interarrival", '{"law":"exponential","mean":2}'])).toEqual([
      "--interarrival and --mean both set interarrival.mean; give it once",
    ]);
    expect(() => run("erlang-b", ["--input", file("a.json", { servers: 3 }), "--input", file("b.json", { traffic: 2 })])).toThrow(/^--input given twice/);
  });

  it("a flag overriding a value from --input stays allowed, and the help says so", () => {
    const f = file("base.json", { servers: 30, traffic: 25 });
    expect(run("erlang-b", ["--traffic", "20", "--input", f]).json).toMatchObject({ servers: 30, traffic: 20 });
    expect(run("erlang-b", ["--help"]).table).toMatch(/--input FILE .*a flag given as well overrides the file's value/);
  });

  it("simulate, plan and submit refuse a repeated flag too", async () => {
    const simulate = simulationCommands.find((c) => c.name === "simulate")!;
    const plan = simulationCommands.find((c) => c.name === "plan")!;
    await expect(Promise.resolve().then(() => simulate.run(["s.json", "--threads", "2", "--threads", "4"]))).rejects.toThrow("--threads given twice");
    await expect(Promise.resolve().then(() => plan.run(["s.json", "--precision", "0.1", "--precision", "0.05"]))).rejects.toThrow("--precision given twice");
    expect(() => parseSubmitArgs(["s.json", "--server", "http://a", "--server", "http://b", "--workspace", "w"], { SPILLWAY_TOKEN: "t" })).toThrow(
      "--server given twice",
    );
  });
});

describe("law help is written from the law schema (finding 12)", () => {
  const lawFields = (schema: typeof lawSchema | typeof batchSizeSchema) =>
    schema.options.map((option) => {
      const shape = (option as unknown as { shape: Record<string, unknown> }).shape;
      const name = (shape.law as { value: string }).value;
      return { name, fields: Object.keys(shape).filter((key) => key !== "law") };
    });

  it.each(["renewal-loss", "renewal-queue", "renewal-retrial"])("%s --help lists every interarrival law with its fields", (name) => {
    const lines = run(name, ["--help"]).table.split("\n");
    for (const { name: law, fields } of lawFields(lawSchema)) {
      const row = lines.find((line) => line.trim().startsWith(`--law ${law} `));
      expect(row, `${name}: --law ${law}`).toBeDefined();
      for (const field of fields) expect(row, `${name}: ${law}.${field}`).toMatch(new RegExp(`--${kebab(field)} \\(`));
    }
    expect(lines.find((line) => line.trim().startsWith("--law erlang"))).toContain("--k (whole number 1 to 100000)");
  });

  it("every law field listed in the help is accepted as a flag (the shortcuts come from the same schema)", () => {
    const out = run("renewal-queue", ["--servers", "2", "--waiting-positions", "2", "--law", "weibull", "--shape", "2", "--scale", "1.5"]);
    // Weibull shape 2, scale 1.5: mean interarrival 1.5 Γ(1.5) = 1.5 √π / 2, mean holding 1
    expect(out.json.offeredTraffic).toBeCloseTo(1 / ((1.5 * Math.sqrt(Math.PI)) / 2), 12);
    const pareto = run("renewal-loss", ["--servers", "3", "--law", "pareto", "--mean", "0.5", "--shape", "2.5"]);
    expect(pareto.json.law).toBe("pareto");
  });

  it("batch-loss --help lists every batch-size law with its dotted flags", () => {
    const lines = run("batch-loss", ["--help"]).table.split("\n");
    for (const { name: law, fields } of lawFields(batchSizeSchema)) {
      const row = lines.find((line) => line.trim().startsWith(`--batch-size.law ${law} `));
      expect(row, law).toBeDefined();
      for (const field of fields) expect(row, `${law}.${field}`).toContain(`--batch-size.${kebab(field)} (`);
    }
  });
});
