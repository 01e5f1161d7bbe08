// The lab's demo content (issue #8): scenarios, finished runs with real results, one sweep, one grid and two
// review decisions, so a new user sees a complete picture at first sign-in. Results are simulated here, at seed
// time (small, fast scenarios), never in a web request. Idempotent: skipped when the demo scenarios exist.
import { and, eq, inArray } from "drizzle-orm";
import type { Database } from "./client";
import { auditEvents, reviewComments, runs, scenarioRevisions, scenarios, sweeps, users, workspaces } from "./schema";
import { DEMO_TARGET, demoGrid, demoReviews, demoScenarios, demoSweep, type DemoScenario } from "./demo-data";
import { parseScenario, planRun, runScenario, type Scenario, type SimulationResult } from "../lib/simulation/node";
import { curveOf, expandSweep, formulaServers, gridOf, parseSweepDefinition, type PointRun, type SweepDefinition } from "../lib/sweeps";

interface Simulated {
  scenario: Scenario;
  result: SimulationResult;
  startedAt: Date;
  finishedAt: Date;
}

async function simulate(scenario: Scenario): Promise<Simulated> {
  const startedAt = new Date();
  const result = await runScenario(scenario, { threads: 1 });
  return { scenario, result, startedAt, finishedAt: new Date() };
}

/** The demo scenario with Erlang B's sizing for the demo target at its mean offered traffic. */
export function sizedDemoScenario(demo: DemoScenario): Scenario {
  const unsized = parseScenario({ ...demo.scenario, servers: 1 });
  return parseScenario({ ...demo.scenario, servers: formulaServers("erlang-b", unsized, DEMO_TARGET) });
}

const runRow = (workspaceId: string, userId: string, s: Simulated) => ({
  workspaceId,
  scenario: s.scenario as unknown as Record<string, unknown>,
  seed: s.scenario.run.seed,
  plan: planRun(s.scenario) as unknown as Record<string, unknown>,
  status: "succeeded" as const,
  replicationsPlanned: s.result.replications,
  replicationsDone: s.result.replications,
  progress: 1,
  result: s.result as unknown as Record<string, unknown>,
  references: s.result.references,
  submittedBy: userId,
  createdAt: s.startedAt,
  startedAt: s.startedAt,
  finishedAt: s.finishedAt,
});

export async function seedDemoLab(db: Database, log: (line: string) => void = () => {}): Promise<void> {
  const [workspace] = await db.select({ id: workspaces.id }).from(workspaces).where(eq(workspaces.slug, "kestrel-fen"));
  if (!workspace) return;
  const existing = await db
    .select({ id: scenarios.id })
    .from(scenarios)
    .where(and(eq(scenarios.workspaceId, workspace.id), inArray(scenarios.name, demoScenarios.map((d) => d.name))));
  if (existing.length) return;
  const people = await db.select({ id: users.id, email: users.email }).from(users).where(inArray(users.email, ["engineer@kestrel-fen.test", "reviewer@kestrel-fen.test"]));
  const engineer = people.find((p) => p.email.startsWith("engineer@"))?.id;
  const reviewer = people.find((p) => p.email.startsWith("reviewer@"))?.id;
  if (!engineer || !reviewer) return;

  // Simulate everything first (pure), then store it all in one transaction: no half-seeded workspace.
  log("Simulating the demo runs (a few seconds) ...");
  const singles = new Map<DemoScenario["key"], Simulated>();
  for (const demo of demoScenarios) singles.set(demo.key, await simulate(sizedDemoScenario(demo)));
  const families: { name: string; key: DemoScenario["key"]; definition: SweepDefinition; points: (Simulated & { point: number; values: Record<string, number> })[] }[] = [];
  for (const family of [demoSweep, demoGrid]) {
    const definition = parseSweepDefinition(family.definition);
    const base = singles.get(family.scenario)!.scenario;
    const points = [];
    for (const p of expandSweep(base, definition)) points.push({ ...(await simulate(p.scenario)), point: p.point, values: p.values });
    families.push({ name: family.name, key: family.scenario, definition, points });
  }

  await db.transaction(async (tx) => {
    const ids = new Map<DemoScenario["key"], { scenarioId: string; revisionId: string; runId: string }>();
    for (const demo of demoScenarios) {
      const s = singles.get(demo.key)!;
      const [row] = await tx.insert(scenarios).values({ workspaceId: workspace.id, name: demo.name, description: demo.description, latestRevision: 1, createdBy: engineer }).returning({ id: scenarios.id });
      const [rev] = await tx
        .insert(scenarioRevisions)
        .values({ scenarioId: row.id, revision: 1, body: s.scenario as unknown as Record<string, unknown>, note: demo.note, createdBy: engineer })
        .returning({ id: scenarioRevisions.id });
      const [run] = await tx
        .insert(runs)
        .values({ ...runRow(workspace.id, engineer, s), scenarioId: row.id, scenarioRevisionId: rev.id, name: "" })
        .returning({ id: runs.id });
      ids.set(demo.key, { scenarioId: row.id, revisionId: rev.id, runId: run.id });
    }
    for (const family of families) {
      const owner = ids.get(family.key)!;
      const base = singles.get(family.key)!;
      const first = family.points[0];
      const [sweep] = await tx
        .insert(sweeps)
        .values({
          workspaceId: workspace.id,
          kind: family.definition.kind,
          scenarioId: owner.scenarioId,
          scenarioRevisionId: owner.revisionId,
          name: family.name,
          scenario: base.scenario as unknown as Record<string, unknown>,
          definition: family.definition as unknown as Record<string, unknown>,
          status: "succeeded",
          pointsPlanned: family.points.length,
          pointsDone: family.points.length,
          submittedBy: engineer,
          createdAt: first.startedAt,
          startedAt: first.startedAt,
          finishedAt: family.points[family.points.length - 1].finishedAt,
        })
        .returning({ id: sweeps.id });
      const pointRuns: PointRun[] = [];
      for (const p of family.points) {
        const [run] = await tx
          .insert(runs)
          .values({ ...runRow(workspace.id, engineer, p), scenarioId: owner.scenarioId, scenarioRevisionId: owner.revisionId, name: "", sweepId: sweep.id, sweepPoint: p.point, sweepValues: p.values })
          .returning({ id: runs.id });
        pointRuns.push({ runId: run.id, point: p.point, values: p.values, status: "succeeded", result: p.result, references: p.result.references, error: null, partial: false });
      }
      const summary = family.definition.kind === "sweep" ? curveOf(family.definition, pointRuns) : family.definition.kind === "grid" ? gridOf(family.definition, pointRuns) : null;
      await tx.update(sweeps).set({ result: summary as unknown as Record<string, unknown> }).where(eq(sweeps.id, sweep.id));
    }
    for (const review of demoReviews) {
      const runId = ids.get(review.scenario)!.runId;
      await tx.insert(reviewComments).values({ workspaceId: workspace.id, subjectType: "run", subjectId: runId, authorId: reviewer, body: review.body, decision: review.decision });
      await tx.update(runs).set({ reviewStatus: review.decision }).where(eq(runs.id, runId));
      await tx.insert(auditEvents).values({ workspaceId: workspace.id, actorUserId: reviewer, action: `review.${review.decision}`, subjectType: "run", subjectId: runId, detail: { from: "unreviewed", to: review.decision, demo: true } });
    }
  });
  log("Demo scenarios, runs, a sweep, a grid and two reviews seeded.");
}
