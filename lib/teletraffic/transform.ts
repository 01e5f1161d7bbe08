import { hyperexponentialBranches, lawMean, weibullParameters, type Law } from "./laws";
import { log1mexp, logAddExp } from "./numeric";

/**
 * ln φ(s) and ln(1 − φ(s)) of the Laplace–Stieltjes transform φ(s) = E[e^{−sX}] of a law, each
 * without cancellation. Closed forms where they exist; lognormal, Weibull and Pareto are
 * integrated numerically (trapezoid rule on the whole line after a change of variable that makes
 * the integrand smooth and unimodal; the rule converges geometrically for such integrands,
 * Trefethen & Weideman 2014, SIAM Review 56), the step halved until the value settles to 1e-14.
 * Stated accuracy of the numerical forms: relative 1e-12 in φ and 1 − φ (checked in the tests
 * against closed forms and an independent Simpson quadrature in x).
 */
export interface TransformLogs {
  mean: number;
  /** Work units per evaluation (1 for closed forms), for the interactive cost estimate. */
  cost: number;
  exact: "closed form" | "numerical";
  logs(s: number): { logPhi: number; logOneMinusPhi: number };
}

/**
 * Cost of one numerical transform evaluation, in the same units as one closed-form evaluation
 * (measured integrand evaluations: lognormal about 200, Weibull about 450, Pareto 500–3 500, its
 * cliff needing several halvings of the step).
 */
const NUMERICAL_COST = 400;
const PARETO_COST = 3000;

function gammaLogs(shape: number, mean: number): TransformLogs {
  return {
    mean,
    cost: 1,
    exact: "closed form",
    logs(s) {
      // ln φ = −shape ln(1 + x), x = mean s / shape, written as −mean s · ln(1 + x)/x. Why: for
      // cv below about 1e-154, shape = 1/cv² is Infinity and −Infinity · ln1p(0) was NaN; the
      // rewritten form tends to the deterministic −mean s.
      const x = (mean / shape) * s;
      const logPhi = -mean * s * (x === 0 ? 1 : Math.log1p(x) / x);
      return { logPhi, logOneMinusPhi: log1mexp(logPhi) };
    },
  };
}

/**
 * ln ∫ exp(g(t)) dt for a smooth unimodal g on the real line: locate the mode (expanding bracket,
 * then golden section), take the step from the curvature there, and sum the trapezoid rule
 * outwards until the terms fall below e^-50 of the peak.
 */
