import { describe, expect, it } from "vitest";
import { erlangB, overflowLossSystem } from "../../../lib/teletraffic";
import { gaussSeidelEnvironmentLossChain, gthStationary, solveEnvironmentLossChain, type SparsePhaseProcess } from "../../../lib/teletraffic/qbd";
import { denseOverflowNetwork, denseStationary, relativeError } from "./dense-chain";

/** Two independent primaries as the environment of the final group (the overflow network's phase process). */
function primariesEnvironment(primaries: Array<{ traffic: number; servers: number }>) {
  const sizes = primaries.map((p) => p.servers + 1);
  const k = sizes[0] * sizes[1];
  const stride = [1, sizes[0]];
  const dense = new Float64Array(k * k);
  const up = new Float64Array(k);
  const edges: Array<[number, number, number]> = [];
  for (let phase = 0; phase < k; phase++) {
    primaries.forEach((p, i) => {
      const busy = Math.floor(phase / stride[i]) % sizes[i];
      if (busy < p.servers) edges.push([phase, phase + stride[i], p.traffic]);
      else up[phase] += p.traffic;
      if (busy > 0) edges.push([phase, phase - stride[i], busy]);
    });
  }
  const inCount = new Int32Array(k + 1);
  const outRate = new Float64Array(k);
  for (const [f, t, r] of edges) {
    dense[f * k + t] += r;
    inCount[t + 1]++;
    outRate[f] += r;
  }
  const inStart = new Int32Array(k + 1);
  for (let l = 0; l < k; l++) inStart[l + 1] = inStart[l] + inCount[l + 1];
  const fill = Int32Array.from(inStart);
  const inFrom = new Int32Array(edges.length);
  const inRate = new Float64Array(edges.length);
  for (const [f, t, r] of edges) {
    inFrom[fill[t]] = f;
    inRate[fill[t]++] = r;
  }
  const sparse: SparsePhaseProcess = { phases: k, inStart, inFrom, inRate, outRate };
  return { k, dense, up, sparse };
}

describe("chain solvers of qbd.ts", () => {
  it("GTH (Grassmann, Taksar & Heyman 1985) matches a dense solve of a random-looking 5-state generator", () => {
    const k = 5;
    const rates = new Float64Array(k * k);
    for (let i = 0; i < k; i++) for (let l = 0; l < k; l++) if (i !== l) rates[i * k + l] = ((i * 7 + l * 3) % 5) * 0.37 + 0.01 * (i + 1);
    const t: Array<[number, number, number]> = [];
    for (let i = 0; i < k; i++) for (let l = 0; l < k; l++) if (i !== l) t.push([i, l, rates[i * k + l]]);
    const dense = denseStationary(k, t);
    const gth = gthStationary(rates, k)!;
    for (let i = 0; i < k; i++) expect(relativeError(gth[i], dense[i])).toBeLessThan(1e-13);
  });
  it.each([
    [[{ traffic: 10, servers: 12 }, { traffic: 6, servers: 8 }], 12, 0, 0],
    [[{ traffic: 10, servers: 15 }, { traffic: 2, servers: 2 }], 8, 0, 0],
    [[{ traffic: 20, servers: 25 }, { traffic: 20, servers: 25 }], 6, 0, 0],
    // waiting positions at the final group, with and without patience (rate α per waiting call)
    [[{ traffic: 10, servers: 12 }, { traffic: 6, servers: 8 }], 5, 4, 0],
    [[{ traffic: 20, servers: 25 }, { traffic: 20, servers: 25 }], 6, 10, 0.5],
  ])("Gauss–Seidel (from a uniform start) agrees with the direct level reduction: %j onto %i servers, %i waiting positions, patience rate %d", (primaries, n, q, alpha) => {
    const { k, dense, up, sparse } = primariesEnvironment(primaries);
    const deathOf = (j: number) => Math.min(j, n) + Math.max(0, j - n) * alpha;
    const direct = solveEnvironmentLossChain(n + q, k, dense, up, 1, deathOf);
    const death = Float64Array.from({ length: n + q + 1 }, (_, j) => deathOf(j));
    const gs = gaussSeidelEnvironmentLossChain(n + q, sparse, up, death, new Float64Array(direct.length).fill(1 / direct.length), 1e-14, 100_000);
    expect(gs).not.toBeNull();
    let lostDirect = 0;
    let lostGs = 0;
    for (let phase = 0; phase < k; phase++) {
      lostDirect += direct[(n + q) * k + phase] * up[phase];
      lostGs += gs!.pi[(n + q) * k + phase] * up[phase];
    }
    expect(relativeError(lostGs, lostDirect)).toBeLessThan(1e-10);
  });
  it("the Gauss–Seidel path of overflowLossSystem keeps the exact overflow offered, Σ A_i B(n_i, A_i) (Riordan/Erlang: primaries are not affected by the final group)", () => {
    const r = overflowLossSystem({ primaries: [{ traffic: 15, servers: 20 }, { traffic: 15, servers: 20 }], servers: 10 });
    expect(r.method).toMatch(/Gauss–Seidel/);
    expect(relativeError(r.overflowOffered, 2 * 15 * erlangB(20, 15))).toBeLessThan(1e-10);
    expect(relativeError(r.perPrimary[0].blocking, r.perPrimary[1].blocking)).toBeLessThan(1e-9);
  });
  it("light load with a one-server final group (direct path) matches the dense solve of the whole network", () => {
    const primaries = [{ traffic: 0.5, servers: 3 }, { traffic: 0.5, servers: 3 }];
    const r = overflowLossSystem({ primaries, servers: 1 });
    expect(r.method).toMatch(/direct/);
    expect(relativeError(r.blocking, denseOverflowNetwork(primaries, 1).blocking)).toBeLessThan(1e-10);
  });
});
