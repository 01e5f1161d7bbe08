import { readFileSync } from "node:fs";
import { CliUsageError, formatNumber, type CliCommand } from "./command";
import { parseScenario, runScenario, ScenarioError, type SimulationResult } from "../simulation/node";
import { planRunLength, type RunLengthPlan } from "../simulation/run-length";

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
  let threads: number | undefined;
  for (let i = 0; i < argv.length; i++) {
    const arg = argv[i];
    if (arg === "--threads") {
      if (threads !== undefined) throw new CliUsageError("--threads given twice; give each flag once");
      const value = argv[++i];
      if (value === undefined || !/^\d+$/.test(value) || Number(value) < 1 || Number(value) > 64) throw new CliUsageError("--threads: must be an integer from 1 to 64");
      threads = Number(value);
    } else if (arg.startsWith("--")) throw new CliUsageError(`unknown flag ${arg}; usage: simulate <scenario.json> [--threads N] [--json]`);
    else if (file === undefined) file = arg;
    else throw new CliUsageError(`unexpected argument "${arg}"; usage: simulate <scenario.json> [--threads N] [--json]`);
  }
  if (!file) throw new CliUsageError("missing scenario file; usage: simulate <scenario.json> [--threads N] [--json]");
  return { file, threads: threads ?? 1 };
}

const MEASURES: Array<[keyof SimulationResult, string]> = [
  ["callCongestion", "call congestion"],
  ["callCongestionDirect", "  direct count"],
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
  callCongestionDirect: "callCongestion",
  timeCongestion: "timeCongestion",
  carriedTraffic: "carriedTraffic",
  attemptCongestion: "attemptCongestion",
  lossProbability: "lossProbability",
  waitingProbability: "waitingProbability",
  meanWait: "meanWait",
  meanWaiting: "meanWaiting",
  firstAttemptBlocking: "callCongestion",
  attemptsPerCall: "attemptsPerCall",
  meanRetrying: "meanRetrying",
  abandonmentProbability: "abandonmentProbability",
};

function fmt(value: number | undefined): string {
  return value === undefined ? "" : formatNumber(Number(value.toPrecision(6)));
}

type CliInterval = { estimate: number; ciLow: number; ciHigh: number; upperBoundOnly?: boolean };

const ciText = (m: CliInterval) => (m.upperBoundOnly ? `< ${fmt(m.ciHigh)} (one-sided)` : `${fmt(m.ciLow)} .. ${fmt(m.ciHigh)}`);

/** Rows of cells as aligned text under a dashed rule: the first column left-aligned, the rest right-aligned. */
function alignColumns(rows: string[][]): string[] {
  const widths = rows[0].map((_, c) => Math.max(...rows.map((r) => r[c].length)));
  const lines = rows.map((r) => r.map((cell, c) => (c === 0 ? cell.padEnd(widths[c]) : cell.padStart(widths[c]))).join("  "));
  lines.splice(1, 0, widths.map((w) => "-".repeat(w)).join("  "));
  return lines;
}

const SEGMENT_REFERENCES: Array<["exact" | "psa" | "mol", string]> = [
  ["exact", "exact"],
  ["psa", "PSA"],
  ["mol", "MOL"],
];

/**
 * A time-varying run per profile segment: call congestion with its interval, time congestion, loss where retrials
 * or waiting give one, and the per-segment references (exact periodic solution, PSA, MOL) where computed.
 */
export function segmentTable(result: SimulationResult): string[] {
  const segments = result.segments;
  if (!segments?.length) return [];
  const pct = `${Math.round(result.confidence * 1000) / 10}% CI`;
  const refs = SEGMENT_REFERENCES.filter(([key]) => segments.some((g) => g[key] !== undefined));
  const loss = segments.some((g) => g.lossProbability);
  const rows: string[][] = [["time in cycle", "offered (E)", "calls", "call congestion", pct, "time congestion", ...(loss ? ["loss", `loss ${pct}`] : []), ...refs.map(([, label]) => label)]];
  for (const g of segments) {
    const cc = g.callCongestion;
    rows.push([
      `${fmt(g.start)} .. ${fmt(g.end)}`,
      fmt(g.offeredTraffic),
      String(g.calls),
      cc ? fmt(cc.estimate) : "-",
      cc ? ciText(cc) : "no calls",
      fmt(g.timeCongestion.estimate),
      ...(loss ? [g.lossProbability ? fmt(g.lossProbability.estimate) : "-", g.lossProbability ? ciText(g.lossProbability) : ""] : []),
      ...refs.map(([key]) => fmt(g[key])),
    ]);
  }
  return ["", "Per profile segment (call congestion = refused first attempts / calls offered in the segment):", ...alignColumns(rows)];
}