export function logIntegralUnimodal(g: (t: number) => number, start: number, width = 1): number {
  // bracket the mode: walk uphill with doubling steps until g falls again
  let a = start - width;
  let m = start;
  let b = start + width;
  let gm = g(m);
  const right = g(b) > gm;
  const sign = right ? 1 : -1;
  if (!right && !(g(a) > gm)) {
    // already bracketed
  } else {
    let step = width;
    let prev = m;
    let cur = m + sign * step;
    let gc = g(cur);
    for (let i = 0; i < 2000 && gc > gm; i++) {
      prev = m;
      m = cur;
      gm = gc;
      step *= 2;
      cur = m + sign * step;
      gc = g(cur);
    }
    a = Math.min(prev, cur);
    b = Math.max(prev, cur);
  }
  // golden section on [a, b]
  const ratio = (Math.sqrt(5) - 1) / 2;
  let x1 = b - ratio * (b - a);
  let x2 = a + ratio * (b - a);
  let g1 = g(x1);
  let g2 = g(x2);
  for (let i = 0; i < 200 && b - a > 1e-9 * Math.max(1, Math.abs(a) + Math.abs(b)); i++) {
    if (g1 >= g2) {
      b = x2;
      x2 = x1;
      g2 = g1;
      x1 = b - ratio * (b - a);
      g1 = g(x1);
    } else {
      a = x1;
      x1 = x2;
      g1 = g2;
      x2 = a + ratio * (b - a);
      g2 = g(x2);
    }
  }
  const mode = g1 >= g2 ? x1 : x2;
  const peak = Math.max(g1, g2);
  if (!Number.isFinite(peak)) return peak;
  // curvature at the mode from a difference quotient on a scale where it is well resolved
  let delta = 1e-3 * Math.max(1, Math.abs(mode));
  let curvature = 0;
  for (let i = 0; i < 40; i++) {
    curvature = -(g(mode + delta) - 2 * peak + g(mode - delta)) / (delta * delta);
    if (curvature > 0 && delta * Math.sqrt(curvature) < 0.1) break;
    delta /= 4;
  }
  let h = curvature > 0 ? 0.25 / Math.sqrt(curvature) : 0.25 * width;
  /** h Σ exp(g − peak) over mode ± (i + offset) h (offset 0: the mode once, then i >= 1), outwards until negligible. */
  const trapezoid = (offset: number) => {
    let sum = offset === 0 ? 1 : 0;
    for (const direction of [1, -1]) {
      for (let i = offset === 0 ? 1 : 0; i < 200_000; i++) {
        const term = Math.exp(g(mode + direction * (i + offset) * h) - peak);
        sum += term;
        if (term < 2e-22 && i > 4) break;
      }
    }
    return h * sum;
  };
  // The step from the curvature at the mode suits integrands with a wide strip of analyticity; one
  // whose tail falls off a cliff (Pareto: e^{−s x_m exp(e^t/α)}) has a narrow strip there and needs a
  // finer step. Halve (adding the midpoints) until the value changes by less than 1e-14 relative:
  // the rule's error falls geometrically in 1/h, so the halved value is good to well below that.
  let value = trapezoid(0);
  for (let halvings = 0; halvings < 12; halvings++) {
    const refined = (value + trapezoid(0.5)) / 2;
    const change = Math.abs(refined - value) / refined;
    value = refined;
    h /= 2;
    if (change < 1e-14) break;
  }
  return peak + Math.log(value);
}

/** ln φ and ln(1 − φ) from two integrals of the same substitution: base log-density and X(t). */
function numericalLogs(mean: number, logDensity: (t: number) => number, value: (t: number) => number, start: number, width: number, cost = NUMERICAL_COST): TransformLogs {
  return {
    mean,
    cost,
    exact: "numerical",
    logs(s) {
      const logPhi = logIntegralUnimodal((t) => logDensity(t) - s * value(t), start, width);
      if (logPhi < -Math.LN2) return { logPhi, logOneMinusPhi: log1mexp(logPhi) };
      // φ >= 1/2: integrate 1 − e^{−sX} itself (positive, no cancellation)
      const logOneMinusPhi = logIntegralUnimodal((t) => logDensity(t) + Math.log(-Math.expm1(-s * value(t))), start, width);
      return { logPhi: Math.min(logPhi, 0), logOneMinusPhi };
    },
  };
}

/** 1 − (1 − e^{−v})/v for v > 0, without cancellation at small v. */
function oneMinusAverageDecay(v: number): number {
  if (v < 0.1) {
    // v/2 − v²/6 + v³/24 − v⁴/120 + v⁵/720 − v⁶/5040 + v⁷/40320: alternating, error below v⁸/362880
    let term = v / 2;
    let sum = term;
    for (let k = 3; k <= 9; k++) {
      term *= -v / k;
      sum += term;
    }
    return sum;
  }
  return (v + Math.expm1(-v)) / v;
}

