import { describe, expect, it } from "vitest";
import fc from "fast-check";
import gammainc from "@stdlib/math-base-special-gammainc";
import gammaln from "@stdlib/math-base-special-gammaln";
import {
  erlangB,
  erlangBStateDistribution,
  erlangBSummary,
  logErlangB,
  maxTrafficForBlocking,
  minServersForBlocking,
  realServersForBlocking,
} from "../../../lib/teletraffic";
import { exactErlangB, relativeError } from "./dense-chain";

describe("Erlang B against exact rational arithmetic (exact method: BigInt Σ A^k/k!)", () => {
  const points: Array<[number, bigint, bigint]> = [
    [1, 1n, 1n],
    [5, 2n, 1n],
    [10, 5n, 1n],
    [24, 166n, 10n],
    [30, 20n, 1n],
    [50, 379n, 10n],
    [100, 8406n, 100n],
    [200, 3011n, 20n],
    [400, 450n, 1n],
  ];
  it.each(points)("B(%i, %i/%i) matches to 1e-13 relative", (n, p, q) => {
    const exact = exactErlangB(n, p, q);
    expect(relativeError(erlangB(n, Number(p) / Number(q)), exact)).toBeLessThan(1e-13);
  });
});

describe("Erlang B table values (Erlang B tables as printed in textbooks, e.g. Iversen, Teletraffic Engineering Handbook (ITU-D, 2005), table of A for given N and E; from memory, 2 decimals)", () => {
  const table: Array<[servers: number, grade: number, traffic: number]> = [
    [5, 0.01, 1.36],
    [10, 0.01, 4.46],
    [10, 0.02, 5.08],
    [20, 0.01, 12.03],
    [30, 0.01, 20.34],
    [50, 0.01, 37.9],
    [100, 0.01, 84.06],
  ];
  it.each(table)("N = %i at E = %f carries A = %f (to the table's rounding)", (servers, target, traffic) => {
    expect(Math.abs(maxTrafficForBlocking({ servers, target }).traffic - traffic)).toBeLessThanOrEqual(0.005 + 1e-9);
  });
});

describe("common practice, no source", () => {
  it("20 erlangs at 1 % needs 30 circuits", () => {
    expect(minServersForBlocking({ traffic: 20, target: 0.01 }).servers).toBe(30);
  });
  it("24 circuits at 2 % carry about 16.6 erlangs offered", () => {
    expect(maxTrafficForBlocking({ servers: 24, target: 0.02 }).traffic).toBeCloseTo(16.6, 1);
  });
  it("Poisson mean 3: P(0..3) ≈ 5 %, 15 %, 22 %, 22 % (truncation at N = 60 is negligible)", () => {
    const p = erlangBStateDistribution(60, 3);
    expect(p.slice(0, 4).map((v) => Math.round(v * 100))).toEqual([5, 15, 22, 22]);
  });
});

describe("large groups against @stdlib/math-base-special-gammainc (independent library): B = A^N e^-A / (N! Q(N+1, A))", () => {
  const logReference = (x: number, a: number) => x * Math.log(a) - a - gammaln(x + 1) - Math.log(gammainc(a, x + 1, true, true));
  // Only for A well below N: near A ≈ N and above, stdlib's Q for large arguments is off by up to
  // about 1 % (checked against BigInt at N = 1000, A = 1100 and N = 3000, A = 2990), so that region
  // is checked with exact arithmetic below instead.
  it.each([
    [1000, 950],
    [10_000, 9_800],
    [100_000, 95_000],
    [100_000, 99_000],
  ])("ln B(%i, %i) agrees to 1e-8 absolute (the reference loses digits in N ln A − ln N!)", (n, a) => {
    expect(Math.abs(logErlangB(n, a) - logReference(n, a))).toBeLessThan(1e-8);
  });
  it.each([
    [1000, 1100n],
    [2000, 2000n],
    [1500, 3000n],
    [3000, 2990n],
  ])("overload B(%i, %i) against exact BigInt Erlang B to 1e-12", (n, a) => {
    expect(relativeError(erlangB(n, Number(a)), exactErlangB(n, a, 1n))).toBeLessThan(1e-12);
  });
  it("B(100 000, 95 000) is a normal positive number, B(100 000, 10) is reported in log form", () => {
    const b = erlangB(100_000, 95_000);
    expect(b).toBeGreaterThan(1e-70);
    expect(b).toBeLessThan(1e-50);
    // ln B(N, A) ≈ N ln A − ln N! for A << N: Stirling via stdlib gammaln (independent)
    expect(relativeError(logErlangB(100_000, 10), 100_000 * Math.log(10) - gammaln(100_001) - Math.log(1 + 100_000 / 10))).toBeLessThan(1e-6);
    expect(erlangB(100_000, 10)).toBe(0);
  });
});

