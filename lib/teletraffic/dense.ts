/**
 * Solves A x = b for a small dense matrix by Gaussian elimination with partial pivoting: the one dense
 * solver for the few-dimensional systems here (peakedness of a phase stream, control-variate weights).
 * Large chains use the structured solvers in qbd.ts and retrial-chain.ts instead.
 */
export function solveDense(a: readonly (readonly number[])[], b: readonly number[]): number[] {
  const k = b.length;
  const m = a.map((row, i) => [...row, b[i]]);
  for (let c = 0; c < k; c++) {
    let p = c;
    for (let r = c + 1; r < k; r++) if (Math.abs(m[r][c]) > Math.abs(m[p][c])) p = r;
    [m[c], m[p]] = [m[p], m[c]];
    for (let r = 0; r < k; r++) {
      if (r === c) continue;
      const f = m[r][c] / m[c][c];
      for (let j = c; j <= k; j++) m[r][j] -= f * m[c][j];
    }
  }
  return m.map((row, i) => row[k] / row[i]);
}
