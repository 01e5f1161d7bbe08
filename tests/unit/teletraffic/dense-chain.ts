/**
 * Naive reference for the tests: stationary distribution of a small CTMC by dense Gaussian
 * elimination of π Q = 0 with one balance equation replaced by Σ π = 1. Deliberately written
 * without any of the structure the library exploits.
 */
export function denseStationary(states: number, transitions: Array<[from: number, to: number, rate: number]>): number[] {
  const q: number[][] = Array.from({ length: states }, () => new Array<number>(states).fill(0));
  for (const [from, to, rate] of transitions) {
    if (from === to || rate === 0) continue;
    q[from][to] += rate;
    q[from][from] -= rate;
  }
  // Solve Q^T π = 0 with the last row replaced by ones.
  const a: number[][] = Array.from({ length: states }, (_, i) => Array.from({ length: states }, (_, j) => q[j][i]));
  const b = new Array<number>(states).fill(0);
  a[states - 1] = new Array<number>(states).fill(1);
  b[states - 1] = 1;
  for (let col = 0; col < states; col++) {
    let pivot = col;
    for (let r = col + 1; r < states; r++) if (Math.abs(a[r][col]) > Math.abs(a[pivot][col])) pivot = r;
    [a[col], a[pivot]] = [a[pivot], a[col]];
    [b[col], b[pivot]] = [b[pivot], b[col]];
    for (let r = col + 1; r < states; r++) {
      const f = a[r][col] / a[col][col];
      if (f === 0) continue;
      for (let c = col; c < states; c++) a[r][c] -= f * a[col][c];
      b[r] -= f * b[col];
    }
  }
  const x = new Array<number>(states).fill(0);
  for (let r = states - 1; r >= 0; r--) {
    let s = b[r];
    for (let c = r + 1; c < states; c++) s -= a[r][c] * x[c];
    x[r] = s / a[r][r];
  }
  return x;
}

/** Exact Erlang B for rational traffic p/q with BigInt: B = p^N / Σ_k p^k q^(N-k) N!/k!. */
export function exactErlangB(servers: number, numerator: bigint, denominator: bigint): number {
  let sum = 0n;
  let falling = 1n; // N!/k! for k = N, N-1, ...
  for (let k = servers; k >= 0; k--) {
    sum += numerator ** BigInt(k) * denominator ** BigInt(servers - k) * falling;
    falling *= BigInt(k);
  }
  return bigRatio(numerator ** BigInt(servers), sum);
}

/** num/den correctly rounded to about 60 bits before the final division. */
export function bigRatio(num: bigint, den: bigint): number {
  const shift = BigInt(den.toString(2).length - num.toString(2).length + 64);
  const scaled = shift >= 0n ? (num << shift) / den : num / (den << -shift);
  return Number(scaled) * 2 ** -Number(shift);
}

export function relativeError(actual: number, expected: number): number {
  return Math.abs(actual - expected) / Math.abs(expected);
}

/**
 * Naive generator of the overflow network: primaries (traffic a_i on n_i servers, overflow to the
 * final group of N servers, lost if that is full), unit mean holding, every state enumerated.
 */
export function denseOverflowNetwork(primaries: Array<{ traffic: number; servers: number }>, servers: number) {
  const dims = [...primaries.map((p) => p.servers + 1), servers + 1];
  const total = dims.reduce((a, b) => a * b, 1);
  const decode = (s: number) => {
    const out: number[] = [];
    for (const d of dims) {
      out.push(s % d);
      s = Math.floor(s / d);
    }
    return out;
  };
  const encode = (v: number[]) => v.reduceRight((acc, x, i) => acc * dims[i] + x, 0);
  const t: Array<[number, number, number]> = [];
  for (let s = 0; s < total; s++) {
    const v = decode(s);
    const j = v[v.length - 1];
    primaries.forEach((p, i) => {
      if (v[i] < p.servers) {
        const w = [...v];
        w[i]++;
        t.push([s, encode(w), p.traffic]);
      } else if (j < servers) {
        const w = [...v];
        w[w.length - 1]++;
        t.push([s, encode(w), p.traffic]);
      }
      if (v[i] > 0) {
        const w = [...v];
        w[i]--;
        t.push([s, encode(w), v[i]]);
      }
    });
    if (j > 0) {
      const w = [...v];
      w[w.length - 1]--;
      t.push([s, encode(w), j]);
    }
  }
  const pi = denseStationary(total, t);
  let offered = 0;
  let lost = 0;
  let full = 0;
  for (let s = 0; s < total; s++) {
    const v = decode(s);
    const overflowRate = primaries.reduce((acc, p, i) => acc + (v[i] === p.servers ? p.traffic : 0), 0);
    offered += pi[s] * overflowRate;
    if (v[v.length - 1] === servers) {
      lost += pi[s] * overflowRate;
      full += pi[s];
    }
  }
  return { blocking: lost / offered, timeCongestion: full, overflowOffered: offered };
}