describe("non-integer continuation against @stdlib/math-base-special-gammainc: B(x, A) = A^x e^-A / (Γ(x+1) Q(x+1, A))", () => {
  const xs = [0.1, 0.5, 0.9, 1.3, 2.7, 7.5, 15.2, 40.8, 100.5];
  const as = [0.05, 0.5, 1, 2.9, 3.1, 10, 50, 200];
  const grid = xs.flatMap((x) => as.map((a) => [x, a] as [number, number]));
  it.each(grid)("x = %f, A = %f to 1e-11 in ln B", (x, a) => {
    const reference = x * Math.log(a) - a - gammaln(x + 1) - Math.log(gammainc(a, x + 1, true, true));
    expect(Math.abs(logErlangB(x, a) - reference)).toBeLessThan(1e-11 * Math.max(1, Math.abs(reference)));
  });
  it("at integer N the continuation path and the plain recursion agree (x → N from below)", () => {
    for (const [n, a] of [[5, 3], [30, 20], [200, 180]]) {
      expect(relativeError(erlangB(n - 1e-12, a), erlangB(n, a))).toBeLessThan(1e-9);
    }
  });
});

describe("properties (fast-check, fixed seed)", () => {
  const servers = fc.integer({ min: 1, max: 400 });
  const traffic = fc.double({ min: 0.01, max: 600, noNaN: true });
  it("0 < B < 1 (in log form: ln B finite and negative)", () => {
    fc.assert(
      fc.property(servers, traffic, (n, a) => {
        const l = logErlangB(n, a);
        return Number.isFinite(l) && l < 0 && erlangB(n, a) < 1;
      }),
      { seed: 42, numRuns: 300 },
    );
  });
  it("strictly decreasing in N (integer and real steps)", () => {
    fc.assert(
      fc.property(servers, traffic, fc.double({ min: 0.05, max: 1, noNaN: true }), (n, a, step) => logErlangB(n + step, a) < logErlangB(n, a)),
      { seed: 42, numRuns: 300 },
    );
  });
  it("strictly increasing in A", () => {
    fc.assert(
      fc.property(fc.double({ min: 0, max: 400, noNaN: true }), traffic, fc.double({ min: 1e-3, max: 1, noNaN: true }), (x, a, f) => logErlangB(x + 0.5, a) < logErlangB(x + 0.5, a * (1 + f))),
      { seed: 42, numRuns: 300 },
    );
  });
  it("recursion identity B(x, A) = A B(x−1, A) / (x + A B(x−1, A)), also for real x (Erlang B recursion; continuation satisfies it)", () => {
    fc.assert(
      fc.property(fc.double({ min: 1, max: 300, noNaN: true }), fc.double({ min: 0.1, max: 300, noNaN: true }), (x, a) => {
        const prev = erlangB(x - 1, a);
        if (prev < 1e-250) return true;
        return relativeError(erlangB(x, a), (a * prev) / (x + a * prev)) < 1e-11;
      }),
      { seed: 42, numRuns: 300 },
    );
  });
  it("inverses round-trip: largest A, smallest N, real N", () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 2000 }), fc.double({ min: 1e-6, max: 0.5, noNaN: true }), (n, target) => {
        const { traffic } = maxTrafficForBlocking({ servers: n, target });
        const atA = erlangB(n, traffic);
        if (!(atA <= target && relativeError(atA, target) < 1e-10)) return false;
        if (!(erlangB(n, traffic * (1 + 1e-9)) > target)) return false;
        const sized = minServersForBlocking({ traffic, target });
        if (sized.servers !== n) return false;
        const real = realServersForBlocking({ traffic: traffic * 0.97, target });
        return relativeError(erlangB(real.realServers, traffic * 0.97), target) < 1e-9;
      }),
      { seed: 42, numRuns: 120 },
    );
  });
});