export function transformOf(law: Law): TransformLogs {
  switch (law.law) {
    case "exponential":
      return {
        mean: law.mean,
        cost: 1,
        exact: "closed form",
        logs: (s) => ({ logPhi: -Math.log1p(law.mean * s), logOneMinusPhi: Math.log(law.mean * s) - Math.log1p(law.mean * s) }),
      };
    case "erlang":
      return gammaLogs(law.k, law.mean);
    case "gamma":
      return gammaLogs(1 / (law.cv * law.cv), law.mean);
    case "deterministic":
      return { mean: law.value, cost: 1, exact: "closed form", logs: (s) => ({ logPhi: -law.value * s, logOneMinusPhi: log1mexp(-law.value * s) }) };
    case "hyperexponential": {
      const branches = hyperexponentialBranches(law);
      const mean = branches.probabilities.reduce((s, p, i) => s + p * branches.means[i], 0);
      return {
        mean,
        cost: branches.means.length,
        exact: "closed form",
        logs(s) {
          let phi = 0;
          let oneMinus = 0; // Σ p m s / (1 + m s): no subtraction
          for (let i = 0; i < branches.probabilities.length; i++) {
            const ms = branches.means[i] * s;
            phi += branches.probabilities[i] / (1 + ms);
            oneMinus += (branches.probabilities[i] * ms) / (1 + ms);
          }
          return { logPhi: Math.log(phi), logOneMinusPhi: Math.log(oneMinus) };
        },
      };
    }
    case "uniform": {
      const { min: a, max: b } = law;
      const w = b - a;
      return {
        mean: (a + b) / 2,
        cost: 1,
        exact: "closed form",
        logs(s) {
          // φ = e^{−sa} (1 − e^{−sw}) / (sw); 1 − φ = (1 − e^{−sa}) + e^{−sa} (1 − (1 − e^{−sw})/(sw)), both terms >= 0
          const v = s * w;
          const logPhi = -s * a + Math.log(-Math.expm1(-v)) - Math.log(v);
          const logOneMinusPhi = logAddExp(Math.log(-Math.expm1(-s * a)), -s * a + Math.log(oneMinusAverageDecay(v)));
          return { logPhi, logOneMinusPhi };
        },
      };
    }
    case "empirical": {
      const samples = Float64Array.from(law.samples);
      const n = samples.length;
      return {
        mean: lawMean(law),
        cost: n,
        exact: "closed form",
        logs(s) {
          let min = Infinity;
          for (let i = 0; i < n; i++) if (samples[i] < min) min = samples[i];
          let sum = 0;
          for (let i = 0; i < n; i++) sum += Math.exp(-s * (samples[i] - min));
          const logPhi = -s * min + Math.log(sum / n);
          if (logPhi < -Math.LN2) return { logPhi, logOneMinusPhi: log1mexp(logPhi) };
          let rest = 0;
          for (let i = 0; i < n; i++) rest -= Math.expm1(-s * samples[i]);
          return { logPhi, logOneMinusPhi: Math.log(rest / n) };
        },
      };
    }
    case "lognormal":
    case "weibull":
    case "pareto": {
      const u = smoothSubstitution(law);
      return numericalLogs(lawMean(law), u.logDensity, u.value, 0, 1, law.law === "pareto" ? PARETO_COST : NUMERICAL_COST);
    }
  }
}

/**
 * The change of variable that makes the laws without a closed-form transform smooth and unimodal
 * on the real line: X = value(t), t with log-density logDensity (shared with the mixed Poisson
 * probabilities of renewal-queue.ts).
 */
export function smoothSubstitution(law: Extract<Law, { law: "lognormal" | "weibull" | "pareto" }>): { logDensity: (t: number) => number; value: (t: number) => number } {
  switch (law.law) {
    case "lognormal": {
      // X = exp(m + σ Z), Z standard normal
      const sigma2 = Math.log1p(law.cv * law.cv);
      const sigma = Math.sqrt(sigma2);
      const m = Math.log(law.mean) - sigma2 / 2;
      const logNorm = -0.5 * Math.log(2 * Math.PI);
      return { logDensity: (z) => logNorm - 0.5 * z * z, value: (z) => Math.exp(m + sigma * z) };
    }
    case "weibull": {
      // X = scale E^{1/k}, E = e^t standard exponential: density of t is exp(t − e^t)
      const { shape, scale } = weibullParameters(law);
      return { logDensity: (t) => t - Math.exp(t), value: (t) => scale * Math.exp(t / shape) };
    }
    case "pareto": {
      // X = x_m e^{E/α}, E = e^t standard exponential
      const alpha = law.shape;
      const xm = (law.mean * (alpha - 1)) / alpha;
      return { logDensity: (t) => t - Math.exp(t), value: (t) => xm * Math.exp(Math.exp(t) / alpha) };
    }
  }
}
