import path from "node:path";
import { expect, test } from "@playwright/test";
import { signInAs } from "./support/helpers";
import { screenshot } from "./support/lab";

// Issue #9's journey: an engineer uploads the demo call records, maps the columns, reads the characterisation,
// makes a busy-hour scenario, runs it and reads the verdict.
test("engineer goes from the demo call records to a finished run with a verdict", async ({ page }) => {
  test.setTimeout(240_000);
  await signInAs(page, "engineer");
  await page.getByRole("navigation", { name: "Workspace" }).getByRole("link", { name: "Traffic" }).click();
  await page.getByRole("link", { name: "Upload traffic" }).click();
  await expect(page.getByText("Largest file:")).toContainText("20");
  await expect(page.getByTestId("demo-download")).toHaveAttribute("href", "/demo/measured-call-records.csv");

  await page.getByTestId("upload-file").setInputFiles(path.resolve(__dirname, "../../public/demo/measured-call-records.csv"));
  // The preview shows the first rows with their line numbers, and the guessed mapping.
  await expect(page.getByRole("cell", { name: "call_start" }).or(page.getByRole("columnheader", { name: "call_start" }))).toBeVisible();
  await expect(page.getByTestId("map-start")).toHaveValue("call_start");
  await expect(page.getByTestId("map-duration")).toHaveValue("duration_s");
  await expect(page.getByTestId("map-outcome")).toHaveValue("outcome");
  await expect(page.getByTestId("map-group")).toHaveValue("route");
  await screenshot(page, "traffic-mapping");
  await page.getByTestId("upload-submit").click();

  await expect(page).toHaveURL(/\/w\/kestrel-fen\/traffic\/[\w-]+$/, { timeout: 30_000 });
  await expect(page.getByTestId("characterisation")).toBeVisible({ timeout: 120_000 });
  await expect(page.getByTestId("characterisation")).toContainText("time-consistent busy hour (ITU-T E.500)");
  await expect(page.getByTestId("characterisation")).toContainText("10:00");
  await expect(page.getByTestId("fit-lognormal")).toBeVisible();
  for (const chart of ["chart-traffic", "chart-holding", "chart-qq", "chart-simultaneous"]) await expect(page.getByTestId(chart)).toBeVisible();
  await screenshot(page, "traffic-characterisation");

  await page.getByTestId("scenario-source").selectOption("busy-hour");
  await page.getByTestId("make-scenario").click();
  // The search for the servers needed opens the sizing-search form on the new scenario.
  const search = page.getByTestId("search-servers");
  await expect(search).toHaveAttribute("href", /\/w\/kestrel-fen\/sweeps\/new\?scenario=[\w-]+&kind=dimensioning$/);
  const form = await page.context().newPage();
  await form.goto((await search.getAttribute("href"))!);
  await expect(form.locator('input[name="kind"][value="dimensioning"]')).toBeChecked();
  await form.close();
  await page.getByTestId("open-scenario").click();
  await expect(page).toHaveURL(/\/w\/kestrel-fen\/scenarios\/[\w-]+$/);
  // Small and quick: 4 replications of 5 000 calls.
  await page.getByRole("spinbutton", { name: "Replications", exact: true }).fill("4");
  await page.getByLabel("Calls per replication").fill("5000");
  await page.getByLabel("Warm-up calls").fill("500");
  await page.getByRole("button", { name: "Save and run" }).click();
  await expect(page).toHaveURL(/\/w\/kestrel-fen\/runs\/[\w-]+$/, { timeout: 30_000 });
  await expect(page.getByTestId("verdict")).toBeVisible({ timeout: 180_000 });
  await expect(page.getByTestId("verdict-badge").first()).toHaveText(/Sizing (holds|breaks)|Inconclusive/);
  await screenshot(page, "traffic-run");
});

test("a bad file is refused with its line and nothing is listed", async ({ page }) => {
  await signInAs(page, "engineer");
  await page.goto("/w/kestrel-fen/traffic/new");
  await page.getByTestId("upload-file").setInputFiles({
    name: "bad.csv",
    mimeType: "text/csv",
    buffer: Buffer.from("call_start,duration_s\n2026-01-12T10:00:00Z,60\n2026-01-12T10:00:05Z,-3\n"),
  });
  await expect(page.getByTestId("map-duration")).toHaveValue("duration_s");
  await page.getByTestId("upload-submit").click();
  await expect(page.getByTestId("upload-error")).toContainText('line 3, column "duration_s": -3 is negative');
});
