// Issue #8: a layout and its page share one session check and one membership lookup per request. React's
// `cache` memoises only inside a server render, so here it is stood in by a plain memo for "one request".
import { beforeEach, describe, expect, it, vi } from "vitest";

const calls = vi.hoisted(() => ({ auth: 0, user: 0, membership: 0 }));

vi.mock("react", async (importOriginal) => {
  const actual = await importOriginal<typeof import("react")>();
  const cache = <A extends unknown[], R>(fn: (...args: A) => R) => {
    const memo = new Map<string, R>();
    return (...args: A) => {
      const key = JSON.stringify(args);
      if (!memo.has(key)) memo.set(key, fn(...args));
      return memo.get(key)!;
    };
  };
  return { ...actual, cache };
});
vi.mock("next/headers", () => ({ headers: async () => new Headers() }));
vi.mock("@/lib/auth/config", () => ({ auth: async () => (calls.auth++, { user: { id: "u1" } }) }));
vi.mock("@/db/client", () => ({ getDatabase: () => ({}) }));
vi.mock("@/db/queries/users", () => ({ findUserById: async () => (calls.user++, { id: "u1", email: "u1@example.test", name: null }) }));
vi.mock("@/db/queries/tokens", () => ({ findApiTokenGrant: async () => null }));
vi.mock("@/db/queries/workspaces", () => ({
  findMembershipBySlug: async (_db: unknown, _user: string, slug: string) => (calls.membership++, { workspace: { id: "w1", slug }, role: "admin" }),
}));

describe("the guard within one request", () => {
  beforeEach(() => Object.assign(calls, { auth: 0, user: 0, membership: 0 }));

  it("looks the caller and the membership up once for the layout's and the page's checks", async () => {
    const { requireWorkspaceAccess } = await import("@/lib/auth/guard");
    const layout = await requireWorkspaceAccess("kestrel-fen", "workspace.read");
    const page = await requireWorkspaceAccess("kestrel-fen", "member.read");
    expect(layout.workspace.id).toBe("w1");
    expect(page.role).toBe("admin");
    expect(calls).toEqual({ auth: 1, user: 1, membership: 1 });
  });
});
