// Simulation engine speed, per arrival kind, as ratios measured in this same run: to the reference
// event loop (engine.ts, plain JavaScript), and to a C event loop of the same model (c-loop.c,
// compiled here with gcc -O2 when a compiler is present). Prints figures only; speed targets live
// here, never in timed tests. Goals (issue #11): every arrival kind >= 0.65x the C loop (engine
// alone), the whole command-line process >= 0.6x, worker pool start-up <= 0.3 s, 2 threads >= 1.8x one.
import { spawnSync } from "node:child_process";
import { mkdirSync, writeFileSync } from "node:fs";
import path from "node:path";
import { bundleWorkers, defaultBundleDir } from "../../lib/ops/bundle";
import { createReplication, enginePathFor, type EnginePath } from "../../lib/simulation/dispatch";
import { parseScenario, runScenario, ThreadRunner, type Scenario, type ScenarioInput } from "../../lib/simulation/node";

const root = path.resolve(__dirname, "../..");
const output = path.join(root, "tests/.output");
const exp1 = { law: "exponential", mean: 1 } as const;

interface Case {
  /** Case name in c-loop.c (the same model and parameters there). */
  name: string;
  label: string;
  model: Omit<ScenarioInput, "run">;
  calls: number;
  warmupCalls?: number;
}

const cases: Case[] = [
  { name: "poisson", label: "Poisson, M/M/30/30 at 20 E", model: { servers: 30, arrivals: { process: "poisson", rate: 20 }, holding: exp1 }, calls: 3e6 },
  { name: "lognormal", label: "lognormal holding cv 1, 30 servers, 20 E", model: { servers: 30, arrivals: { process: "poisson", rate: 20 }, holding: { law: "lognormal", mean: 1, cv: 1 } }, calls: 3e6 },
  { name: "h2", label: "H2 interarrivals scv 4, 30 servers, 20 E", model: { servers: 30, arrivals: { process: "renewal", interarrival: { law: "hyperexponential", mean: 0.05, scv: 4 } }, holding: exp1 }, calls: 3e6 },
  { name: "on-off", label: "on-off 40/s, 1 s on, 1 s off, 30 servers", model: { servers: 30, arrivals: { process: "on-off", onRate: 40, meanOn: 1, meanOff: 1 }, holding: exp1 }, calls: 3e6 },
  {
    name: "mmpp",
    label: "3-phase MMPP, 30 servers",
    model: { servers: 30, arrivals: { process: "mmpp", rates: [10, 20, 40], switching: [[0, 0.5, 0.2], [0.4, 0, 0.4], [0.3, 0.6, 0]] }, holding: exp1 },
    calls: 3e6,
  },
  { name: "retrials", label: "retrials p 0.7, delay 0.5, 30 servers, 24 E", model: { servers: 30, arrivals: { process: "poisson", rate: 24 }, holding: exp1, retrials: { persistence: 0.7, delay: { law: "exponential", mean: 0.5 }, maxAttempts: 10 } }, calls: 3e6 },
  { name: "overflow", label: "overflow of 20 E/20 and 12 E/12 onto 20", model: { servers: 20, arrivals: { process: "overflow", primaries: [{ traffic: 20, servers: 20 }, { traffic: 12, servers: 12 }] }, holding: exp1 }, calls: 3e5 },
  { name: "large-n", label: "large N, M/M/10000/10000 at 9000 E", model: { servers: 10_000, arrivals: { process: "poisson", rate: 9_000 }, holding: exp1 }, calls: 3e6, warmupCalls: 100_000 },
];

function scenarioOf(c: Case, replications: number, callsPerReplication: number): Scenario {
  return parseScenario({ ...c.model, run: { seed: 1, replications, callsPerReplication, warmupCalls: c.warmupCalls ?? 0 } });
}

/** Seconds for one replication of `calls` fresh calls on the given loop (set-up included). */
function timeLoop(c: Case, path: EnginePath): { seconds: number; blocking: number } {
  const s = scenarioOf(c, 2, c.calls);
  const t0 = performance.now();
  const loop = createReplication(s, 0, {}, path);
  while (!loop.advance(1 << 20));
  const seconds = (performance.now() - t0) / 1000;
  const stats = loop.stats();
  return { seconds, blocking: stats.blockedFirst / stats.calls };
}

