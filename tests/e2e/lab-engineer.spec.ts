import { expect, test } from "@playwright/test";
import { signInAs } from "./support/helpers";
import { screenshot } from "./support/lab";

// An engineer builds a bursty on-off scenario, sees the formulas' answer change as they type, runs it, watches it,
// and reads the simulated blocking beside Erlang B with the verdict.
test("engineer builds an on-off scenario, runs it and reads the verdict", async ({ page }) => {
  test.setTimeout(180_000);
  await signInAs(page, "engineer");
  await page.getByRole("navigation", { name: "Workspace" }).getByRole("link", { name: "Scenarios" }).click();
  await page.getByRole("link", { name: "New scenario" }).first().click();
  await expect(page.getByRole("heading", { level: 1, name: "New scenario" })).toBeVisible();

  const panel = page.getByTestId("references-panel");
  // Poisson by default: Erlang B is the only reference and it is exact.
  await expect(panel.getByTestId("reference").first()).toContainText("Erlang B");
  await expect(panel.getByText("MMPP/M/N/N exact chain")).toHaveCount(0);

  await page.getByLabel("Scenario name").fill("Bursty concentrator (journey)");
  await page.getByLabel("Arrival process").selectOption("on-off");
  // The panel updates: the exact chain for Markov-modulated arrivals now applies.
  await expect(panel.getByText("MMPP/M/N/N exact chain")).toBeVisible();
  await expect(panel.getByTestId("offered-traffic")).toContainText("24 E on the 30 circuits");

  // A field error uses the scenario schema's words and blocks saving; fixing it brings the panel back.
  await page.getByLabel(/Rate during a burst/).fill("0");
  await expect(page.getByText("must be > 0")).toBeVisible();
  await expect(panel).toContainText("Fix the highlighted fields");
  await page.getByLabel(/Rate during a burst/).fill("40");
  await expect(panel.getByTestId("offered-traffic")).toContainText("20 E");

  // Small and quick: 4 replications of 5 000 calls.
  await page.getByRole("spinbutton", { name: "Replications", exact: true }).fill("4");
  await page.getByLabel("Calls per replication").fill("5000");
  await page.getByLabel("Warm-up calls").fill("500");
  // Before running: how long a ±5 % answer would take (run-length planning, a pilot run in the browser).
  await page.getByLabel("Stop at a target precision").check();
  await expect(page.getByTestId("run-length-plan")).toContainText(/About [\d,]+ calls \([\d,]+ per replication × 4\), .* on one core\./, { timeout: 30_000 });
  await page.getByLabel("Stop at a target precision").uncheck();
  await screenshot(page, "scenario-editor");

  await page.getByRole("button", { name: "Save and run" }).click();
  await expect(page).toHaveURL(/\/w\/kestrel-fen\/runs\/[\w-]+$/, { timeout: 30_000 });
  // Progress shows while it runs (or the result, if a worker was quicker than the page).
  await expect(page.getByRole("progressbar").or(page.getByTestId("verdict"))).toBeVisible({ timeout: 30_000 });

  await expect(page.getByTestId("verdict")).toBeVisible({ timeout: 120_000 });
  await expect(page.getByTestId("verdict")).toContainText(/Erlang B sizes/);
  // Bursty traffic at Erlang B's load: the simulated call congestion is well above the 1 % target.
  await expect(page.getByTestId("verdict-badge").first()).toHaveText("Sizing breaks");
  const rows = page.getByTestId("compare-callCongestion");
  await expect(rows.filter({ hasText: "Erlang B" })).toBeVisible();
  await expect(rows.filter({ hasText: "Erlang B" })).toContainText("No");
  await expect(page.getByTestId("chart-replications")).toBeVisible();
  await screenshot(page, "run-result");

  // Changing the target changes the verdict sentence; the address keeps it.
  await page.getByLabel("Target grade of service (blocking, %)").fill("50");
  await expect(page.getByTestId("verdict")).toContainText("the sizing holds");
  await expect(page).toHaveURL(/gos=0\.5/);
});
