// The seeded demo lab (db/demo-lab.ts) as the browser tests find it: ids looked up through the API with the
// signed-in page's session, so specs never depend on the order other specs created things in.
import { expect, type Page } from "@playwright/test";
import { demoGrid, demoReviews, demoScenarios, demoSweep } from "../../../db/demo-data";

export const ws = "kestrel-fen";
export const api = (p: string) => `/api/v1/workspaces/${ws}${p}`;

async function getJson(page: Page, url: string) {
  const response = await page.request.get(url);
  expect(response.status(), url).toBe(200);
  return response.json();
}

/** The seeded run of a demo scenario (the one the seed reviewed, when it was reviewed). */
export async function demoRun(page: Page, key: (typeof demoScenarios)[number]["key"]): Promise<{ id: string; scenarioName: string; reviewStatus: string }> {
  const name = demoScenarios.find((d) => d.key === key)!.name;
  const scenarios = await getJson(page, api(`/scenarios?q=${encodeURIComponent(name)}&limit=10`));
  const scenario = scenarios.items.find((s: { name: string }) => s.name === name);
  expect(scenario, `demo scenario ${name}`).toBeTruthy();
  const runs = await getJson(page, api(`/runs?scenarioId=${scenario.id}&limit=100`));
  // Oldest first: the seed's run precedes any run a spec started on the same scenario.
  const run = runs.items[runs.items.length - 1];
  expect(run, `a run of ${name}`).toBeTruthy();
  return { id: run.id, scenarioName: name, reviewStatus: run.reviewStatus };
}

/** The seeded sweep ("sweep") or sizing map ("grid"). */
export async function demoSweepId(page: Page, kind: "sweep" | "grid"): Promise<string> {
  const name = (kind === "sweep" ? demoSweep : demoGrid).name;
  const sweeps = await getJson(page, api(`/sweeps?kind=${kind}&limit=100`));
  const found = sweeps.items.find((s: { name: string }) => s.name === name);
  expect(found, `demo ${kind} ${name}`).toBeTruthy();
  return found.id;
}

/** The demo review the seed approved (scenario key and the reviewer's comment). */
export const approvedDemoReview = demoReviews.find((r) => r.decision === "approved")!;
