/**
 * MSER-5 truncation point (White, Simulation 69(6), 1997; Franklin & White, WSC 2008):
 * raw observations are averaged in batches of 5, and the warm-up d (in batches) minimises
 * sum_{j>=d} (Z_j - Zbar_d)^2 / (m - d)^2 over the first half of the m batches.
 * Returns the number of raw observations to discard.
 */
export function mser5(observations: ArrayLike<number>): number {
  return mser5Cut(observations).discard;
}

/**
 * MSER-5 with its diagnosis: `atBound` when the minimum falls on the last admissible point
 * (half the batches), the sign that the series was still settling when the pilot ended, so the
 * rule's answer is a bound, not a truncation point (Franklin & White 2008 treat it as a failure).
 */
export function mser5Cut(observations: ArrayLike<number>): { discard: number; atBound: boolean } {
  const m = Math.floor(observations.length / 5);
  if (m < 2) return { discard: 0, atBound: false };
  const z = new Float64Array(m);
  for (let j = 0; j < m; j++) {
    let s = 0;
    for (let i = 0; i < 5; i++) s += observations[5 * j + i];
    z[j] = s / 5;
  }
  // Suffix sums give every candidate d in one pass.
  let best = 0;
  let bestValue = Infinity;
  let sum = 0;
  let sumSq = 0;
  const values = new Float64Array(m);
  for (let j = m - 1; j >= 0; j--) {
    sum += z[j];
    sumSq += z[j] * z[j];
    const count = m - j;
    const ss = Math.max(0, sumSq - (sum * sum) / count);
    values[j] = ss / (count * count);
  }
  const last = Math.floor(m / 2);
  for (let d = 0; d <= last; d++) {
    if (values[d] < bestValue) {
      bestValue = values[d];
      best = d;
    }
  }
  return { discard: best * 5, atBound: best === last && last > 0 };
}
