/**
 * Stationary distribution of a finite level-dependent QBD whose level is the number of busy
 * servers j = 0..N and whose phase is an autonomous environment (k phases):
 *   phase i -> l at rate phaseRates[i*k + l] (same in every level),
 *   (j, i) -> (j+1, i) at rate upRates[i] for j < N (arrivals in phase i; lost at j = N),
 *   (j, i) -> (j-1, i) at rate j μ.
 * Linear level reduction (Gaver, Jacobs & Latouche 1984, "Finite birth-and-death models in
 * randomly changing environments", Adv. Appl. Prob. 16): R_N = Λ (-D_N)^-1,
 * R_j = Λ (-(D_j + (j+1) μ R_{j+1}))^-1, π_j = π_{j-1} R_j. All matrices being inverted are
 * nonsingular M-matrices, so the elimination is stable; each level vector is rescaled and its
 * log scale kept, so nothing overflows for N in the thousands. Cost O(N k^3), memory O(N k^2).
 */
export function solveEnvironmentLossChain(
  servers: number,
  phases: number,
  phaseRates: Float64Array,
  upRates: Float64Array,
  mu: number,
): Float64Array {
  const k = phases;
  const n = servers;
  const kk = k * k;
  const r = new Float64Array((n + 1) * kk); // R_j stored at j*kk, j = 1..N
  const outSwitch = new Float64Array(k);
  for (let i = 0; i < k; i++) {
    let s = 0;
    for (let l = 0; l < k; l++) if (l !== i) s += phaseRates[i * k + l];
    outSwitch[i] = s;
  }
  const m = new Float64Array(kk);
  const inv = new Float64Array(kk);
  for (let j = n; j >= 1; j--) {
    // M_j = -(D_j + (j+1) μ R_{j+1})
    for (let i = 0; i < k; i++) {
      for (let l = 0; l < k; l++) m[i * k + l] = i === l ? outSwitch[i] + (j < n ? upRates[i] : 0) + j * mu : -phaseRates[i * k + l];
    }
    if (j < n) {
      const c = (j + 1) * mu;
      const next = (j + 1) * kk;
      for (let e = 0; e < kk; e++) m[e] -= c * r[next + e];
    }
    invert(m, inv, k);
    const base = j * kk;
    for (let i = 0; i < k; i++) {
      const lambda = upRates[i];
      for (let l = 0; l < k; l++) r[base + i * k + l] = lambda * inv[i * k + l];
    }
  }
  // Level 0: π_0 G = 0 with G = D_0 + μ R_1 (a generator); replace the last column by the normalisation.
  const g = new Float64Array(kk);
  for (let i = 0; i < k; i++) {
    for (let l = 0; l < k; l++) g[i * k + l] = i === l ? -(outSwitch[i] + (n > 0 ? upRates[i] : 0)) : phaseRates[i * k + l];
  }
  if (n > 0) for (let e = 0; e < kk; e++) g[e] += mu * r[kk + e];
  for (let i = 0; i < k; i++) g[i * k + k - 1] = 1;
  const rhs = new Float64Array(k);
  rhs[k - 1] = 1;
  const pi0 = solveRowSystem(g, rhs, k);
  const pi = new Float64Array((n + 1) * k);
  const logScale = new Float64Array(n + 1);
  let level = pi0.map((v) => Math.max(0, v));
  let levelScale = 0;
  for (let j = 0; j <= n; j++) {
    if (j > 0) {
      const next = new Float64Array(k);
      const base = j * kk;
      for (let i = 0; i < k; i++) {
        const v = level[i];
        if (v === 0) continue;
        for (let l = 0; l < k; l++) next[l] += v * r[base + i * k + l];
      }
      level = next;
    }
    let s = 0;
    for (let i = 0; i < k; i++) s += level[i];
    if (s > 0) {
      for (let i = 0; i < k; i++) level[i] /= s;
      levelScale += Math.log(s);
    } else {
      levelScale = -Infinity;
    }
    logScale[j] = levelScale;
    for (let i = 0; i < k; i++) pi[j * k + i] = level[i];
    if (levelScale === -Infinity) break;
  }
  let maxLog = -Infinity;
  for (let j = 0; j <= n; j++) if (logScale[j] > maxLog) maxLog = logScale[j];
  let total = 0;
  for (let j = 0; j <= n; j++) total += Math.exp(logScale[j] - maxLog);
  const logTotal = maxLog + Math.log(total);
  for (let j = 0; j <= n; j++) {
    const w = Math.exp(logScale[j] - logTotal);
    for (let i = 0; i < k; i++) pi[j * k + i] *= w;
  }
  return pi;
}

