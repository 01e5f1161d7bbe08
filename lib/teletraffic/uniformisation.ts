// Uniformisation of a continuous-time chain over a segment of constant rates (Jensen 1953; Grassmann
// 1977, Computers & Operations Research 4): the Poisson(θ) weights of its terms, shared by every
// periodic solver (periodic-loss.ts, periodic-retrial.ts).

/** Λτ per uniformisation step: large enough that the Poisson spread costs little (about 2.1 × Λτ terms per step). */
export const STEP_MEAN = 100;
/** Tail mass of the Poisson weights left out per step. */
const STEP_TAIL = 1e-25;

/**
 * Poisson(θ) weights w_k for k = 0..K, cut where the mass left beyond K is below STEP_TAIL, with
 * P(X > k) for each k and a bound on the left-out mass (shared by every uniformised periodic chain).
 */
export function uniformisationWeights(theta: number): { weights: Float64Array; tail: Float64Array; massLeft: number } {
  const weights: number[] = [];
  let w = Math.exp(-theta);
  let k = 0;
  let leftBound = Infinity;
  for (;;) {
    weights.push(w);
    // Σ_{j>k} w_j <= w_{k+1} / (1 − θ/(k+2)) once k + 2 > θ (ratios θ/j below θ/(k+2)).
    const next = (w * theta) / (k + 1);
    if (k + 2 > theta) {
      leftBound = next / (1 - theta / (k + 2));
      if (leftBound <= STEP_TAIL) break;
    }
    w = next;
    k++;
  }
  const tail = new Float64Array(weights.length);
  let c = 0;
  for (let j = 0; j < weights.length; j++) {
    c += weights[j];
    tail[j] = Math.max(0, 1 - c);
  }
  return { weights: Float64Array.from(weights), tail, massLeft: leftBound };
}