const median = (xs: number[]) => {
  const sorted = [...xs].sort((a, b) => a - b);
  const m = sorted.length >> 1;
  return sorted.length % 2 ? sorted[m] : (sorted[m - 1] + sorted[m]) / 2;
};

function compileC(): string | undefined {
  const probe = spawnSync("gcc", ["--version"], { encoding: "utf8" });
  if (probe.error || probe.status !== 0) {
    console.log("  (no C compiler found: gcc missing, so the ratios to the C loop are skipped)");
    return undefined;
  }
  mkdirSync(output, { recursive: true });
  const binary = path.join(output, "c-loop");
  const built = spawnSync("gcc", ["-O2", "-o", binary, path.join(__dirname, "c-loop.c"), "-lm"], { encoding: "utf8" });
  if (built.status !== 0) {
    console.log(`  (the C loop did not compile, ratios to it are skipped: ${built.stderr.trim().split("\n")[0]})`);
    return undefined;
  }
  return binary;
}

function runC(binary: string, c: Case): { seconds: number; wall: number; blocking: number } {
  const t0 = performance.now();
  const r = spawnSync(binary, [c.name, String(c.calls), "1"], { encoding: "utf8" });
  const wall = (performance.now() - t0) / 1000;
  if (r.status !== 0) throw new Error(`c-loop ${c.name}: ${r.stderr}`);
  const out = JSON.parse(r.stdout) as { seconds: number; calls: number; blocked: number };
  return { seconds: out.seconds, wall, blocking: out.blocked / out.calls };
}

/** Wall-clock seconds of `npm run cli -- simulate` (node lib/cli/launch.mjs, bundled CLI), one thread. */
function timeCli(c: Case): number {
  const file = path.join(output, `bench-${c.name}.json`);
  const run = { seed: 1, replications: 2, callsPerReplication: c.calls / 2, warmupCalls: c.warmupCalls ?? 0 };
  writeFileSync(file, JSON.stringify({ ...c.model, run }));
  const t0 = performance.now();
  const r = spawnSync(process.execPath, [path.join(root, "lib/cli/launch.mjs"), "simulate", file, "--json"], { encoding: "utf8", env: { ...process.env, SPILLWAY_BUNDLE_DIR: defaultBundleDir } });
  const wall = (performance.now() - t0) / 1000;
  if (r.status !== 0) throw new Error(`cli simulate ${c.name}: ${r.stderr}`);
  return wall;
}

const ratio = (x: number | undefined) => (x === undefined ? "   -  " : `${x.toFixed(2).padStart(5)}x`);

export const simulationCaseNames = cases.map((c) => c.name);

async function useBundles(): Promise<void> {
  await bundleWorkers({ log: (line) => console.log(`  ${line}`) });
  process.env.SPILLWAY_BUNDLE_DIR ??= defaultBundleDir;
}

/**
 * Rounds per case after the warm-up round. One timed run says little on a shared machine (another
 * process's load comes and goes within seconds) and the first full run after a short warm-up still
 * includes the optimising compile of the loop; so each case runs one untimed round, then this many
 * rounds of every contender one after the other (reference, specialised, Markov, C, CLI), and each
 * ratio is the median of the per-round ratios (each round's contenders ran within about a second).
 */
const ROUNDS = 5;

/**
 * The command line again on runs ten times as long (the C loop takes 1.5-2.3 s; the issue's own
 * figures, 0.26-0.48x with 1.6-2.0 s of start-up, imply runs of that length). On the short runs
 * the C loop ends in 0.15-0.23 s, and Node's empty start plus the warm loop alone exceed the
 * 0.25-0.38 s that 0.6x allows there. Median of this many rounds (each pair ~5 s).
 */
const LONG_ROUNDS = 3;
const LONG_FACTOR = 10;

