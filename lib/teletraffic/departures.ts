/**
 * Rate at which calls leave a group with N servers holding k calls, those beyond N waiting:
 * min(k, N) μ by service plus (k − N)⁺ α by abandonment (α = 1/mean patience, 0 without). Shared by
 * every Markov chain of a group with a waiting room (retrial, batch, renewal, overflow, periodic).
 */
export function departureRate(calls: number, servers: number, mu: number, alpha: number): number {
  return Math.min(calls, servers) * mu + Math.max(0, calls - servers) * alpha;
}
