// The demo workspace: invented names only (no real organisations, people or places).
import type { WorkspaceRole } from "../lib/schemas/roles";
import type { ScenarioInput } from "../lib/simulation";
import type { SweepDefinitionInput } from "../lib/sweeps";

export const demoWorkspaces = [
  {
    slug: "kestrel-fen",
    name: "Kestrel Fen Exchange Study",
    description: "Trunk-route and overflow sizing for an imaginary regional exchange.",
    safetyCritical: false,
  },
  {
    slug: "thornmere-ward",
    name: "Thornmere Ward Capacity",
    description: "Bed-pool sizing for an imaginary hospital ward: safety-critical, needs qualified review.",
    safetyCritical: true,
  },
] as const;

export interface DemoAccount {
  email: string;
  name: string;
  password: string;
  roles: Record<(typeof demoWorkspaces)[number]["slug"], WorkspaceRole | null>;
}

export const demoAccounts: DemoAccount[] = [
  { email: "admin@kestrel-fen.test", name: "Ada Marsh (demo admin)", password: "spillway-admin-demo", roles: { "kestrel-fen": "admin", "thornmere-ward": "viewer" } },
  { email: "engineer@kestrel-fen.test", name: "Eli Reed (demo engineer)", password: "spillway-engineer-demo", roles: { "kestrel-fen": "engineer", "thornmere-ward": null } },
  { email: "reviewer@kestrel-fen.test", name: "Rhea Sedge (demo reviewer)", password: "spillway-reviewer-demo", roles: { "kestrel-fen": "reviewer", "thornmere-ward": null } },
  { email: "viewer@kestrel-fen.test", name: "Vic Alder (demo viewer)", password: "spillway-viewer-demo", roles: { "kestrel-fen": "viewer", "thornmere-ward": null } },
  { email: "ward-admin@thornmere-ward.test", name: "Wren Tally (demo ward admin)", password: "spillway-ward-demo", roles: { "kestrel-fen": null, "thornmere-ward": "admin" } },
];

// ---- The lab's demo scenarios (issue #8): each shows why Spillway exists. Invented places and numbers. ----

/** Small and fast: the seed simulates every demo run when `npm start` or `npm test` prepares the database. */
const demoRun = (seed: number, calls = 20_000) => ({ seed, replications: 8, callsPerReplication: calls, warmupCalls: 2_000, confidence: 0.95 });

export interface DemoScenario {
  key: "overflow" | "small-population" | "retrying" | "bursty";
  name: string;
  description: string;
  /** `servers` is left to the seed: Erlang B's sizing for DEMO_TARGET at the mean traffic offered to the group. */
  scenario: Omit<ScenarioInput, "servers">;
  /** What the demo run shows (the note of the first revision). */
  note: string;
}

/** The grade of service the demo groups are sized for by Erlang B (the lab's default target). */
export const DEMO_TARGET = 0.01;

export const demoScenarios: DemoScenario[] = [
  {
    key: "overflow",
    name: "Harbour Road final route (overflow)",
    description: "Three high-usage groups overflow to one final route; the overflow is peaky, so Erlang B under-sizes the route.",
    scenario: {
      arrivals: { process: "overflow", primaries: [{ traffic: 18, servers: 20 }, { traffic: 14, servers: 16 }, { traffic: 9, servers: 10 }] },
      holding: { law: "exponential", mean: 1 },
      run: demoRun(11, 10_000),
    },
    note: "Final route sized by Erlang B at the mean overflow traffic.",
  },
  {
    key: "small-population",
    name: "Fenside hamlet exchange (30 subscribers)",
    description: "A small population whose calls thin out as lines get busy; Erlang B's infinite-source assumption over-sizes it.",
    scenario: {
      arrivals: { process: "finite-source", sources: 30, idleRate: 0.25 },
      holding: { law: "exponential", mean: 1 },
      run: demoRun(12),
    },
    note: "Sized by Erlang B for the offered traffic of 30 sources.",
  },
  {
    key: "retrying",
    name: "Reed Lane help desk (callers try again)",
    description: "Refused callers redial after a short pause, adding load in the busiest minutes.",
    scenario: {
      arrivals: { process: "poisson", rate: 20 },
      holding: { law: "exponential", mean: 1 },
      retrials: { persistence: 0.8, delay: { law: "exponential", mean: 0.3 }, maxAttempts: 8 },
      run: demoRun(13),
    },
    note: "Sized by Erlang B as if refused calls were lost.",
  },
  {
    key: "bursty",
    name: "Marsh Gate data concentrator (bursty on-off)",
    description: "A source that talks in bursts at twice its mean rate and is silent in between.",
    scenario: {
      arrivals: { process: "on-off", onRate: 40, meanOn: 0.5, meanOff: 0.5 },
      holding: { law: "exponential", mean: 1 },
      run: demoRun(14),
    },
    note: "Sized by Erlang B at the mean load of the bursts.",
  },
];

/** The demo sweep and grid, both on the bursty source. */
export const demoSweep: { name: string; scenario: DemoScenario["key"]; definition: SweepDefinitionInput } = {
  name: "Marsh Gate: blocking as the load grows",
  scenario: "bursty",
  definition: { kind: "sweep", parameter: "offeredTraffic", values: [14, 17, 20, 23, 26] },
};

export const demoGrid: { name: string; scenario: DemoScenario["key"]; definition: SweepDefinitionInput } = {
  name: "Marsh Gate: where Erlang B's sizing holds",
  scenario: "bursty",
  definition: { kind: "grid", x: { parameter: "offeredTraffic", values: [10, 20, 30] }, y: { parameter: "peakedness", values: [1, 1.5, 3] }, targetBlocking: DEMO_TARGET },
};

/** Review decisions on the demo runs: one approved, one sent back. */
export const demoReviews = [
  { scenario: "small-population", decision: "approved", body: "Engset's figure sits inside the interval and the group is over-sized by Erlang B as expected. Approved." },
  { scenario: "overflow", decision: "changes-requested", body: "The final route misses the 1 % target by a wide margin. Please re-size it with equivalent random and run again." },
] as const;
