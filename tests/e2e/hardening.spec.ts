// Issue #10 regression tests against the built app, plus the API tokens of issue #7.
import { expect, test, type APIResponse, type Browser, type Page } from "@playwright/test";
import { Client } from "pg";
import { signInLimits } from "../../lib/schemas/sign-in-limits";
import { account, signInAs, signInWithPassword, waitForMail } from "./support/helpers";

const appUrl = process.env.APP_URL ?? "http://localhost:3100";

async function expectErrorShape(response: APIResponse, status: number) {
  expect(response.status()).toBe(status);
  expect(response.headers()["content-type"]).toContain("application/json");
  const body = await response.json();
  expect(body.error).toMatchObject({ status, code: expect.any(String), message: expect.any(String) });
  return body.error as { status: number; code: string; message: string; fields?: Record<string, string> };
}

async function requestLink(page: Page, email: string) {
  await page.goto("/sign-in");
  await page.getByRole("tab", { name: "E-mail link" }).click();
  const form = page.getByRole("form", { name: "Sign in with an e-mail link" });
  await form.getByLabel("E-mail").fill(email);
  await form.getByRole("button", { name: "Send me a sign-in link" }).click();
}

async function signedInContext(browser: Browser, role: "admin" | "engineer" | "reviewer" | "viewer") {
  const context = await browser.newContext();
  const page = await context.newPage();
  await signInAs(page, role);
  return { context, page };
}

test("security headers on pages and API answers (item 7)", async ({ request }) => {
  for (const path of ["/sign-in", "/api/v1/health"]) {
    const headers = (await request.get(path)).headers();
    expect(headers["content-security-policy"]).toContain("frame-ancestors 'none'");
    expect(headers["x-content-type-options"]).toBe("nosniff");
    expect(headers["referrer-policy"]).toBe("strict-origin-when-cross-origin");
    expect(headers["strict-transport-security"]).toBeUndefined(); // plain HTTP here; see README for TLS
  }
});

test("the sign-in page works under the Content-Security-Policy", async ({ page }) => {
  const violations: string[] = [];
  page.on("console", (message) => {
    if (/Content Security Policy/i.test(message.text())) violations.push(message.text());
  });
  await signInAs(page, "viewer");
  expect(violations).toEqual([]);
});

test("every /api/v1 failure has the error shape (item 6)", async ({ request }) => {
  await expectErrorShape(await request.put("/api/v1/health"), 405);
  await expectErrorShape(await request.get("/api/v1/no-such-thing"), 404);
  await expectErrorShape(await request.get("/api/v1/workspaces/%00/members"), 400);
  await expectErrorShape(await request.get("/api/v1/workspaces/%/members"), 400);
  await expectErrorShape(await request.get("/api/v1/health", { headers: { "x-padding": "a".repeat(40_000) } }), 431);
  await expectErrorShape(await request.get("/api/v1/workspaces/kestrel-fen/members"), 401);
});

test("no open redirect after sign-in (item 3)", async ({ page }) => {
  for (const returnTo of ["//other.example/x", "/%5Cother.example", "/\\other.example"]) {
    await page.context().clearCookies();
    await page.goto(`/sign-in?returnTo=${encodeURIComponent(returnTo)}`);
    const form = page.getByRole("form", { name: "Sign in with password" });
    await form.getByLabel("E-mail").fill(account("viewer").email);
    await form.getByLabel("Password").fill(account("viewer").password);
    await form.getByRole("button", { name: "Sign in" }).click();
    await expect(page).toHaveURL(/\/w\/kestrel-fen$/);
    expect(new URL(page.url()).origin).toBe(new URL(appUrl).origin);
    // Already signed in: the page's own redirect is checked the same way.
    await page.goto(`/sign-in?returnTo=${encodeURIComponent(returnTo)}`);
    expect(new URL(page.url()).origin).toBe(new URL(appUrl).origin);
  }
});

