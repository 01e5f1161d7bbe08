// Issue #8, page 7: the printable report of a run and of a sizing map, with its downloads and print layout.
import { expect, test, type Page } from "@playwright/test";
import { signInAs } from "./support/helpers";
import { approvedDemoReview, demoRun, demoSweepId, ws } from "./support/demo-lab";
import { screenshot } from "./support/lab";

/** The page's "Download …" link answers 200 with the given media type. */
async function expectDownload(page: Page, name: "CSV" | "JSON", type: RegExp) {
  const href = await page.getByRole("link", { name: `Download ${name}` }).getAttribute("href");
  expect(href).toBeTruthy();
  const response = await page.request.get(href!);
  expect(response.status(), href!).toBe(200);
  expect(response.headers()["content-type"]).toMatch(type);
  return response.text();
}

test("a run's report shows the scenario, verdict, references and review, and its downloads answer", async ({ page }) => {
  await signInAs(page, "engineer");
  const run = await demoRun(page, approvedDemoReview.scenario);
  await page.goto(`/w/${ws}/runs/${run.id}`);
  await page.getByRole("link", { name: "Printable report" }).click();
  await expect(page).toHaveURL(new RegExp(`/w/${ws}/runs/${run.id}/report$`));

  await expect(page.getByRole("heading", { level: 1 })).toHaveText(run.scenarioName);
  // The scenario in words, with its revision.
  await expect(page.getByRole("definition").filter({ hasText: "30 sources" })).toBeVisible();
  await expect(page.getByText("Revision 1 of the stored scenario")).toBeVisible();
  // The verdict sentence of lib/client/verdict.ts at the default target.
  await expect(page.getByTestId("verdict")).toContainText("Erlang B sizes");
  await expect(page.getByTestId("verdict-badge").first()).toHaveText(/Sizing holds|Sizing breaks|Too close to call/);
  await expect(page.getByText("1 % call congestion (the workspace default)")).toBeVisible();
  // Simulated figures beside each reference, and each reference's assumptions.
  await expect(page.getByTestId("compare-callCongestion").filter({ hasText: "Erlang B" })).toBeVisible();
  await expect(page.getByTestId("compare-callCongestion").filter({ hasText: "Engset" })).toBeVisible();
  await expect(page.getByTestId("report-reference").filter({ hasText: "Erlang B" })).toContainText("Poisson arrivals");
  await expect(page.getByTestId("report-reference").filter({ hasText: "Engset" })).toContainText("finite sources");
  await expect(page.getByTestId("report-cautions")).toContainText("statistical uncertainty");
  await expect(page.getByTestId("chart-replications")).toBeVisible();
  // Review status with the reviewer and the comment the seed recorded.
  const review = page.getByTestId("report-review");
  await expect(review.getByTestId("review-status")).toHaveText("Approved");
  await expect(review.getByTestId("report-reviewer")).toContainText(/Approved by Rhea Sedge/);
  await expect(review).toContainText(approvedDemoReview.body);
  await screenshot(page, "run-report");

  const csv = await expectDownload(page, "CSV", /text\/csv/);
  expect(csv).toContain("callCongestion");
  await expectDownload(page, "JSON", /application\/json/);

  // On paper: no navigation, no buttons, the figures stay.
  await page.emulateMedia({ media: "print" });
  await expect(page.getByRole("navigation", { name: "Workspace" })).toBeHidden();
  await expect(page.getByRole("button", { name: "Print or save as PDF" })).toBeHidden();
  await expect(page.getByTestId("verdict")).toBeVisible();
  await screenshot(page, "run-report-print");
});

test("a sizing map's report shows the map, its verdict and review status", async ({ page }) => {
  await signInAs(page, "engineer");
  const grid = await demoSweepId(page, "grid");
  await page.goto(`/w/${ws}/sweeps/${grid}`);
  await page.getByRole("link", { name: "Printable report" }).click();
  await expect(page).toHaveURL(new RegExp(`/w/${ws}/sweeps/${grid}/report$`));
  await expect(page.getByRole("heading", { level: 1 })).toHaveText("Marsh Gate: where Erlang B's sizing holds");
  await expect(page.getByTestId("verdict")).toContainText("of 9 cells");
  await expect(page.getByTestId("sizing-map").getByTestId("map-cell")).toHaveCount(9);
  await expect(page.getByTestId("report-point")).toHaveCount(9);
  await expect(page.getByRole("definition").filter({ hasText: "10, 20, 30" })).toBeVisible();
  await expect(page.getByTestId("report-review").getByTestId("review-status")).toHaveText("Not reviewed");
  await screenshot(page, "sweep-report");
  const csv = await expectDownload(page, "CSV", /text\/csv/);
  expect(csv.trim().split("\n").length).toBeGreaterThan(9);
});
