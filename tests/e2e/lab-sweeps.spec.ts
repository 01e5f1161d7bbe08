// Issue #8, the researcher's journey: start a sweep and a two-parameter sizing map from the browser, watch the worker
// finish them, and read the curve and the map. The base scenario is tiny (3 replications of 2 000 calls per
// point) so every point takes well under a second of simulation.
import { expect, test, type Page } from "@playwright/test";
import { signInAs } from "./support/helpers";
import { api, ws } from "./support/demo-lab";
import { screenshot } from "./support/lab";

// An alarm-circuit group: the name marks it as sizing that protects people, so the caution must show.
const scenarioName = `Alarm relay group (sweep journey ${Date.now()})`;

async function startFromForm(page: Page) {
  await page.getByRole("navigation", { name: "Workspace" }).getByRole("link", { name: "Sweeps" }).click();
  await page.getByRole("link", { name: "Start a sweep" }).first().click();
  await expect(page.getByRole("heading", { level: 1, name: "Start a sweep" })).toBeVisible();
  await page.getByRole("combobox", { name: "Scenario", exact: true }).selectOption({ label: `${scenarioName} (rev. 1)` });
  // The form reads the chosen scenario and states where it stands on the swept parameter.
  await expect(page.getByText("This scenario: 6.")).toBeVisible();
}

/** Waits for the worker to finish every point (the page polls while it runs). */
async function waitUntilFinished(page: Page) {
  await expect(page).toHaveURL(new RegExp(`/w/${ws}/sweeps/[\\w-]+$`), { timeout: 30_000 });
  await expect(page.getByTestId("job-status").first()).toHaveText("Finished", { timeout: 150_000 });
}

test("researcher starts a sweep and a sizing map and reads the curve and the map", async ({ page }) => {
  test.setTimeout(360_000);
  await signInAs(page, "engineer");
  const created = await page.request.post(api("/scenarios"), {
    data: {
      name: scenarioName,
      description: "Invented for the sweep journey: 6 E of Poisson traffic on 10 circuits.",
      scenario: {
        servers: 10,
        arrivals: { process: "poisson", rate: 6 },
        holding: { law: "exponential", mean: 1 },
        run: { seed: 2718, replications: 3, callsPerReplication: 2000, warmupCalls: 200 },
      },
    },
  });
  expect(created.status(), await created.text()).toBe(201);

  // A sweep of the offered traffic over three values.
  await startFromForm(page);
  await page.getByRole("textbox", { name: "Name", exact: true }).fill("Alarm relay: blocking as the load grows");
  await page.getByRole("textbox", { name: /^Values/ }).fill("4, 6, 8");
  await page.getByRole("button", { name: "Start sweep" }).click();
  await waitUntilFinished(page);
  await expect(page.getByTestId("curve-point")).toHaveCount(3);
  const curve = page.getByTestId("sweep-curve");
  await expect(curve).toBeVisible();
  await expect(curve.locator(".main-svg").first()).toBeAttached({ timeout: 30_000 });
  // Every point has its simulated figure (the cell after the status) beside Erlang B's.
  for (const row of await page.getByTestId("curve-point").all()) await expect(row.locator("td").nth(1)).toHaveText(/\d %$/);
  await expect(page.getByText("This sizing protects people")).toBeVisible();
  await screenshot(page, "sweep-curve");

  // A sizing map: offered traffic × peakedness, each cell sized by Erlang B for 1 %.
  await startFromForm(page);
  await page.getByRole("radio", { name: /^Sizing map/ }).check();
  await page.getByRole("group", { name: "Columns (x)" }).getByRole("textbox", { name: /^Values/ }).fill("4, 8");
  await page.getByRole("group", { name: "Rows (y)" }).getByRole("textbox", { name: /^Values/ }).fill("1, 2");
  await page.getByRole("button", { name: "Start sizing map" }).click();
  await waitUntilFinished(page);
  const map = page.getByTestId("sizing-map");
  await expect(map).toBeVisible();
  const cells = map.getByTestId("map-cell");
  await expect(cells).toHaveCount(4);
  // Each cell says in words whether the formula's group holds, with its margin and group size.
  for (const cell of await cells.all()) {
    await expect(cell).toHaveAttribute("data-verdict", /^(holds|breaks|inconclusive)$/);
    await expect(cell).toContainText(/Holds|Breaks|Too close/);
    await expect(cell).toContainText(/N = \d+/);
  }
  await expect(page.getByTestId("map-counts")).toContainText("of 4 cells");
  await screenshot(page, "sizing-map");

  // Its report carries the map, the verdict over the cells and the caution.
  await page.getByRole("link", { name: "Printable report" }).click();
  await expect(page.getByTestId("verdict")).toContainText("of 4 cells");
  await expect(page.getByTestId("report-cautions")).toContainText("This sizing protects people");
  await expect(page.getByTestId("report-point")).toHaveCount(4);
});
