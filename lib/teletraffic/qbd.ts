import { inputError } from "./errors";

/**
 * Stationary distribution of a finite level-dependent QBD whose level is the number of busy
 * servers j = 0..N and whose phase is an autonomous environment (k phases):
 *   phase i -> l at rate phaseRates[i*k + l] (same in every level),
 *   (j, i) -> (j+1, i) at rate upRates[i] for j < N (arrivals in phase i; lost at j = N),
 *   (j, i) -> (j-1, i) at rate j μ.
 * Linear level reduction (Gaver, Jacobs & Latouche 1984, "Finite birth-and-death models in
 * randomly changing environments", Adv. Appl. Prob. 16): R_N = Λ (-D_N)^-1,
 * R_j = Λ (-(D_j + (j+1) μ R_{j+1}))^-1, π_j = π_{j-1} R_j. All matrices being inverted are
 * nonsingular M-matrices; each level vector is rescaled and its
 * log scale kept, so nothing overflows for N in the thousands. Cost O(N k^3), memory O(N k^2).
 * The M-matrices are factored without subtraction (their row sums are known exactly), and level 0
 * is solved by GTH, so the result keeps full relative accuracy even when levels differ by e^±100.
 */
export function solveEnvironmentLossChain(
  servers: number,
  phases: number,
  phaseRates: Float64Array,
  upRates: Float64Array,
  mu: number,
  /** departure rate at level j (default j μ; a waiting room with patience: min(j, N) μ + (j − N)⁺ α) */
  death: (j: number) => number = (j) => j * mu,
): Float64Array {
  const k = phases;
  const n = servers;
  const kk = k * k;
  const r = new Float64Array((n + 1) * kk); // R_j stored at j*kk, j = 1..N
  const off = new Float64Array(kk);
  const slack = new Float64Array(k);
  const factor = new Float64Array(kk);
  const unit = new Float64Array(k);
  const row = new Float64Array(k);
  for (let j = n; j >= 1; j--) {
    // M_j = -(D_j + (j+1) μ R_{j+1}) is an M-matrix with row sums exactly j μ (because (j+1) μ R_{j+1} 1 = λ);
    // its diagonal is rebuilt from the off-diagonals and that slack, so no subtraction ever occurs (GTH idea).
    const next = (j + 1) * kk;
    const c = death(j + 1);
    for (let i = 0; i < k; i++) {
      slack[i] = death(j);
      for (let l = 0; l < k; l++) off[i * k + l] = i === l ? 0 : phaseRates[i * k + l] + (j < n ? c * r[next + i * k + l] : 0);
    }
    factorMMatrix(off, slack, factor, k);
    const base = j * kk;
    for (let i = 0; i < k; i++) {
      const lambda = upRates[i];
      if (lambda === 0) continue;
      unit.fill(0);
      unit[i] = lambda;
      solveRowMMatrix(factor, unit, row, k);
      for (let l = 0; l < k; l++) r[base + i * k + l] = row[l];
    }
  }
  // Level 0: π_0 G = 0 with G = D_0 + μ R_1 a generator; GTH on its off-diagonal rates.
  const g = new Float64Array(kk);
  for (let i = 0; i < k; i++) for (let l = 0; l < k; l++) if (i !== l) g[i * k + l] = phaseRates[i * k + l] + (n > 0 ? death(1) * r[kk + i * k + l] : 0);
  const pi0 = gthStationary(g, k);
  if (!pi0) throw new Error("level-0 generator is reducible");
  const pi = new Float64Array((n + 1) * k);
  const logScale = new Float64Array(n + 1);
  let level: Float64Array = pi0;
  let levelScale = 0;
  for (let j = 0; j <= n; j++) {
    if (j > 0) {
      const nextLevel = new Float64Array(k);
      const base = j * kk;
      for (let i = 0; i < k; i++) {
        const v = level[i];
        if (v === 0) continue;
        for (let l = 0; l < k; l++) nextLevel[l] += v * r[base + i * k + l];
      }
      level = nextLevel;
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
    if (levelScale === -Infinity) {
      for (let jj = j + 1; jj <= n; jj++) logScale[jj] = -Infinity;
      break;
    }
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

/**
 * LU of the M-matrix with off-diagonal entries -off[i][l] (off >= 0) and row sums slack[i] >= 0,
 * without pivoting and without subtraction: Schur complements keep nonnegative off-diagonals and
 * slacks, and each pivot is slack + Σ off-diagonals. out holds U (upper, incl. diagonal) and the
 * multipliers |L| (strictly lower) as magnitudes.
 */
function factorMMatrix(off: Float64Array, slack: Float64Array, out: Float64Array, k: number): void {
  const a = out;
  a.set(off);
  const s = Float64Array.from(slack);
  for (let p = 0; p < k; p++) {
    let pivot = s[p];
    for (let l = p + 1; l < k; l++) pivot += a[p * k + l];
    // the already eliminated columns (l < p) are folded into s[p] below
    if (!(pivot > 0)) throw new Error("singular M-matrix in level reduction");
    a[p * k + p] = pivot;
    for (let i = p + 1; i < k; i++) {
      const m = a[i * k + p] / pivot; // |L_ip|
      a[i * k + p] = m;
      if (m === 0) continue;
      for (let l = p + 1; l < k; l++) a[i * k + l] += m * a[p * k + l];
      // row i lost its entry in column p (−off_ip) and gained −m × (row p); net row-sum change is m s_p
      s[i] += m * s[p];
    }
  }
}

/** Solves y M = b for b >= 0 with the factor of factorMMatrix (M = L U); all steps are additions. */
function solveRowMMatrix(a: Float64Array, b: Float64Array, y: Float64Array, k: number): void {
  // z U = b
  const z = y;
  for (let l = 0; l < k; l++) {
    let v = b[l];
    for (let i = 0; i < l; i++) v += z[i] * a[i * k + l];
    z[l] = v / a[l * k + l];
  }
  // y L = z, L unit lower with entries −|L|
  for (let i = k - 1; i >= 0; i--) {
    let v = z[i];
    for (let l = i + 1; l < k; l++) v += y[l] * a[l * k + i];
    y[i] = v;
  }
}

/** Stationary distribution of a generator from its off-diagonal rates, Grassmann–Taksar–Heyman (1985) elimination. */
export function gthStationary(rates: Float64Array, k: number): Float64Array | null {
  const q = Float64Array.from(rates);
  for (let i = 0; i < k; i++) q[i * k + i] = 0;
  for (let l = k - 1; l >= 1; l--) {
    let s = 0;
    for (let j = 0; j < l; j++) s += q[l * k + j];
    if (!(s > 0)) return null;
    for (let i = 0; i < l; i++) q[i * k + l] /= s;
    for (let i = 0; i < l; i++) {
      const f = q[i * k + l];
      if (f === 0) continue;
      for (let j = 0; j < l; j++) if (j !== i) q[i * k + j] += f * q[l * k + j];
    }
  }
  const pi = new Float64Array(k);
  pi[0] = 1;
  for (let l = 1; l < k; l++) {
    let v = 0;
    for (let i = 0; i < l; i++) v += pi[i] * q[i * k + l];
    pi[l] = v;
  }
  let total = 0;
  for (let i = 0; i < k; i++) total += pi[i];
  for (let i = 0; i < k; i++) pi[i] /= total;
  return pi;
}

/** Irreducible iff every phase reaches and is reached from phase 0 along positive off-diagonal rates. */
export function phasesAreIrreducible(k: number, rate: (from: number, to: number) => number): boolean {
  const reach = (forward: boolean) => {
    const seen = new Array<boolean>(k).fill(false);
    const stack = [0];
    seen[0] = true;
    while (stack.length) {
      const i = stack.pop()!;
      for (let l = 0; l < k; l++) {
        if (l !== i && (forward ? rate(i, l) : rate(l, i)) > 0 && !seen[l]) {
          seen[l] = true;
          stack.push(l);
        }
      }
    }
    return seen.every(Boolean);
  };
  return reach(true) && reach(false);
}

/** Stationary distribution θ of a small irreducible generator, or null if it is reducible. */
export function phaseStationary(phaseRates: Float64Array, k: number): Float64Array | null {
  if (!phasesAreIrreducible(k, (i, l) => phaseRates[i * k + l])) return null;
  return gthStationary(phaseRates, k);
}

/** Stationary law of a small irreducible generator given by its off-diagonal rates (GTH), as a plain array. */
export function stationaryOfGenerator(switching: number[][]): number[] {
  const k = switching.length;
  if (k === 1) return [1];
  const rates = new Float64Array(k * k);
  for (let i = 0; i < k; i++) for (let j = 0; j < k; j++) rates[i * k + j] = i === j ? 0 : switching[i][j];
  const theta = phaseStationary(rates, k);
  if (!theta) throw inputError("switching", "the phase process must be irreducible (every phase reachable from every other)");
  return Array.from(theta);
}

/** Sparse autonomous phase process: transitions into phase l are inFrom/inRate[inStart[l] .. inStart[l+1]). */
export interface SparsePhaseProcess {
  phases: number;
  inStart: Int32Array;
  inFrom: Int32Array;
  inRate: Float64Array;
  outRate: Float64Array;
}

/**
 * Same chain as solveEnvironmentLossChain, solved by Gauss–Seidel sweeps (level by level, phase by
 * phase) for phase spaces too large for dense k×k blocks. Levels 0..capacity (calls at the group;
 * those beyond the servers wait), leaving level j at rate death[j] (busy servers × μ plus waiting
 * calls × patience rate). Stops when a sweep changes π by at most `tolerance` in L1, the
 * arrival-weighted mass of the top level changes by at most 1e-12 relative, and the residual
 * ‖πQ‖₁ / max rate is below 1e-11; returns null if that does not happen within maxSweeps (the
 * caller reports non-convergence; no partial result is used).
 */
export function gaussSeidelEnvironmentLossChain(
  capacity: number,
  process: SparsePhaseProcess,
  upRates: Float64Array,
  death: Float64Array,
  initial: Float64Array,
  tolerance: number,
  maxSweeps: number,
): { pi: Float64Array; sweeps: number; residual: number } | null {
  const k = process.phases;
  const n = capacity;
  const { outRate } = process;
  const pi = Float64Array.from(initial);
  let maxRate = 0;
  for (let l = 0; l < k; l++) maxRate = Math.max(maxRate, outRate[l] + upRates[l] + death[n]);
  // the top level carries the blocking, often tiny: its arrival-weighted mass must settle too
  let previousTop = -1;
  for (let sweep = 1; sweep <= maxSweeps; sweep++) {
    let change = 0;
    for (let j = 0; j <= n; j++) {
      const base = j * k;
      for (let l = 0; l < k; l++) {
        const inflow = environmentInflow(n, process, upRates, death, pi, j, l);
        const out = outRate[l] + (j < n ? upRates[l] : 0) + death[j];
        const value = out > 0 ? inflow / out : pi[base + l];
        change += Math.abs(value - pi[base + l]);
        pi[base + l] = value;
      }
    }
    let total = 0;
    for (let s = 0; s < pi.length; s++) total += pi[s];
    for (let s = 0; s < pi.length; s++) pi[s] /= total;
    let top = 0;
    for (let l = 0; l < k; l++) top += pi[n * k + l] * upRates[l];
    const topSettled = Math.abs(top - previousTop) <= 1e-12 * top;
    previousTop = top;
    if (change / total <= tolerance && topSettled) {
      const residual = environmentResidual(n, process, upRates, death, pi) / maxRate;
      if (residual <= 1e-11) return { pi, sweeps: sweep, residual };
    }
  }
  return null;
}

/** Probability flow into state (level j, phase l) of the environment loss chain. */
function environmentInflow(n: number, process: SparsePhaseProcess, upRates: Float64Array, death: Float64Array, pi: Float64Array, j: number, l: number): number {
  const k = process.phases;
  const { inStart, inFrom, inRate } = process;
  const base = j * k;
  let inflow = 0;
  for (let e = inStart[l]; e < inStart[l + 1]; e++) inflow += pi[base + inFrom[e]] * inRate[e];
  if (j > 0) inflow += pi[base - k + l] * upRates[l];
  if (j < n) inflow += pi[base + k + l] * death[j + 1];
  return inflow;
}

/** ‖π Q‖₁ for the environment loss chain. */
function environmentResidual(n: number, process: SparsePhaseProcess, upRates: Float64Array, death: Float64Array, pi: Float64Array): number {
  const k = process.phases;
  const { outRate } = process;
  let residual = 0;
  for (let j = 0; j <= n; j++) {
    for (let l = 0; l < k; l++) {
      const inflow = environmentInflow(n, process, upRates, death, pi, j, l);
      residual += Math.abs(inflow - pi[j * k + l] * (outRate[l] + (j < n ? upRates[l] : 0) + death[j]));
    }
  }
  return residual;
}
