import { readFileSync } from "node:fs";
import { CliUsageError, formatNumber, type CliCommand } from "./command";
import { parseScenario, runScenario, ScenarioError, type SimulationResult } from "../simulation/node";

/** Reads and validates a scenario file; every failure is an input error with one line. */
export function readScenarioFile(file: string) {
  let text: string;
  try {
    text = readFileSync(file, "utf8");
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    throw new ScenarioError(`cannot read ${file}: ${code === "ENOENT" ? "no such file" : code === "EISDIR" ? "is a directory" : ((error as Error).message ?? code)}`);
  }
  let json: unknown;
  try {
    json = JSON.parse(text);
  } catch (error) {
    throw new ScenarioError(`${file}: invalid JSON${jsonErrorLocation(text, (error as Error).message)}`);
  }
  try {
    return parseScenario(json);
  } catch (error) {
    if (error instanceof ScenarioError) throw new ScenarioError(`${file}: ${error.message}`, error.path);
    throw error;
  }
}

/** "at line L, column C: <reason>" from V8's "... in JSON at position P" message. */
export function jsonErrorLocation(text: string, message: string): string {
  const reason = message.replace(/\s*in JSON at position \d+.*$/s, "").replace(/\s+/g, " ");
  const match = /position (\d+)/.exec(message);
  let where = "";
  if (match) {
    const position = Number(match[1]);
    const before = text.slice(0, position);
    const line = before.split("\n").length;
    const column = position - before.lastIndexOf("\n");
    where = ` at line ${line}, column ${column}`;
  } else if (/end of JSON input/i.test(message)) {
    where = ` at line ${text.split("\n").length} (unexpected end)`;
  }
  return `${where}: ${reason}`;
}

function parseThreads(argv: string[]): { file: string; threads: number } {
  let file: string | undefined;
  let threads = 1;
  for (let i = 0; i < argv.length; i++) {
    const arg = argv[i];
    if (arg === "--threads") {
      const value = argv[++i];
      if (value === undefined || !/^\d+$/.test(value) || Number(value) < 1 || Number(value) > 64) throw new CliUsageError("--threads: must be an integer from 1 to 64");
      threads = Number(value);
    } else if (arg.startsWith("--")) throw new CliUsageError(`unknown flag ${arg}; usage: simulate <scenario.json> [--threads N] [--json]`);
    else if (file === undefined) file = arg;
    else throw new CliUsageError(`unexpected argument "${arg}"; usage: simulate <scenario.json> [--threads N] [--json]`);
  }
  if (!file) throw new CliUsageError("missing scenario file; usage: simulate <scenario.json> [--threads N] [--json]");
  return { file, threads };
}

const MEASURES: Array<[keyof SimulationResult, string]> = [
  ["callCongestion", "call congestion"],
  ["timeCongestion", "time congestion"],
  ["carriedTraffic", "carried traffic (E)"],
  ["firstAttemptBlocking", "first-attempt blocking"],
  ["attemptCongestion", "attempt congestion"],
  ["lossProbability", "loss probability"],
  ["attemptsPerCall", "attempts per call"],
  ["meanRetrying", "mean calls retrying"],
  ["waitingProbability", "probability of waiting"],
  ["meanWait", "mean wait"],
  ["meanWaiting", "mean number waiting"],
  ["abandonmentProbability", "abandonment probability"],
];

const REFERENCE_FIELD: Partial<Record<keyof SimulationResult, string>> = {
  callCongestion: "callCongestion",
  timeCongestion: "timeCongestion",
  carriedTraffic: "carriedTraffic",
  attemptCongestion: "attemptCongestion",
  lossProbability: "lossProbability",
  waitingProbability: "waitingProbability",
  meanWait: "meanWait",
  meanWaiting: "meanWaiting",
};

function fmt(value: number | undefined): string {
  return value === undefined ? "" : formatNumber(Number(value.toPrecision(6)));
}

/** Estimates with their intervals, one column per analytic reference. */
export function simulationTable(result: SimulationResult): string {
  const refs = result.references;
  const pct = `${Math.round(result.confidence * 1000) / 10}% CI`;
  const header = ["measure", "estimate", pct, ...refs.map((r, i) => `[${i + 1}]${r.exact ? "*" : ""}`)];
  const rows: string[][] = [header];
  for (const [key, label] of MEASURES) {
    const m = result[key] as { estimate: number; ciLow: number; ciHigh: number } | undefined;
    if (!m) continue;
    const field = REFERENCE_FIELD[key];
    rows.push([
      label,
      fmt(m.estimate),
      `${fmt(m.ciLow)} .. ${fmt(m.ciHigh)}`,
      ...refs.map((r) => (field ? fmt((r as Record<string, unknown>)[field] as number | undefined) : "")),
    ]);
  }
  const widths = header.map((_, c) => Math.max(...rows.map((r) => r[c].length)));
  const lines = rows.map((r) => r.map((cell, c) => (c === 0 ? cell.padEnd(widths[c]) : cell.padStart(widths[c]))).join("  "));
  lines.splice(1, 0, widths.map((w) => "-".repeat(w)).join("  "));
  return [
    `Simulation: ${result.replications} replications, ${result.calls} calls, ${result.events} events, seed ${result.seed}, offered ${fmt(result.offeredTraffic)} E`,
    `Warm-up per replication: ${fmt(result.warmupCalls.mean)} calls (${result.warmupCalls.min} .. ${result.warmupCalls.max}), ${fmt(result.warmupTime.mean)} time units`,
    "",
    ...lines,
    "",
    ...(result.warnings.length ? ["Warnings:", ...result.warnings.map((w) => `  ! ${w.measure ? `${w.measure}: ` : ""}${w.message}`), ""] : []),
    "References (* = every assumption met, the interval should cover it):",
    ...refs.map((r, i) => `  [${i + 1}] ${r.method}${r.exact ? " (exact)" : ""}: ${r.unavailable ? `unavailable: ${r.unavailable}` : r.assumptions}`),
  ].join("\n");
}

export const simulationCommands: CliCommand[] = [
  {
    name: "simulate",
    summary: "simulate <scenario.json> [--threads N]: replications with confidence intervals beside analytic references",
    async run(argv) {
      const { file, threads } = parseThreads(argv);
      const scenario = readScenarioFile(file);
      const result = await runScenario(scenario, { threads });
      return { json: result as unknown as Record<string, unknown>, table: simulationTable(result) };
    },
  },
];
