import gammaln from "@stdlib/math-base-special-gammaln";

export const lnGamma: (x: number) => number = gammaln;

/** log(1 - e^x) for x <= 0 without cancellation (Mächler 2012, "Accurately computing log(1 - exp(-|a|))"). */
export function log1mexp(x: number): number {
  if (x > -Math.LN2) return Math.log(-Math.expm1(x));
  return Math.log1p(-Math.exp(x));
}

/** log(e^a + e^b). */
export function logAddExp(a: number, b: number): number {
  if (a === -Infinity) return b;
  if (b === -Infinity) return a;
  const m = Math.max(a, b);
  return m + Math.log1p(Math.exp(-Math.abs(a - b)));
}

/** Solves x·M = b for a small dense k×k matrix (row-major), Gaussian elimination with partial pivoting. */
export function solveLeft(matrix: Float64Array | number[], rhs: Float64Array | number[], k: number): Float64Array {
  // x M = b  <=>  M^T x^T = b^T
  const a = new Float64Array(k * k);
  for (let i = 0; i < k; i++) for (let j = 0; j < k; j++) a[i * k + j] = matrix[j * k + i];
  const x = Float64Array.from(rhs);
  for (let col = 0; col < k; col++) {
    let pivot = col;
    for (let r = col + 1; r < k; r++) if (Math.abs(a[r * k + col]) > Math.abs(a[pivot * k + col])) pivot = r;
    if (a[pivot * k + col] === 0) throw new Error("singular matrix in block elimination");
    if (pivot !== col) {
      for (let c = 0; c < k; c++) {
        const t = a[col * k + c];
        a[col * k + c] = a[pivot * k + c];
        a[pivot * k + c] = t;
      }
      const t = x[col];
      x[col] = x[pivot];
      x[pivot] = t;
    }
    for (let r = col + 1; r < k; r++) {
      const f = a[r * k + col] / a[col * k + col];
      if (f === 0) continue;
      for (let c = col; c < k; c++) a[r * k + c] -= f * a[col * k + c];
      x[r] -= f * x[col];
    }
  }
  for (let r = k - 1; r >= 0; r--) {
    let s = x[r];
    for (let c = r + 1; c < k; c++) s -= a[r * k + c] * x[c];
    x[r] = s / a[r * k + r];
  }
  return x;
}
