import { expect, test } from "@playwright/test";
import { signInAs } from "./support/helpers";

test("health reports the database and the queue", async ({ request }) => {
  const response = await request.get("/api/v1/health");
  expect(response.status()).toBe(200);
  const body = await response.json();
  expect(body.database.ok).toBe(true);
  expect(body.queue.ok).toBe(true);
  expect(body.queue.queues.map((q: { name: string }) => q.name)).toEqual(expect.arrayContaining(["run-start", "run-chunk", "sweep-start"]));
});

test("the scenario JSON Schema is public; the analytic API needs a signed-in user", async ({ request }) => {
  const schema = await request.get("/api/v1/schema/scenario");
  expect(schema.status()).toBe(200);
  expect((await schema.json()).properties).toHaveProperty("arrivals");
  const anonymous = await request.post("/api/v1/analytic/erlang-b", { data: { servers: 30, traffic: 20 } });
  expect(anonymous.status()).toBe(401);
  expect((await anonymous.json()).error.code).toBe("unauthenticated");
});

test("analytic operations answer with results or per-field 400s", async ({ page }) => {
  await signInAs(page, "reviewer");
  const list = await (await page.request.get("/api/v1/analytic")).json();
  expect(list.operations.map((o: { name: string }) => o.name)).toEqual(expect.arrayContaining(["erlang-b", "engset", "equivalent-random", "mmpp-loss", "overflow-loss"]));

  // 24 circuits at 2 % blocking carry about 16.6 erlangs offered: common practice, no source.
  const sized = await page.request.post("/api/v1/analytic/erlang-b", { data: { servers: 24, target: 0.02 } });
  expect(sized.status()).toBe(200);
  expect((await sized.json()).result.traffic).toBeCloseTo(16.63, 2);

  const badMatrix = await page.request.post("/api/v1/analytic/mmpp-loss", { data: { servers: 10, rates: [5, 1], switching: [[0, -1], [1, 0]] } });
  expect(badMatrix.status()).toBe(400);
  const error = (await badMatrix.json()).error;
  expect(error.code).toBe("invalid-input");
  expect(Object.keys(error.fields).join()).toMatch(/switching/);

  const unknown = await page.request.post("/api/v1/analytic/erlang-z", { data: {} });
  expect(unknown.status()).toBe(404);
});