export type Matrix = number[][];
export const zeros = (n: number): Matrix => Array.from({ length: n }, () => new Array<number>(n).fill(0));
export function multiply(a: Matrix, b: Matrix): Matrix {
  const n = a.length;
  const c = zeros(n);
  for (let i = 0; i < n; i++) for (let k = 0; k < n; k++) if (a[i][k] !== 0) for (let j = 0; j < n; j++) c[i][j] += a[i][k] * b[k][j];
  return c;
}

/** e^A by scaling and squaring with a degree-30 Taylor sum (Moler & Van Loan, SIAM Review 45, 2003, method 3). */
export function expm(a: Matrix): Matrix {
  const n = a.length;
  let norm = 0;
  for (const row of a) norm = Math.max(norm, row.reduce((s, v) => s + Math.abs(v), 0));
  const squarings = Math.max(0, Math.ceil(Math.log2(norm / 0.5)));
  const scale = 2 ** -squarings;
  const scaled = a.map((row) => row.map((v) => v * scale));
  let term: Matrix = zeros(n).map((row, i) => row.map((_, j) => (i === j ? 1 : 0)));
  let sum = term.map((row) => row.slice());
  for (let k = 1; k <= 30; k++) {
    term = multiply(term, scaled).map((row) => row.map((v) => v / k));
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) sum[i][j] += term[i][j];
  }
  for (let s = 0; s < squarings; s++) sum = multiply(sum, sum);
  return sum;
}

/**
 * Periodic steady state of a CTMC whose generator is constant on each segment, by dense linear
 * algebra: each segment's e^{Q d} and ∫_0^d e^{Qs} ds from one exponential of [[Q d, I d], [0, 0]]
 * (Van Loan, IEEE Trans. Automatic Control 23, 1978), the cycle matrix as their product, its
 * stationary vector by Gaussian elimination. Returns the law at each segment start and each
 * segment's occupation integral (expected time in each state).
 */
export function densePeriodic(segments: Array<{ duration: number; transitions: Array<[number, number, number]> }>, states: number): { starts: number[][]; occupations: number[][] } {
  const blocks = segments.map(({ duration, transitions }) => {
    const big = zeros(2 * states);
    for (const [from, to, rate] of transitions) {
      if (from === to || rate === 0) continue;
      big[from][to] += rate * duration;
      big[from][from] -= rate * duration;
    }
    for (let k = 0; k < states; k++) big[k][states + k] = duration;
    const e = expm(big);
    return { transition: e.slice(0, states).map((row) => row.slice(0, states)), integral: e.slice(0, states).map((row) => row.slice(states)) };
  });
  let cycle: Matrix = zeros(states).map((row, i) => row.map((_, j) => (i === j ? 1 : 0)));
  for (const b of blocks) cycle = multiply(cycle, b.transition);
  const t: Array<[number, number, number]> = [];
  for (let i = 0; i < states; i++) for (let j = 0; j < states; j++) if (i !== j) t.push([i, j, cycle[i][j]]);
  let p = denseStationary(states, t);
  const starts: number[][] = [];
  const occupations: number[][] = [];
  for (const b of blocks) {
    starts.push(p);
    occupations.push(Array.from({ length: states }, (_, j) => p.reduce((acc, pi, i) => acc + pi * b.integral[i][j], 0)));
    p = Array.from({ length: states }, (_, j) => p.reduce((acc, pi, i) => acc + pi * b.transition[i][j], 0));
  }
  return { starts, occupations };
}
