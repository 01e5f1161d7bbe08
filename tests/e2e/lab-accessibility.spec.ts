// Issue #8, quality: an automated accessibility check (axe-core) on the lab's key pages, signed in as the demo
// engineer, finds no violation of impact "serious" or "critical". Each page is checked once its data has loaded
// (no loading region left, charts drawn), so the check sees what a reader sees; a screenshot of each is kept.
import AxeBuilder from "@axe-core/playwright";
import { expect, test, type Page } from "@playwright/test";
import { signInAs } from "./support/helpers";
import { demoRun, demoSweepId, ws } from "./support/demo-lab";
import { screenshot } from "./support/lab";

/** Waits until no region is loading and every chart on the page has drawn its SVG. */
async function settled(page: Page) {
  await expect(page.getByRole("heading", { level: 1 })).toBeVisible();
  await expect(page.locator('[aria-busy="true"]')).toHaveCount(0, { timeout: 20_000 });
  const charts = page.locator("figure[data-testid]");
  const count = await charts.count();
  for (let i = 0; i < count; i++) await expect(charts.nth(i).locator(".main-svg").first()).toBeAttached({ timeout: 30_000 });
}

async function expectNoSeriousViolations(page: Page, name: string) {
  await settled(page);
  const results = await new AxeBuilder({ page }).analyze();
  const serious = results.violations
    .filter((v) => v.impact === "serious" || v.impact === "critical")
    .map((v) => `${v.impact} ${v.id}: ${v.help} (${v.nodes.length}×: ${v.nodes.slice(0, 3).map((n) => n.target.join(" ")).join(" | ")})`);
  expect(serious, `axe on ${name} (${page.url()})`).toEqual([]);
  await screenshot(page, `a11y-${name}`);
}

test("the lab's key pages have no serious or critical accessibility violations", async ({ page }) => {
  test.setTimeout(240_000);
  await signInAs(page, "engineer");
  await expect(page.getByRole("heading", { name: "Recent results" })).toBeVisible();
  await expectNoSeriousViolations(page, "workspace-home");

  await page.goto(`/w/${ws}/scenarios`);
  await expect(page.getByRole("link", { name: "Fenside hamlet exchange (30 subscribers)" })).toBeVisible();
  await expectNoSeriousViolations(page, "scenarios");

  await page.getByRole("link", { name: "Marsh Gate data concentrator (bursty on-off)" }).click();
  await expect(page.getByTestId("references-panel").getByTestId("reference").first()).toBeVisible();
  await expectNoSeriousViolations(page, "scenario-editor");

  const run = await demoRun(page, "small-population");
  await page.goto(`/w/${ws}/runs/${run.id}`);
  await expect(page.getByTestId("verdict")).toBeVisible();
  await expectNoSeriousViolations(page, "run");

  await page.goto(`/w/${ws}/runs/${run.id}/report`);
  await expect(page.getByTestId("verdict")).toBeVisible();
  await expectNoSeriousViolations(page, "run-report");

  const sweep = await demoSweepId(page, "sweep");
  await page.goto(`/w/${ws}/sweeps/${sweep}`);
  await expect(page.getByTestId("sweep-curve")).toBeVisible();
  await expectNoSeriousViolations(page, "sweep");

  const grid = await demoSweepId(page, "grid");
  await page.goto(`/w/${ws}/sweeps/${grid}`);
  await expect(page.getByTestId("sizing-map")).toBeVisible();
  await expectNoSeriousViolations(page, "sizing-map");

  await page.goto(`/w/${ws}/sweeps/${grid}/report`);
  await expect(page.getByTestId("sizing-map")).toBeVisible();
  await expectNoSeriousViolations(page, "sweep-report");

  await page.goto(`/w/${ws}/traffic`);
  await expect(page.getByRole("heading", { level: 1, name: "Measured traffic" })).toBeVisible();
  await expectNoSeriousViolations(page, "traffic");

  await page.goto(`/w/${ws}/settings`);
  await expect(page.getByRole("heading", { level: 1, name: "Settings" })).toBeVisible();
  await expectNoSeriousViolations(page, "settings");
});
