import { describe, expect, it } from "vitest";
import { bearerToken, isWorkspaceSlug, safeReturnPath } from "@/lib/auth/request-checks";
import { clientAddress } from "@/lib/auth/client-address";
import { contentSecurityPolicy, malformedPath, securityHeaders } from "@/lib/api/request-shape";
import { exceedsInteractiveLimit } from "@/lib/analytic-pool/limits";
import { nonFinitePath } from "@/lib/analytic-pool/worker";

describe("safe return path (issue #10 item 3)", () => {
  it.each([
    ["//other.example/x"],
    ["/%5Cother.example"],
    ["/\\other.example"],
    ["%2F%2Fother.example"],
    ["/%2F/other.example"],
    ["https://other.example/"],
    ["javascript:alert(1)"],
    ["/\t/other.example"],
    ["/%0d%0aSet-Cookie:x"],
    ["/%"],
    [""],
    [undefined],
    [42],
  ])("refuses %j", (value) => {
    expect(safeReturnPath(value)).toBe("/");
  });

  it("keeps same-site paths with their query and fragment", () => {
    expect(safeReturnPath("/w/kestrel-fen/members?tab=open#top")).toBe("/w/kestrel-fen/members?tab=open#top");
    expect(safeReturnPath("/w/a%20b")).toBe("/w/a%20b");
  });
});

describe("request parts", () => {
  it("reads bearer tokens and marks malformed ones", () => {
    expect(bearerToken(null)).toBeNull();
    expect(bearerToken("Basic abc")).toBeNull();
    expect(bearerToken("Bearer spw_abcdefghijklmnopqrstuvwxyz0123")).toBe("spw_abcdefghijklmnopqrstuvwxyz0123");
    expect(bearerToken("bearer   spw_abcdefghijklmnopqrstuvwxyz0123 ")).toBe("spw_abcdefghijklmnopqrstuvwxyz0123");
    expect(bearerToken("Bearer short")).toBe("");
    expect(bearerToken("Bearer has space inside it but long enough")).toBe("");
  });

  it("accepts only well-formed workspace slugs (NUL and % are simply not found)", () => {
    expect(isWorkspaceSlug("kestrel-fen")).toBe(true);
    expect(isWorkspaceSlug("\u0000")).toBe(false);
    expect(isWorkspaceSlug("%")).toBe(false);
    expect(isWorkspaceSlug("-edge")).toBe(false);
    expect(isWorkspaceSlug("a".repeat(65))).toBe(false);
  });

  it("takes the client address the server recorded, or the proxy's entry when trusted", () => {
    expect(clientAddress("203.0.113.9", false)).toBe("203.0.113.9");
    expect(clientAddress("198.51.100.1, 203.0.113.9", true)).toBe("203.0.113.9");
    expect(clientAddress(null, false)).toBe("unknown");
  });

  it("finds malformed paths before they reach a route (issue #10 item 6)", () => {
    expect(malformedPath("/api/v1/workspaces/%00/members")).toMatch(/control character/);
    expect(malformedPath("/api/v1/workspaces/%/members")).toMatch(/percent-encoding/);
    expect(malformedPath("/api/v1/workspaces/%E0%A4%A/members")).toMatch(/percent-encoding/);
    expect(malformedPath("/api/v1/workspaces/kestrel-fen/members")).toBeNull();
    expect(malformedPath("/w/caf%C3%A9")).toBeNull();
  });

});

describe("security headers (issue #10 item 7)", () => {
  it("forbid framing and sniffing; HSTS and upgrade only over HTTPS", () => {
    const plain = securityHeaders({ development: false, https: false });
    expect(plain["Content-Security-Policy"]).toContain("frame-ancestors 'none'");
    expect(plain["Content-Security-Policy"]).toContain("object-src 'none'");
    expect(plain["Content-Security-Policy"]).not.toContain("unsafe-eval");
    expect(plain["X-Content-Type-Options"]).toBe("nosniff");
    expect(plain["Referrer-Policy"]).toBe("strict-origin-when-cross-origin");
    expect(plain["Strict-Transport-Security"]).toBeUndefined();
    const tls = securityHeaders({ development: false, https: true });
    expect(tls["Strict-Transport-Security"]).toMatch(/max-age=\d+/);
    expect(tls["Content-Security-Policy"]).toContain("upgrade-insecure-requests");
    expect(contentSecurityPolicy({ development: true, https: false })).toContain("'unsafe-eval'");
  });
});

describe("analytic pool helpers (issue #10 items 2 and 6)", () => {
  it("finds NaN and infinities anywhere in a result", () => {
    expect(nonFinitePath({ a: 1, b: [1, 2, { c: Number.NaN }] })).toBe("result.b.2.c");
    expect(nonFinitePath({ a: 1, b: [Infinity] })).toBe("result.b.0");
    expect(nonFinitePath({ a: 1, b: "text", c: null })).toBeNull();
  });

  it("refuses inputs above the interactive limits before they reach a thread", () => {
    // 400 × 1 × 499 = 199 600 states.
    const big = { primaries: [{ traffic: 300, servers: 399 }, { traffic: 300, servers: 0 }], servers: 498 };
    expect(exceedsInteractiveLimit("overflow-loss", big)).toMatchObject({ size: 400 * 1 * 499, max: 20_000 });
    expect(exceedsInteractiveLimit("overflow-loss", { primaries: [{ traffic: 50, servers: 60 }], servers: 100 })).toBeNull();
    expect(exceedsInteractiveLimit("overflow-loss", { primaries: "malformed", servers: 3 })).toBeNull();
    expect(exceedsInteractiveLimit("erlang-b", { servers: 10_000_000, traffic: 9e6 })).toBeNull();
    expect(exceedsInteractiveLimit("overflow-loss", "not an object")).toBeNull();
    // The time-varying methods by their own work estimates (about 6·10⁸, 1·10⁹ and 9·10⁸ here): beyond 2 s, within the schemas' largest.
    const daily = (segments: number, duration: number, rate: number) => Array.from({ length: segments }, (_, i) => ({ duration, rate: rate * (1 + 0.2 * Math.sin(i)) }));
    const heavy = exceedsInteractiveLimit("periodic-loss", { servers: 300, profile: daily(50, 10, 280) });
    expect(heavy?.measure).toMatch(/estimated work/);
    expect(heavy!.size).toBeGreaterThan(heavy!.max);
    expect(exceedsInteractiveLimit("periodic-loss", { servers: 10, profile: daily(4, 1, 8) })).toBeNull();
    expect(exceedsInteractiveLimit("periodic-queue", { servers: 300, waitingPositions: 50, meanPatience: 1, profile: daily(50, 10, 280) })?.measure).toMatch(/estimated work/);
    expect(exceedsInteractiveLimit("time-varying-loss", { servers: 100_000, profile: daily(1000, 1, 90_000) })?.measure).toMatch(/estimated work/);
    expect(exceedsInteractiveLimit("periodic-loss", { servers: -1, profile: daily(2, 1, 1) })).toBeNull(); // malformed: the schema answers
  });
});