/** Estimates with their intervals, one column per analytic reference. */
export function simulationTable(result: SimulationResult): string {
  const refs = result.references;
  const pct = `${Math.round(result.confidence * 1000) / 10}% CI`;
  const header = ["measure", "estimate", pct, ...refs.map((r, i) => `[${i + 1}]${r.exact ? "*" : ""}`)];
  const rows: string[][] = [header];
  for (const [key, label] of MEASURES) {
    const m = result[key] as CliInterval | undefined;
    if (!m) continue;
    const field = REFERENCE_FIELD[key];
    rows.push([
      label,
      fmt(m.estimate),
      ciText(m),
      ...refs.map((r) => (field ? fmt((r as Record<string, unknown>)[field] as number | undefined) : "")),
    ]);
  }
  const lines = alignColumns(rows);
  return [
    `Simulation: ${result.replications} replications, ${result.calls} calls, ${result.events} events, seed ${result.seed}, offered ${fmt(result.offeredTraffic)} E`,
    `Warm-up per replication: ${fmt(result.warmupCalls.mean)} calls (${result.warmupCalls.min} .. ${result.warmupCalls.max}), ${fmt(result.warmupTime.mean)} time units`,
    "",
    ...lines,
    ...(result.callCongestion.method ? [`Call congestion by ${result.callCongestion.method}.`] : []),
    ...segmentTable(result),
    "",
    ...(result.warnings.length ? ["Warnings:", ...result.warnings.map((w) => `  ! ${w.measure ? `${w.measure}: ` : ""}${w.message}`), ""] : []),
    "References (* = every assumption met, the interval should cover it):",
    ...refs.map((r, i) => `  [${i + 1}] ${r.method}${r.exact ? " (exact)" : ""}: ${r.unavailable ? `unavailable: ${r.unavailable}` : r.assumptions}`),
  ].join("\n");
}

const PLAN_USAGE = "usage: plan <scenario.json> [--precision R] [--threads N] [--json]";

function parsePlanArgs(argv: string[]): { file: string; precision?: number; threads: number } {
  let precision: number | undefined;
  const rest: string[] = [];
  for (let i = 0; i < argv.length; i++) {
    if (argv[i] === "--precision") {
      if (precision !== undefined) throw new CliUsageError("--precision given twice; give each flag once");
      const value = Number(argv[++i]);
      if (!(value > 0 && value < 1)) throw new CliUsageError("--precision: must be a number between 0 and 1 (relative half-width, e.g. 0.05)");
      precision = value;
    } else rest.push(argv[i]);
  }
  try {
    return { ...parseThreads(rest), precision };
  } catch (error) {
    if (error instanceof CliUsageError) throw new CliUsageError(error.message.replace(/usage: .*$/, PLAN_USAGE));
    throw error;
  }
}

/** "about N calls, about T s" with the method behind it. */
export function runLengthTable(plan: RunLengthPlan, precision: number, threads: number): string {
  const seconds = plan.seconds < 1 ? plan.seconds.toPrecision(2) : Math.ceil(plan.seconds).toString();
  return [
    `For call congestion within +-${fmt(100 * precision)} % (relative half-width):`,
    `  ${plan.lowerBound ? "at least" : "about"} ${plan.calls} calls (${plan.callsPerReplication} per replication x ${plan.replications}), about ${seconds} s on ${threads} thread${threads > 1 ? "s" : ""}`,
    `  call congestion about ${fmt(plan.callCongestion)}; variance per call ${fmt(plan.varianceRatio)} x independent sampling`,
    `  method: ${plan.method}`,
    ...(plan.lengthened ? [`  replications lengthened: ${plan.lengthened}`] : []),
  ].join("\n");
}

export const simulationCommands: CliCommand[] = [
  {
    name: "plan",
    summary: "plan <scenario.json> [--precision R] [--threads N]: about how many calls and seconds the precision needs",
    async run(argv) {
      const { file, precision, threads } = parsePlanArgs(argv);
      const scenario = readScenarioFile(file);
      const relativeHalfWidth = precision ?? scenario.run.precision?.relativeHalfWidth;
      if (relativeHalfWidth === undefined) throw new CliUsageError(`--precision: required when the scenario has no run.precision; ${PLAN_USAGE}`);
      const plan = planRunLength(scenario, { relativeHalfWidth, threads });
      return { json: { relativeHalfWidth, ...plan } as unknown as Record<string, unknown>, table: runLengthTable(plan, relativeHalfWidth, threads) };
    },
  },
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