describe("inverse on real N (continuation)", () => {
  it("largest A for a fractional group meets the target to 1e-10 and is the largest (property)", () => {
    fc.assert(
      fc.property(fc.double({ min: 0.3, max: 3000, noNaN: true }), fc.double({ min: 1e-6, max: 0.5, noNaN: true }), (n, target) => {
        const { traffic } = maxTrafficForBlocking({ servers: n, target });
        const b = erlangB(n, traffic);
        return b <= target && relativeError(b, target) < 1e-10 && erlangB(n, traffic * (1 + 1e-9)) > target;
      }),
      { seed: 42, numRuns: 150 },
    );
  });
});

describe("state distribution and summary (truncated Poisson, Erlang 1917)", () => {
  it("sums to 1, p_N = B, mean busy = A(1 − B)", () => {
    for (const [n, a] of [[10, 5], [30, 20], [1000, 1200], [5000, 10]]) {
      const p = erlangBStateDistribution(n, a);
      const sum = p.reduce((s, v) => s + v, 0);
      const mean = p.reduce((s, v, j) => s + j * v, 0);
      expect(Math.abs(sum - 1)).toBeLessThan(1e-12);
      expect(relativeError(p[n] + 1e-300, erlangB(n, a) + 1e-300)).toBeLessThan(1e-10);
      expect(relativeError(mean, a * (1 - erlangB(n, a)))).toBeLessThan(1e-11);
    }
  });
  it("summary: carried + lost = offered, occupancy = carried / N", () => {
    const s = erlangBSummary({ servers: 30, traffic: 20 });
    expect(s.blocking).toBe(erlangB(30, 20));
    expect(s.carriedTraffic + s.lostTraffic).toBeCloseTo(20, 12);
    expect(s.occupancyPerServer).toBeCloseTo(s.carriedTraffic / 30, 14);
  });
  it("subnormal traffic on a fractional group stays finite in log form (ln B ≈ x ln A − ln Γ(x+1), continuation at A → 0)", () => {
    const l = logErlangB(2.5, 1e-310);
    expect(Number.isFinite(l)).toBe(true);
    expect(relativeError(l, 2.5 * Math.log(1e-310) - gammaln(3.5))).toBeLessThan(1e-12);
  });
  it("edge conventions: B(0, A) = 1, B(N > 0, 0) = 0", () => {
    expect(erlangB(0, 5)).toBe(1);
    expect(erlangB(3, 0)).toBe(0);
    expect(erlangB(2.5, 0)).toBe(0);
  });
});

describe("sizing at scale (results only; speed is in the benchmark)", () => {
  it("A = 50 000 at 1 %: smallest N meets the target and N − 1 does not", () => {
    const r = minServersForBlocking({ traffic: 50_000, target: 0.01 });
    expect(r.blocking).toBeLessThanOrEqual(0.01);
    expect(r.blockingOneLess).toBeGreaterThan(0.01);
    expect(erlangB(r.servers, 50_000)).toBe(r.blocking);
    expect(r.realServers).toBeGreaterThan(r.servers - 1);
    expect(r.realServers).toBeLessThanOrEqual(r.servers);
  });
  it("N = 10 000 at 1 %: largest A within 1e-10 relative", () => {
    const r = maxTrafficForBlocking({ servers: 10_000, target: 0.01 });
    expect(relativeError(erlangB(10_000, r.traffic), 0.01)).toBeLessThan(1e-10);
    expect(erlangB(10_000, r.traffic * (1 + 1e-10))).toBeGreaterThan(0.01);
  });
});

