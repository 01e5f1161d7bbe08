import { lnGamma } from "./numeric";

// Unchecked Erlang B kernels (inputs already validated), apart from erlang-b.ts's zod input schemas so
// the simulation engine's threads can load them without zod. Below B = 1e-280 they carry ln B, so nothing
// underflows.

export const TINY = 1e-280;
const LOG_TINY = Math.log(TINY);

/** B and ln B after walking B(x+1) = A B(x) / (x + 1 + A B(x)) `steps` times from ln B(x0). */
function walkUp(x0: number, logB0: number, traffic: number, steps: number): { blocking: number; logBlocking: number } {
  let x = x0;
  let k = 0;
  let logInv = -logB0;
  if (logB0 > LOG_TINY) {
    let b = Math.exp(logB0);
    for (; k < steps; k++) {
      const ab = traffic * b;
      const next = ab / (x + 1 + ab);
      if (next < TINY) break;
      b = next;
      x += 1;
    }
    if (k === steps) return { blocking: b, logBlocking: Math.log(b) };
    logInv = -Math.log(b);
  }
  // Deep tail, below the float range of B: ln(1/B(x)) = ln(1/B(x-1)) + ln(x/A) + ln1p(A B(x-1) / x)
  const logA = Math.log(traffic);
  for (; k < steps; k++) {
    x += 1;
    logInv += Math.log(x) - logA + Math.log1p(Math.exp(logA - logInv) / x);
  }
  return { blocking: Math.exp(-logInv), logBlocking: -logInv };
}

/** One step of the recursion on ln B, safe at any magnitude. */
export function stepLogB(logB: number, x: number, traffic: number): number {
  if (logB > LOG_TINY) {
    const ab = traffic * Math.exp(logB);
    const next = ab / (x + ab);
    if (next >= TINY) return Math.log(next);
  }
  const logA = Math.log(traffic);
  return logB - (Math.log(x) - logA + Math.log1p(Math.exp(logA + logB) / x));
}

/** ln(1/B(f, A)) = ln(A^-f e^A Γ(f+1, A)) for 0 < f < 1, A > 0: series below a+1, Lentz continued fraction above. */
function logInverseFractionalStart(f: number, traffic: number): number {
  const a = f + 1;
  if (traffic < a + 1) {
    // Γ(a,A) = Γ(a) - γ(a,A), γ(a,A) = A^a e^-A Σ A^n / (a (a+1) ... (a+n)); so 1/B = e^A A^-f Γ(a) - A Σ
    let term = 1 / a;
    let sum = term;
    for (let n = 1; n < 1000; n++) {
      term *= traffic / (a + n);
      sum += term;
      if (term < sum * 1e-17) break;
    }
    const logHead = traffic - f * Math.log(traffic) + lnGamma(a);
    return logHead + Math.log1p(-traffic * sum * Math.exp(-logHead));
  }
  // Γ(a,A) = e^-A A^a h, so 1/B = A^-f e^A Γ(a,A) = A h
  return Math.log(traffic * upperGammaContinuedFraction(a, traffic));
}

/** h with Γ(a, x) = e^-x x^a h: Lentz's continued fraction (Numerical Recipes), for x > 0, fast when x > a + 1. */
function upperGammaContinuedFraction(a: number, traffic: number): number {
  const fpmin = 1e-300;
  let b = traffic + 1 - a;
  let c = 1 / fpmin;
  let d = 1 / b;
  let h = d;
  for (let i = 1; i < 10_000; i++) {
    const an = -i * (i - a);
    b += 2;
    d = an * d + b;
    if (Math.abs(d) < fpmin) d = fpmin;
    c = b + an / c;
    if (Math.abs(c) < fpmin) c = fpmin;
    d = 1 / d;
    const del = d * c;
    h *= del;
    if (Math.abs(del - 1) < 1e-16) break;
  }
  return h;
}

/**
 * 1 − B(N, A) without the cancellation of 1 − B when B is near 1 (A ≫ N). For N >= 1 the recursion
 * gives 1 − B(N) = N / (N + A B(N−1)); for 0 < N < 1, Γ(N+1, A) = N Γ(N, A) + A^N e^-A gives
 * 1 − B(N) = N Γ(N, A) / Γ(N+1, A) = N h_N B(N) with Γ(a, A) = e^-A A^a h_a (continued fraction;
 * below A = N + 2 the blocking is at most about 0.8 and 1 − B is used as is).
 */
export function erlangBComplementUnchecked(servers: number, traffic: number): number {
  if (servers === 0) return 0;
  if (traffic === 0) return 1;
  if (servers >= 1) return servers / (servers + traffic * erlangBUnchecked(servers - 1, traffic));
  const blocking = erlangBUnchecked(servers, traffic);
  if (traffic < servers + 2) return 1 - blocking;
  return servers * upperGammaContinuedFraction(servers, traffic) * blocking;
}

function erlangBBoth(servers: number, traffic: number): { blocking: number; logBlocking: number } {
  if (servers === 0) return { blocking: 1, logBlocking: 0 };
  if (traffic === 0) return { blocking: 0, logBlocking: -Infinity };
  const whole = Math.floor(servers);
  const frac = servers - whole;
  if (frac === 0) return walkUp(0, 0, traffic, whole);
  return walkUp(frac, -logInverseFractionalStart(frac, traffic), traffic, whole);
}

/** ln B(x, A) for real x >= 0, A >= 0. */
export function logErlangBUnchecked(servers: number, traffic: number): number {
  return erlangBBoth(servers, traffic).logBlocking;
}

export function erlangBUnchecked(servers: number, traffic: number): number {
  return erlangBBoth(servers, traffic).blocking;
}