test("state-changing JSON routes refuse other sites and other media types (item 4)", async ({ page }) => {
  await signInAs(page, "admin");
  const email = `csrf-${Date.now()}@example.test`;
  const plain = await page.request.post("/api/v1/workspaces/kestrel-fen/invitations", {
    headers: { "content-type": "text/plain", origin: new URL(appUrl).origin },
    data: JSON.stringify({ email, role: "admin" }),
  });
  await expectErrorShape(plain, 415);
  const foreign = await page.request.post("/api/v1/workspaces/kestrel-fen/invitations", {
    headers: { "content-type": "application/json", origin: "http://other.example" },
    data: { email, role: "admin" },
  });
  expect((await expectErrorShape(foreign, 403)).code).toBe("cross-origin");
  const sameSiteOtherSubdomain = await page.request.delete("/api/v1/workspaces/kestrel-fen/members/nobody", { headers: { origin: "http://evil.localhost:3200" } });
  await expectErrorShape(sameSiteOtherSubdomain, 403);
  const invitations = await (await page.request.get("/api/v1/workspaces/kestrel-fen/invitations")).json();
  expect(invitations.invitations.map((i: { email: string }) => i.email)).not.toContain(email);
  // A server action from another origin is refused, not a 500.
  const action = await page.request.post("/sign-in", { headers: { "next-action": "0".repeat(40), origin: "http://other.example", "content-type": "text/plain" }, data: "[]" });
  expect(action.status()).toBe(403);
  const malformed = await page.request.post("/sign-in", { headers: { "next-action": "0".repeat(40), origin: new URL(appUrl).origin, "content-type": "text/plain" }, data: "{not json" });
  expect(malformed.status()).toBe(400);
  const oversized = await page.request.post("/sign-in", { headers: { "next-action": "0".repeat(40), origin: new URL(appUrl).origin, "content-type": "text/plain" }, data: `["${"x".repeat(1_100_000)}"]` });
  expect(oversized.status()).toBe(413);
});

test("bodies are capped while they stream in (item 10)", async ({ page }) => {
  await signInAs(page, "viewer");
  const big = `{"servers": 10, "traffic": 5, "pad": "${"x".repeat(400_000)}"}`;
  await expectErrorShape(await page.request.post("/api/v1/analytic/erlang-b", { headers: { "content-type": "application/json" }, data: big }), 413);
});

test("sign-out ends the session on the server, not only in the browser (item 8)", async ({ browser }) => {
  const { context, page } = await signedInContext(browser, "reviewer");
  const cookies = await context.cookies();
  expect((await page.request.get("/api/v1/workspaces")).status()).toBe(200);
  await page.getByRole("button", { name: "Sign out" }).click();
  await expect(page.getByText("You are signed out.")).toBeVisible();
  const replay = await browser.newContext();
  await replay.addCookies(cookies);
  await expectErrorShape(await replay.request.get("/api/v1/workspaces"), 401);
  await replay.close();
  await context.close();
});

test("password and link sign-in answer alike for unknown addresses (item 9)", async ({ page }) => {
  for (const email of [account("reviewer").email, `nobody-${Date.now()}@kestrel-fen.test`]) {
    await requestLink(page, email);
    await expect(page).toHaveURL(`${new URL(appUrl).origin}/sign-in/check-email`);
  }
});

test("sign-in works from the 127.0.0.1 address the server prints (item 11)", async ({ page }) => {
  const loopback = appUrl.replace("localhost", "127.0.0.1");
  await page.goto(`${loopback}/sign-in`);
  expect(new URL(page.url()).origin).toBe(new URL(appUrl).origin);
  const form = page.getByRole("form", { name: "Sign in with password" });
  await form.getByLabel("E-mail").fill(account("viewer").email);
  await form.getByLabel("Password").fill(account("viewer").password);
  await form.getByRole("button", { name: "Sign in" }).click();
  await expect(page).toHaveURL(/\/w\/kestrel-fen$/);
});

