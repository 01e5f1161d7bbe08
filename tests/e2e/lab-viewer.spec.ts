import { expect, test } from "@playwright/test";
import { signInAs } from "./support/helpers";
import { screenshot } from "./support/lab";

// A viewer reads everything but cannot edit or run: no button, and the API refuses.
test("viewer sees results but cannot edit or run", async ({ page }) => {
  await signInAs(page, "viewer");
  await expect(page.getByRole("heading", { name: "Recent results" })).toBeVisible();
  await screenshot(page, "workspace-home");

  await page.getByRole("navigation", { name: "Workspace" }).getByRole("link", { name: "Scenarios" }).click();
  await expect(page.getByRole("link", { name: "New scenario" })).toHaveCount(0);
  await page.getByLabel("Search scenarios").fill("Marsh Gate");
  await page.getByRole("link", { name: "Marsh Gate data concentrator (bursty on-off)" }).click();
  await expect(page.getByTestId("references-panel").getByTestId("reference").first()).toBeVisible();
  await expect(page.getByRole("button", { name: /Save|Run/ })).toHaveCount(0);
  await expect(page.getByLabel("Servers (circuits)")).toBeDisabled();
  const scenarioId = page.url().split("/").pop()!;

  // The seeded run of this scenario: its result is readable, with no cancel and no review decision.
  await page.getByRole("link", { name: /Marsh Gate data concentrator/ }).last().click();
  await expect(page.getByTestId("verdict")).toBeVisible();
  await expect(page.getByRole("button", { name: /Cancel run|Approve|Request changes|Add comment/ })).toHaveCount(0);

  const run = await page.request.post("/api/v1/workspaces/kestrel-fen/runs", { data: { scenarioId } });
  expect(run.status()).toBe(403);
  const edit = await page.request.patch(`/api/v1/workspaces/kestrel-fen/scenarios/${scenarioId}`, { data: { name: "renamed by a viewer" } });
  expect(edit.status()).toBe(403);
  const create = await page.request.post("/api/v1/workspaces/kestrel-fen/scenarios", { data: { name: "x", scenario: {} } });
  expect(create.status()).toBe(403);
});
