import { expect, test } from "@playwright/test";
import { signInAs } from "./support/helpers";

// Each demo role signs in and sees what its role allows; the server refuses the rest (not just hidden links).
const cases = [
  { role: "admin", members: true, audit: true, allowed: ["Invite people by e-mail", "Queue simulation runs", "Approve results or request changes"], denied: [] },
  { role: "engineer", members: false, audit: false, allowed: ["Queue simulation runs", "Upload measured traffic"], denied: ["Approve results or request changes", "Invite people by e-mail"] },
  { role: "reviewer", members: false, audit: false, allowed: ["Approve results or request changes", "Comment on results"], denied: ["Queue simulation runs", "Invite people by e-mail"] },
  { role: "viewer", members: false, audit: false, allowed: ["Read scenarios, runs and results"], denied: ["Comment on results", "Queue simulation runs"] },
] as const;

for (const c of cases) {
  test(`${c.role} signs in and sees what the role allows`, async ({ page }) => {
    await signInAs(page, c.role);
    await expect(page.getByRole("heading", { level: 1, name: "Kestrel Fen Exchange Study" })).toBeVisible();
    // The role's abilities are listed under Settings (the home page shows the work in the workspace).
    await page.goto("/w/kestrel-fen/settings");
    const abilities = page.getByRole("list", { name: "What your role allows" });
    for (const text of c.allowed) await expect(abilities.getByText(`${text} (allowed)`)).toBeVisible();
    for (const text of c.denied) await expect(abilities.getByText(`${text} (not allowed)`)).toBeAttached();

    const nav = page.getByRole("navigation", { name: "Workspace" });
    await expect(nav.getByRole("link", { name: "Members" })).toHaveCount(c.members ? 1 : 0);
    await expect(nav.getByRole("link", { name: "Audit log" })).toHaveCount(c.audit ? 1 : 0);

    // Typing the address does not get past the guard.
    await page.goto("/w/kestrel-fen/members");
    if (c.members) {
      await expect(page.getByRole("heading", { name: "Invite someone" })).toBeVisible();
    } else {
      await expect(page.getByRole("heading", { name: "Your role does not allow this" })).toBeVisible();
    }
    const api = await page.request.get("/api/v1/workspaces/kestrel-fen/audit");
    expect(api.status()).toBe(c.audit ? 200 : 403);
  });
}

test("a member of one workspace gets 404 for another workspace", async ({ page }) => {
  await signInAs(page, "engineer");
  await page.goto("/w/thornmere-ward");
  await expect(page.getByRole("heading", { name: "Not found" })).toBeVisible();
  const api = await page.request.get("/api/v1/workspaces/thornmere-ward/members");
  expect(api.status()).toBe(404);
});

test("the workspace switcher moves between workspaces with a different role in each", async ({ page }) => {
  await signInAs(page, "admin");
  await page.getByRole("combobox", { name: "Workspace" }).selectOption("thornmere-ward");
  await expect(page).toHaveURL(/\/w\/thornmere-ward$/);
  await expect(page.getByRole("heading", { level: 1, name: "Thornmere Ward Capacity" })).toBeVisible();
  await expect(page.getByText("Safety-critical sizing")).toBeVisible();
  // Admin in Kestrel Fen, only viewer here: the member list is refused.
  await page.goto("/w/thornmere-ward/members");
  await expect(page.getByRole("heading", { name: "Your role does not allow this" })).toBeVisible();
});

test("the Erlang B check answers from the analytic API", async ({ page }) => {
  await signInAs(page, "viewer");
  const form = page.getByRole("form", { name: "Erlang B check" });
  await form.getByLabel("Servers (circuits)").fill("30");
  await form.getByLabel("Offered traffic (erlangs)").fill("20");
  await form.getByRole("button", { name: "Evaluate" }).click();
  // B(30, 20) = 0.008457 by the exact rational recursion (checked outside the app); 30 circuits for
  // 20 erlangs at about 1 % is common practice, no source.
  await expect(page.getByTestId("erlang-b-result")).toContainText("0.846 %");
  await form.getByLabel("Servers (circuits)").fill("-3");
  await form.getByRole("button", { name: "Evaluate" }).click();
  await expect(form.getByRole("alert")).toContainText(/servers/i);
});