test("the mailbox shows no sign-in links and no other workspace's mail (item 1)", async ({ browser }) => {
  const since = new Date(Date.now() - 1000);
  // Someone asks for a sign-in link; the ward's admin invites someone to the ward.
  const anonymous = await browser.newPage();
  await requestLink(anonymous, account("viewer").email);
  await waitForMail(account("viewer").email, since);
  const ward = await browser.newContext();
  const wardPage = await ward.newPage();
  await signInWithPassword(wardPage, "ward-admin@thornmere-ward.test", "spillway-ward-demo");
  await expect(wardPage).toHaveURL(/\/w\/thornmere-ward$/);
  const invitee = `ward-nurse-${Date.now()}@example.test`;
  expect((await wardPage.request.post("/api/v1/workspaces/thornmere-ward/invitations", { data: { email: invitee, role: "viewer" } })).status()).toBe(201);
  await waitForMail(invitee, since);

  const { context, page } = await signedInContext(browser, "admin");
  await page.goto("/w/kestrel-fen/mailbox");
  await expect(page.getByRole("heading", { name: "Mailbox" })).toBeVisible();
  const text = await page.locator("main").innerText();
  expect(text).not.toContain("Your Spillway sign-in link");
  expect(text).not.toContain("/api/v1/auth/callback");
  expect(text).not.toContain(invitee);
  await ward.close();
  await context.close();
});

test("sign-in links are throttled per address (item 10)", async ({ page }) => {
  const { email } = account("admin");
  for (let i = 0; i < signInLimits.linksPerAddress + 2; i++) {
    await requestLink(page, email);
    await expect(page).toHaveURL(/\/sign-in\/check-email$/);
  }
  // Mail is sent after the answer; give the last one time to arrive before counting. Whatever earlier runs on
  // this database sent, the window now holds exactly the limit.
  await new Promise((r) => setTimeout(r, 3000));
  const client = new Client({ connectionString: process.env.DATABASE_URL });
  await client.connect();
  const { rows } = await client.query(
    "select count(*)::int as n from captured_mail where $1 = any(envelope_to) and kind = 'sign-in-link' and received_at > now() - make_interval(mins => $2)",
    [email, signInLimits.windowMinutes],
  );
  await client.end();
  expect(rows[0].n).toBe(signInLimits.linksPerAddress);
});

test("API tokens: created by a session, shown once, act with the owner's role, revocable (issue #7)", async ({ browser, playwright }) => {
  const { context, page } = await signedInContext(browser, "viewer");
  const created = await page.request.post("/api/v1/workspaces/kestrel-fen/tokens", { data: { name: "e2e notebook" } });
  expect(created.status()).toBe(201);
  const { id, token } = await created.json();
  expect(token).toMatch(/^spw_/);
  const listed = await (await page.request.get("/api/v1/workspaces/kestrel-fen/tokens")).json();
  expect(listed.tokens.find((t: { id: string }) => t.id === id)).toMatchObject({ name: "e2e notebook" });
  expect(JSON.stringify(listed)).not.toContain(token);
  await expectErrorShape(await page.request.post("/api/v1/workspaces/kestrel-fen/tokens", { data: { name: "" } }), 400);

  const api = await playwright.request.newContext({ baseURL: appUrl, extraHTTPHeaders: { authorization: `Bearer ${token}` } });
  expect((await api.get("/api/v1/workspaces/kestrel-fen/tokens")).status()).toBe(200);
  expect((await api.post("/api/v1/analytic/erlang-b", { data: { servers: 24, target: 0.02 } })).status()).toBe(200);
  // Viewer's role: no member list, no writes. Other workspace: not found. Tokens cannot mint tokens.
  await expectErrorShape(await api.get("/api/v1/workspaces/kestrel-fen/members"), 403);
  await expectErrorShape(await api.post("/api/v1/workspaces/kestrel-fen/invitations", { data: { email: "x@example.test", role: "viewer" } }), 403);
  await expectErrorShape(await api.get("/api/v1/workspaces/thornmere-ward/members"), 404);
  await expectErrorShape(await api.post("/api/v1/workspaces/kestrel-fen/tokens", { data: { name: "more" } }), 403);
  // A Bearer request needs no Origin: it carries no cookie to forge.
  expect((await api.post("/api/v1/analytic/erlang-b", { data: { servers: 24, target: 0.02 }, headers: { origin: "http://other.example" } })).status()).toBe(200);

  const anonymous = await playwright.request.newContext({ baseURL: appUrl });
  await expectErrorShape(await anonymous.get("/api/v1/workspaces/kestrel-fen/tokens"), 401);
  const forged = await playwright.request.newContext({ baseURL: appUrl, extraHTTPHeaders: { authorization: `Bearer spw_${"A".repeat(43)}` } });
  await expectErrorShape(await forged.get("/api/v1/workspaces/kestrel-fen/members"), 401);
  await expectErrorShape(await page.request.delete(`/api/v1/workspaces/thornmere-ward/tokens/${id}`), 404);

  expect((await page.request.delete(`/api/v1/workspaces/kestrel-fen/tokens/${id}`)).status()).toBe(204);
  await expectErrorShape(await api.get("/api/v1/workspaces/kestrel-fen/tokens"), 401);
  await expectErrorShape(await page.request.delete(`/api/v1/workspaces/kestrel-fen/tokens/${id}`), 404);
  await Promise.all([api.dispose(), anonymous.dispose(), forged.dispose(), context.close()]);
});

