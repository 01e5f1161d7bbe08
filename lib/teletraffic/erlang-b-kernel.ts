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
  if (steps === 0) return { blocking: Math.exp(logB0), logBlocking: logB0 }; // a fractional group below 1
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
  // Deep tail, below the float range of B: ln(1/B(x)) = ln(1/B(x-1)) + ln(x/A) + ln1p(A B(x-1) / x).
  // Here B(x−1) < 1e-280 and A <= 1e7, so every ln1p term is below 1e-272, far under one ulp of
  // ln(1/B) >= 644: the remaining r steps add exactly Σ ln((x + j)/A) = ln Γ(x+r+1) − ln Γ(x+1) − r ln A.
  // Why the closed form: the loop below costs three transcendentals per step; N = 100 000 at A = 1000
  // walked 98 000 of them per call (time-varying-loss, 1000 segments: 51 s). ln Γ is correct to about an
  // ulp (FreeBSD lgamma via @stdlib), so the closed form is no less accurate than r rounded additions.
  const logA = Math.log(traffic);
  const remaining = steps - k;
  if (remaining > DEEP_TAIL_LOOP) {
    logInv += lnGamma(x + remaining + 1) - lnGamma(x + 1) - remaining * logA;
    return { blocking: Math.exp(-logInv), logBlocking: -logInv };
  }
  for (; k < steps; k++) {
    x += 1;
    logInv += Math.log(x) - logA + Math.log1p(Math.exp(logA - logInv) / x);
  }
  return { blocking: Math.exp(-logInv), logBlocking: -logInv };
}

/** Deep-tail steps walked one by one; longer tails use the ln Γ closed form. */
const DEEP_TAIL_LOOP = 32;

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

/**
 * B(f, A) and 1 − B(f, A) for 0 < f < 1, A > 0, from the incomplete-gamma continuation
 * B(f, A) = A^f e^-A / Γ(f+1, A) (Jagerman 1974). With Γ(f+1, A) = f Γ(f, A) + A^f e^-A,
 *   1/B = 1 + u,  1 − B = u / (1 + u),  u = f e^A A^-f Γ(f, A) >= 0,
 * so B stays in (0, 1] and 1 − B is never formed by a subtraction (B → 1 as f → 0: the old
 * Γ(a) − γ(a, A) form gave B = 1 + 2e-16 at f = 1e-16, A = 1, and 1 − B with 4e-4 relative error at
 * f = 1e-12). Γ(f, A) = e^-A A^f h_f by Lentz's continued fraction above A = 1.5, by
 * `upperGammaSmallShape` below. Returns ln(1/B) and 1 − B; `perServer` is
 * A (1 − B)/f = A e^A A^-f Γ(f, A) B, the carried traffic per server without dividing by f.
 */
function fractionalStart(f: number, traffic: number): { logInverse: number; complement: number; perServer: number } {
  // G = e^A A^-f Γ(f, A), a product of correctly rounded factors (for A > 1.5 the continued fraction
  // gives G = h_f directly); in logs only where A^-f overflows (A near the smallest double, f near 1)
  const g = traffic > 1.5 ? upperGammaContinuedFraction(f, traffic) : Math.exp(traffic) * Math.pow(traffic, -f) * upperGammaSmallShape(f, traffic);
  if (Number.isFinite(g)) {
    const u = f * g;
    return { logInverse: Math.log1p(u), complement: u / (1 + u), perServer: traffic * (g / (1 + u)) };
  }
  const logG = traffic - f * Math.log(traffic) + Math.log(upperGammaSmallShape(f, traffic));
  const logU = Math.log(f) + logG; // u > 1e300 here: 1/B = u (1 + 1/u)
  const logInverse = logU + Math.log1p(Math.exp(-logU));
  return { logInverse, complement: 1 / (1 + Math.exp(-logU)), perServer: traffic * Math.exp(logG - logInverse) };
}

/**
 * Taylor coefficients of 1/Γ(1+z) = Σ c_k z^k (Abramowitz & Stegun 6.1.34, after Wrench 1968; the
 * values recomputed to 20 digits with mpmath), k = 1..26; the series is entire and at |z| <= 1 the
 * terms left off are below 2e-18.
 */