/** The per-arrival-kind table; `only` limits it to the named cases. */
export async function runSimulationBench(only?: string[]): Promise<void> {
  console.log(`\nsimulation engine: ratios measured in this run (higher is faster; x C = C seconds / JS seconds for the same calls; median of ${ROUNDS} rounds after a warm-up round)`);
  await useBundles();
  const binary = compileC();
  // Untimed, like the loops' warm-up round: the first command after a rebuild writes the CLI's code cache.
  if (binary) timeCli({ ...cases[0], name: "warm-up", calls: 2_000 });
  console.log(
    `  ${"arrival kind".padEnd(44)} ${"reference".padStart(11)}  ${"specialised".padStart(11)} ${"vs ref".padStart(7)} ${"vs C".padStart(7)}  ${"markov vs C".padStart(11)}  ${"CLI vs C".padStart(9)}  ${`x${LONG_FACTOR} calls`.padStart(9)}`,
  );
  for (const c of cases.filter((c) => !only || only.includes(c.name))) {
    const markovPath = enginePathFor(scenarioOf(c, 2, c.calls)) === "markov";
    const rounds: Array<{ reference: number; specialised: number; blocking: number; markov?: number; c?: { seconds: number; wall: number; blocking: number }; cli?: number }> = [];
    for (let round = 0; round <= ROUNDS; round++) {
      const reference = timeLoop(c, "reference").seconds;
      const specialised = timeLoop(c, "specialised");
      const markov = markovPath ? timeLoop(c, "markov").seconds : undefined;
      const cRun = binary ? runC(binary, c) : undefined;
      const cli = binary ? timeCli(c) : undefined;
      if (round > 0) rounds.push({ reference, specialised: specialised.seconds, blocking: specialised.blocking, markov, c: cRun, cli });
    }
    const of = (pick: (r: (typeof rounds)[number]) => number | undefined) => {
      const xs = rounds.map(pick).filter((x): x is number => x !== undefined);
      return xs.length ? median(xs) : undefined;
    };
    const rate = (seconds: number) => `${(c.calls / seconds / 1e6).toFixed(2)} M/s`;
    const reference = of((r) => r.reference)!;
    const specialised = of((r) => r.specialised)!;
    const vsRef = of((r) => r.reference / r.specialised);
    const vsC = of((r) => r.c && r.c.seconds / r.specialised);
    const markovVsC = of((r) => r.c && r.markov && r.c.seconds / r.markov);
    const cliVsC = of((r) => r.c && r.cli && r.c.wall / r.cli);
    const long = { ...c, calls: c.calls * LONG_FACTOR }; // the same warm-up as the C loop's (fixed per case there)
    const longRatios: number[] = [];
    for (let round = 0; binary && round < LONG_ROUNDS; round++) longRatios.push(runC(binary, long).wall / timeCli(long));
    console.log(
      `  ${c.label.padEnd(44)} ${rate(reference).padStart(11)}  ${rate(specialised).padStart(11)} ${ratio(vsRef).padStart(7)} ${ratio(vsC).padStart(7)}  ${(markovPath ? ratio(markovVsC) : "    n/a").padStart(11)}  ${ratio(cliVsC).padStart(9)}  ${ratio(longRatios.length ? median(longRatios) : undefined).padStart(9)}`,
    );
    const cRun = rounds[0].c;
    const blocking = rounds[0].blocking;
    if (cRun && Math.abs(cRun.blocking - blocking) > 0.05 * Math.max(blocking, 1e-3) + 5 * Math.sqrt(blocking / c.calls))
      console.log(`    note: the C loop's blocking ${cRun.blocking.toFixed(5)} differs from the JS loop's ${blocking.toFixed(5)}: the two models are out of step`);
  }
  console.log("  (M/s = fresh calls per second on one core; the CLI columns run the dispatched path, start-up included, on the case's calls and on ten times as many; 'markov' where the dispatcher picks it)");
  if (binary) {
    const starts: number[] = [];
    for (let i = 0; i < 5; i++) {
      const t0 = performance.now();
      spawnSync(process.execPath, ["-e", "0"]);
      starts.push((performance.now() - t0) / 1000);
    }
    console.log(`  (Node's own empty start here: ${median(starts).toFixed(3)} s, median of 5; the short runs' C loop takes 0.15-0.23 s, so 0.6x leaves 0.25-0.38 s for start and loop together)`);
  }
}