test("an expensive evaluation holds nobody else up, and a too-large one is refused with 422 (item 2)", async ({ browser, request }) => {
  test.setTimeout(180_000);
  // The claim is about the web server's event loop, so first let earlier tests' simulations leave the CPU:
  // two busy replication threads on this 2-core machine would slow any answer, held loop or not.
  await expect
    .poll(async () => {
      const { queue } = await (await request.get("/api/v1/health")).json();
      return (queue.queues as { queued: number; active: number }[]).reduce((n, q) => n + q.queued + q.active, 0);
    }, { timeout: 120_000, intervals: [500] })
    .toBe(0);
  const engineer = await signedInContext(browser, "engineer");
  const reviewer = await signedInContext(browser, "reviewer");
  // Warm the reviewer's path (thread start-up).
  expect((await reviewer.page.request.post("/api/v1/analytic/erlang-b", { data: { servers: 24, target: 0.02 } })).status()).toBe(200);
  // About 2.9 s of work on one core here: an exact overflow chain of 19 519 states, inside the interactive limit.
  const expensive = engineer.page.request.post("/api/v1/analytic/overflow-loss", {
    data: { primaries: [{ traffic: 150, servers: 130 }, { traffic: 100, servers: 0 }], servers: 148 },
    timeout: 60_000,
  });
  let expensiveDone = false;
  void expensive.finally(() => (expensiveDone = true));
  await new Promise((r) => setTimeout(r, 150));
  // Responsiveness, not speed: a held event loop answers nothing for seconds, so every request made while the
  // expensive case runs would be slow. The fastest of three answers is compared with 200 ms, so a moment of CPU
  // contention on this 2-core machine (browser, database, the evaluating thread) cannot fail the test alone.
  const fastest = async (ask: () => Promise<{ status(): number }>) => {
    const times: number[] = [];
    for (let i = 0; i < 3; i++) {
      const started = Date.now();
      expect((await ask()).status()).toBeLessThan(300);
      times.push(Date.now() - started);
    }
    return Math.min(...times);
  };
  expect(await fastest(() => request.get("/api/v1/health"))).toBeLessThan(200);
  expect(await fastest(() => reviewer.page.request.post("/api/v1/analytic/erlang-b", { data: { servers: 24, target: 0.02 } }))).toBeLessThan(200);
  // Measured while the expensive case was still running, or the check above proves nothing.
  expect(expensiveDone).toBe(false);
  const cheap = await reviewer.page.request.post("/api/v1/analytic/erlang-b", { data: { servers: 24, target: 0.02 } });
  expect((await cheap.json()).result.traffic).toBeCloseTo(16.63, 2); // 24 circuits at 2 %: common practice, no source
  // Finished within the budget (200) or stopped by it (422); either way it held nobody up.
  expect([200, 422]).toContain((await expensive).status());
  // Ten times that state space is refused at once, with the way forward.
  const huge = await engineer.page.request.post("/api/v1/analytic/overflow-loss", {
    data: { primaries: [{ traffic: 300, servers: 399 }, { traffic: 300, servers: 0 }], servers: 498 },
  });
  const refused = await expectErrorShape(huge, 422);
  expect(refused.message).toMatch(/too large for an interactive answer.*background job/);
  await engineer.context.close();
  await reviewer.context.close();
});