const RECIPROCAL_GAMMA = [
  0.57721566490153286061, -0.65587807152025388108, -0.042002635034095235529, 0.1665386113822914895, -0.042197734555544336748,
  -0.0096219715278769735621, 0.0072189432466630995424, -0.0011651675918590651121, -0.00021524167411495097282, 0.00012805028238811618615,
  -0.000020134854780788238656, -1.2504934821426706573e-6, 1.1330272319816958824e-6, -2.0563384169776071035e-7, 6.1160951044814158179e-9,
  5.0020076444692229301e-9, -1.1812745704870201446e-9, 1.0434267116911005105e-10, 7.782263439905071254e-12, -3.6968056186422057082e-12,
  5.100370287454475979e-13, -2.0583260535665067832e-14, -5.3481225394230179824e-15, 1.2267786282382607902e-15, -1.1812593016974587695e-16,
  1.1866922547516003326e-18,
];

/**
 * Γ(f, A) for 0 < f < 1, 0 < A <= 1.5, without the cancellation of Γ(f) − γ(f, A) as f → 0 (both
 * near 1/f): γ(f, A) = A^f Σ_{n>=0} (−A)^n / (n! (f + n)), so
 *   Γ(f, A) = (Γ(1+f) − 1)/f − (A^f − 1)/f − A^f Σ_{n>=1} (−A)^n / (n! (f + n)),
 * with (A^f − 1)/f = expm1(f ln A)/f and (Γ(1+f) − 1)/f = −R Γ(1+f), 1/Γ(1+f) = 1 + f R, R from the
 * series above (the small-shape treatment of DiDonato & Morris 1986, "Computation of the incomplete
 * gamma function ratios and their inverse", ACM TOMS 12; the power series of γ: Abramowitz & Stegun, section 6.5).
 * Used for A <= 1.5: the sum's cancellation costs at most about one digit there.
 */
function upperGammaSmallShape(f: number, traffic: number): number {
  let r = 0;
  for (let k = RECIPROCAL_GAMMA.length - 1; k >= 0; k--) r = r * f + RECIPROCAL_GAMMA[k];
  const gammaOnePlusF = 1 / (1 + f * r);
  const head = -r * gammaOnePlusF - Math.expm1(f * Math.log(traffic)) / f;
  let term = 1;
  let sum = 0;
  for (let n = 1; n < 200; n++) {
    term *= -traffic / n;
    const add = term / (f + n);
    sum += add;
    if (Math.abs(add) < 1e-17 * Math.abs(sum)) break;
  }
  return head - Math.exp(f * Math.log(traffic)) * sum;
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
 * 1 − B(N, A) without the cancellation of 1 − B when B is near 1 (A ≫ N, or real N near 0). For N >= 1
 * the recursion gives 1 − B(N) = N / (N + A B(N−1)); for 0 < N < 1, 1 − B = u/(1 + u) from the
 * continuation (`fractionalStart`).
 */
export function erlangBComplementUnchecked(servers: number, traffic: number): number {
  if (servers === 0) return 0;
  if (traffic === 0) return 1;
  if (servers >= 1) return servers / (servers + traffic * erlangBUnchecked(servers - 1, traffic));
  return fractionalStart(servers, traffic).complement;
}

/**
 * Carried traffic per server A (1 − B)/N, finite and in [0, 1]. For 0 < N < 1 it is A e^A A^-N Γ(N, A) B,
 * computed without dividing by N, so it tends to A e^A E_1(A) (< 1) as N → 0+ (at N = 1e-300, A = 1:
 * 0.596) instead of dividing a rounded 1 − B by N. N = 0 exactly: no servers, reported as 0.
 */
export function erlangBCarriedPerServerUnchecked(servers: number, traffic: number): number {
  if (servers === 0 || traffic === 0) return 0;
  if (servers >= 1) return (traffic * erlangBComplementUnchecked(servers, traffic)) / servers;
  return fractionalStart(servers, traffic).perServer;
}

function erlangBBoth(servers: number, traffic: number): { blocking: number; logBlocking: number } {
  if (servers === 0) return { blocking: 1, logBlocking: 0 };
  if (traffic === 0) return { blocking: 0, logBlocking: -Infinity };
  const whole = Math.floor(servers);
  const frac = servers - whole;
  if (frac === 0) return walkUp(0, 0, traffic, whole);
  return walkUp(frac, -fractionalStart(frac, traffic).logInverse, traffic, whole);
}

/** ln B(x, A) for real x >= 0, A >= 0. */
export function logErlangBUnchecked(servers: number, traffic: number): number {
  return erlangBBoth(servers, traffic).logBlocking;
}

export function erlangBUnchecked(servers: number, traffic: number): number {
  return erlangBBoth(servers, traffic).blocking;
}