/** Worker pool start-up and the speed-up of two threads over one. */
export async function runStartupBench(): Promise<void> {
  console.log("\nreplication threads");
  await useBundles();
  // Worker pool start-up: time from creating a 2-thread pool to the answer of a tiny request; the
  // median of three pools, one after the other, since one figure on a shared machine says little.
  const tiny = parseScenario({ servers: 2, arrivals: { process: "poisson", rate: 1 }, holding: exp1, run: { seed: 1, replications: 2, callsPerReplication: 100 } });
  const startups: number[] = [];
  for (let i = 0; i < 3; i++) {
    const t0 = performance.now();
    const pool = new ThreadRunner(2);
    await pool.run({ key: "startup", scenario: tiny, indices: [0, 1] });
    startups.push((performance.now() - t0) / 1000);
    await pool.close();
  }
  console.log(`  worker pool start-up (2 threads, bundled replication worker): ${median(startups).toFixed(3)} s, median of ${startups.map((s) => s.toFixed(3)).join(", ")}  (goal <= 0.3 s)`);

  // A pool of one thread against a pool of two, each created inside the timing (cold, as a
  // command line's or a worker's is), so both pay the same start-up and JIT warm-up per thread:
  // three alternating pairs, the median of their ratios. (Before, the one-thread runs were in this
  // process and warm after the first pair, so the figure compared a warm loop with cold threads.)
  const s = parseScenario({ servers: 30, arrivals: { process: "poisson", rate: 20 }, holding: { law: "lognormal", mean: 1, cv: 1 }, run: { seed: 1, replications: 8, callsPerReplication: 2_500_000 } });
  const pairs: Array<[number, number]> = [];
  for (let pair = 0; pair < 3; pair++) {
    const seconds: number[] = [];
    for (const threads of [1, 2]) {
      const t = performance.now();
      const runner = new ThreadRunner(threads);
      await runScenario(s, { threads, runner });
      seconds.push((performance.now() - t) / 1000);
      await runner.close();
    }
    pairs.push([seconds[0], seconds[1]]);
  }
  const speedUps = pairs.map(([one, two]) => one / two);
  const shown = pairs.map(([one, two]) => `${one.toFixed(2)}/${two.toFixed(2)} s`).join(", ");
  console.log(`  runScenario M/G/30/30, 8 x 2.5 M calls, new pool of 1 thread/of 2 (a command line's --threads): ${shown}; speed-up ${median(speedUps).toFixed(2)}x, median of ${speedUps.map((x) => x.toFixed(2)).join(", ")}  (goal >= 1.8x)`);

  // The queue worker keeps its pool for its whole life (worker/main.ts), so after its first chunk
  // its threads run optimised code: the same pair on pools that already ran this scenario shape.
  const pools = [new ThreadRunner(1), new ThreadRunner(2)];
  const warmUp = parseScenario({ ...s, run: { ...s.run, seed: 2, replications: 4, callsPerReplication: 500_000 } });
  for (const pool of pools) await runScenario(warmUp, { threads: pool.threads, runner: pool });
  const warmPairs: Array<[number, number]> = [];
  for (let pair = 0; pair < 3; pair++) {
    const seconds = [];
    for (const pool of pools) {
      const t = performance.now();
      await runScenario(s, { threads: pool.threads, runner: pool });
      seconds.push((performance.now() - t) / 1000);
    }
    warmPairs.push([seconds[0], seconds[1]]);
  }
  for (const pool of pools) await pool.close();
  const warmSpeedUps = warmPairs.map(([one, two]) => one / two);
  const warmShown = warmPairs.map(([one, two]) => `${one.toFixed(2)}/${two.toFixed(2)} s`).join(", ");
  console.log(`  the same on a worker's kept pools of 1 thread/of 2 (warm): ${warmShown}; speed-up ${median(warmSpeedUps).toFixed(2)}x, median of ${warmSpeedUps.map((x) => x.toFixed(2)).join(", ")}`);
}