describe("real N near 0 (review finding 1): B in [0, 1], carried traffic without the cancellation A (1 − B)", () => {
  // [x, A, B(x, A), 1 − B(x, A), A (1 − B)/x] with B = A^x e^-A / Γ(x+1, A) and 1 − B = x Γ(x, A) / Γ(x+1, A)
  // (upper incomplete gamma), computed with mpmath 80 digits on 2 Dec 2026 (mpmath.gammainc; x and A are the
  // doubles as given, converted exactly).
  const reference: Array<[number, number, number, number, number]> = [
    [1e-16, 1, 0.99999999999999994037, 5.9634736232319405291e-17, 0.59634736232319406537],
    [1e-12, 1, 0.99999999999940365264, 5.9634736232310439756e-13, 0.59634736232310440955],
    [1e-6, 1, 0.99999940365272734161, 5.9634727265839417387e-7, 0.59634727265839420085],
    [1e-300, 1, 1.0, 5.9634736232319408929e-301, 0.59634736232319407434],
    [1e-16, 1e-300, 0.99999999999993098017, 6.9019831223328833929e-14, 6.9019831223328837101e-298],
    [1e-10, 2.5, 0.99999999996964741635, 3.0352583648438562451e-11, 0.75881459121096403364],
    [0.3, 1.2, 0.848289257485549124, 0.151710742514450876, 0.60684297005780350401],
    [0.7, 1.6, 0.72118097294364196825, 0.27881902705635803175, 0.63730063327167557696],
    [1e-9, 0.01, 0.99999999592148856416, 4.0785114358365534303e-9, 0.040785114358365532612],
    [0.5, 2.9, 0.86837533280743791969, 0.13162466719256208031, 0.76342306971686004239],
    [1e-16, 3, 0.99999999999999997379, 2.6208374025531848962e-17, 0.78625122076595548531],
  ];
  it.each(reference)("x = %s, A = %s: blocking, carried traffic and occupancy per server against mpmath", (x, a, b, complement, perServer) => {
    const s = erlangBSummary({ servers: x, traffic: a });
    expect(s.blocking).toBeLessThanOrEqual(1);
    expect(relativeError(s.blocking, b)).toBeLessThan(1e-15);
    expect(relativeError(s.carriedTraffic, a * complement)).toBeLessThan(1e-13);
    expect(relativeError(s.occupancyPerServer, perServer)).toBeLessThan(1e-13);
    expect(relativeError(s.lostTraffic, a * b)).toBeLessThan(1e-15);
  });
  it("the reviewer's case x = 1e-300, A = 1: blocking 1, carried traffic tiny and positive, occupancy its N → 0 limit A e^A E1(A)", () => {
    const s = erlangBSummary({ servers: 1e-300, traffic: 1 });
    expect(s.blocking).toBe(1);
    expect(s.carriedTraffic).toBeGreaterThan(0);
    expect(s.carriedTraffic).toBeLessThan(1e-299);
    expect(s.occupancyPerServer).toBeCloseTo(0.596347362323194, 14);
  });
  it("a subnormal group at subnormal traffic: finite, B <= 1, occupancy in [0, 1]", () => {
    const s = erlangBSummary({ servers: 0.999, traffic: 5e-324 });
    expect(s.blocking).toBeGreaterThan(0);
    expect(s.blocking).toBeLessThan(1e-322);
    expect(s.carriedTraffic).toBe(5e-324);
    expect(s.occupancyPerServer).toBeGreaterThanOrEqual(0);
    expect(s.occupancyPerServer).toBeLessThan(1e-322);
  });
  it("N = 0 exactly: blocking 1, nothing carried, occupancy 0 (no servers)", () => {
    expect(erlangBSummary({ servers: 0, traffic: 1 })).toMatchObject({ blocking: 1, carriedTraffic: 0, occupancyPerServer: 0 });
  });
  it("property: 0 <= B <= 1, 0 <= carried <= min(N, A), occupancy per server in [0, 1], for real N in [0, 3] including tiny N", () => {
    fc.assert(
      fc.property(
        fc.oneof(fc.double({ min: 0, max: 3, noNaN: true }), fc.double({ min: 1e-320, max: 1e-6, noNaN: true })),
        fc.oneof(fc.double({ min: 0, max: 200, noNaN: true }), fc.double({ min: 1e-320, max: 1e-3, noNaN: true })),
        (x, a) => {
          const s = erlangBSummary({ servers: x, traffic: a });
          return (
            s.blocking >= 0 &&
            s.blocking <= 1 &&
            s.carriedTraffic >= 0 &&
            s.carriedTraffic <= Math.min(x, a) * (1 + 1e-13) &&
            s.occupancyPerServer >= 0 &&
            s.occupancyPerServer <= 1
          );
        },
      ),
      { seed: 20261202, numRuns: 2000 },
    );
  });
});

describe("deep tail (B below 1e-280) in closed form: ln B against mpmath", () => {
  // ln B = x ln A − A − ln Γ(x+1, A), computed with mpmath 80 digits on 2 Dec 2026
  it.each([
    [100_000, 1000, -361523.6940009081599239],
    [100_000, 10, -821050.7125997172967275],
    [5000, 1e-3, -72129.92090378745172536],
    [40.5, 1e-9, -951.4666434405075268115],
    [2000.25, 900, -501.934528904475089827],
    [100_000, 99_000, -11.70823796806810329321],
  ])("ln B(%s, %s) to 1e-13 relative", (x, a, reference) => {
    expect(relativeError(logErlangB(x, a), reference)).toBeLessThan(1e-13);
  });
});