/** Inverse of a small dense matrix by Gauss–Jordan with partial pivoting. */
function invert(source: Float64Array, out: Float64Array, k: number): void {
  const a = Float64Array.from(source);
  out.fill(0);
  for (let i = 0; i < k; i++) out[i * k + i] = 1;
  for (let col = 0; col < k; col++) {
    let p = col;
    for (let r = col + 1; r < k; r++) if (Math.abs(a[r * k + col]) > Math.abs(a[p * k + col])) p = r;
    const pivot = a[p * k + col];
    if (pivot === 0 || !Number.isFinite(pivot)) throw new Error("singular block in level reduction");
    if (p !== col) {
      for (let c = 0; c < k; c++) {
        let t = a[p * k + c];
        a[p * k + c] = a[col * k + c];
        a[col * k + c] = t;
        t = out[p * k + c];
        out[p * k + c] = out[col * k + c];
        out[col * k + c] = t;
      }
    }
    const invPivot = 1 / pivot;
    for (let c = 0; c < k; c++) {
      a[col * k + c] *= invPivot;
      out[col * k + c] *= invPivot;
    }
    for (let r = 0; r < k; r++) {
      if (r === col) continue;
      const f = a[r * k + col];
      if (f === 0) continue;
      for (let c = 0; c < k; c++) {
        a[r * k + c] -= f * a[col * k + c];
        out[r * k + c] -= f * out[col * k + c];
      }
    }
  }
}

/** Solves x G = b (row vector x) for small dense G. */
function solveRowSystem(g: Float64Array, b: Float64Array, k: number): Float64Array {
  const inv = new Float64Array(k * k);
  invert(g, inv, k);
  const x = new Float64Array(k);
  for (let i = 0; i < k; i++) for (let l = 0; l < k; l++) x[l] += b[i] * inv[i * k + l];
  return x;
}

/** Stationary distribution θ of a small irreducible generator, or null if it is reducible. */
export function phaseStationary(phaseRates: Float64Array, k: number): Float64Array | null {
  // Irreducible iff every phase reaches and is reached from phase 0.
  const reach = (forward: boolean) => {
    const seen = new Array<boolean>(k).fill(false);
    const stack = [0];
    seen[0] = true;
    while (stack.length) {
      const i = stack.pop()!;
      for (let l = 0; l < k; l++) {
        const rate = forward ? phaseRates[i * k + l] : phaseRates[l * k + i];
        if (l !== i && rate > 0 && !seen[l]) {
          seen[l] = true;
          stack.push(l);
        }
      }
    }
    return seen.every(Boolean);
  };
  if (!reach(true) || !reach(false)) return null;
  const g = new Float64Array(k * k);
  for (let i = 0; i < k; i++) {
    let out = 0;
    for (let l = 0; l < k; l++) if (l !== i) out += phaseRates[i * k + l];
    for (let l = 0; l < k; l++) g[i * k + l] = l === i ? -out : phaseRates[i * k + l];
  }
  for (let i = 0; i < k; i++) g[i * k + k - 1] = 1;
  const rhs = new Float64Array(k);
  rhs[k - 1] = 1;
  return solveRowSystem(g, rhs, k);
}
