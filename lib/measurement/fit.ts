import seedrandom from "seedrandom";
import { FAMILIES, FAMILY_NAMES, summarise, type FamilyName, type Parameters } from "./laws";

/**
 * Holding-time fits: maximum likelihood for each family, ranked by the Kolmogorov–Smirnov
 * distance D (smallest first), with the Anderson–Darling A² beside it.
 *
 * p-values. The classical Kolmogorov p-value assumes a fully specified law; with parameters
 * estimated from the same sample it is far too large (conservative: Lilliefors 1967, Stephens
 * 1974), so it is not reported. Instead each family gets a parametric-bootstrap p-value
 * (Stute, Manteiga & Quindimil 1993; Babu & Rao 2004): B samples drawn from the fitted law,
 * refitted, and p = (1 + #{D_b ≥ D}) / (B + 1), with the same for A². The bootstrap samples have
 * m = min(n, maxSample) values.
 *  - Continuous data (no recording grid found): √m·D_b is compared with √n·D (A² needs no
 *    scaling): both converge in law as the size grows (Durbin 1973, "Weak convergence of the
 *    sample distribution function when parameters are estimated").
 *  - Durations recorded on a grid δ (whole seconds, tenths, ...; writtenResolution): the draws are
 *    rounded to δ, and zeros dropped as the data's are, so the bootstrap law is the law of the
 *    recorded values. Rounding moves D by about f(x)·δ/2 whatever the size, so √m·D_b and √n·D
 *    no longer share a limit; when m < n the observed statistics are therefore taken on a seeded
 *    random subsample of m values (without replacement, parameters refitted on it, as in each
 *    bootstrap sample), so the observed and bootstrap statistics are of the same size and law.
 * The random stream is seeded, so the p-values are reproducible.
 */
export interface FitOptions {
  replicates?: number;
  seed?: string;
  maxSample?: number;
}
export const DEFAULT_FIT_OPTIONS = { replicates: 199, seed: "spillway-holding-fit", maxSample: 2000 } as const;

export interface FamilyFit {
  family: FamilyName;
  parameters: Parameters;
  mean: number;
  cv: number;
  logLikelihood: number;
  /** Akaike information criterion, 2k − 2 ln L, for reference */
  aic: number;
  ks: number;
  ad: number;
  /** bootstrap p-values; null when the bootstrap could not run (too few values) */
  ksPValue: number | null;
  adPValue: number | null;
}

export interface HoldingFit {
  /** values used (> 0) */
  n: number;
  /** zero durations left out of the fits (log-likelihoods need x > 0) */
  zeros: number;
  mean: number;
  cv: number;
  /** resolution the durations are written with (0: none found) */
  resolution: number;
  /** ranked, best (smallest D) first */
  fits: FamilyFit[];
  pValueMethod: string;
}

/** every value is a whole multiple of r (to rounding error in the value's last digits) */
function onGrid(values: Float64Array, r: number): boolean {
  for (const x of values) {
    const q = x / r;
    if (Math.abs(q - Math.round(q)) > 1e-6 * Math.max(1, q)) return false;
  }
  return true;
}

/**
 * The resolution durations are recorded at: the coarsest δ with every value a whole multiple of δ.
 * Decimal grids (60, 10, 1, 0.1, 0.01, 0.001 s) are tried coarsest first. Any other grid (5 s, 0.5 s,
 * a tenth of a minute, ...) shows as ties: with at least 20 distinct values, the smallest gap
 * between distinct values divided by k = 1 … 12, if every value is a multiple of it and it is
 * coarser than the decimal grid and at least 1e-5 of the largest value (chance alignment of 20
 * continuous values has probability below 0.2²⁰). 0: no grid.
 */
export function writtenResolution(values: Float64Array): number {
  let decimal = 0;
  for (const r of [60, 10, 1, 0.1, 0.01, 0.001]) {
    if (onGrid(values, r)) {
      decimal = r;
      break;
    }
  }
  const sorted = values.slice().sort();
  const largest = sorted[sorted.length - 1] ?? 0;
  let distinct = 0;
  let gap = Infinity;
  for (let i = 0; i < sorted.length; i++) {
    if (i > 0 && sorted[i] - sorted[i - 1] <= 1e-9 * Math.max(1, sorted[i])) continue;
    distinct++;
    if (i > 0) gap = Math.min(gap, sorted[i] - sorted[i - 1]);
  }
  if (distinct >= 20 && Number.isFinite(gap)) {
    for (let k = 1; k <= 12; k++) {
      const r = gap / k;
      if (r <= decimal * (1 + 1e-9) || r < 1e-5 * largest) break;
      if (onGrid(values, r)) return r;
    }
  }
  return decimal;
}

/** D = max_i max(i/n − F(x_(i)), F(x_(i)) − (i−1)/n) on a sorted sample. */
export function ksStatistic(sorted: Float64Array, cdf: (x: number) => number): number {
  const n = sorted.length;
  let d = 0;
  for (let i = 0; i < n; i++) {
    const f = cdf(sorted[i]);
    d = Math.max(d, (i + 1) / n - f, f - i / n);
  }
  return d;
}

/** A² = −n − (1/n) Σ (2i − 1) [ln F(x_(i)) + ln S(x_(n+1−i))] (Anderson & Darling 1954), S = 1 − F computed directly. */
export function adStatistic(sorted: Float64Array, cdf: (x: number) => number, survival: (x: number) => number): number {
  const n = sorted.length;
  let sum = 0;
  for (let i = 0; i < n; i++) {
    const f = Math.max(cdf(sorted[i]), 1e-300);
    const s = Math.max(survival(sorted[n - 1 - i]), 1e-300);
    sum += (2 * i + 1) * (Math.log(f) + Math.log(s));
  }
  return -n - sum / n;
}

function roundTo(x: number, r: number): number {
  return r > 0 ? Math.round(x / r) * r : x;
}

export function fitHoldingTimes(durations: ArrayLike<number>, options: FitOptions = {}): HoldingFit {
  const { replicates, seed, maxSample } = { ...DEFAULT_FIT_OPTIONS, ...options };
  const positive = Float64Array.from(Array.prototype.filter.call(durations, (x: number) => x > 0) as number[]);
  const zeros = durations.length - positive.length;
  if (positive.length < 2) throw new Error("fitHoldingTimes: needs at least two durations > 0");
  const sorted = positive.slice().sort();
  const summary = summarise(sorted);
  let ss = 0;
  for (const x of sorted) ss += (x - summary.mean) ** 2;
  const resolution = writtenResolution(sorted);
  const n = sorted.length;
  const m = Math.min(n, maxSample);
  // gridded data with m < n: the observed statistics on a subsample of m values (partial Fisher–Yates, seeded)
  const subsampled = resolution > 0 && m < n;
  let observed = sorted;
  if (subsampled) {
    const pick = seedrandom.alea(`${seed}:subsample`);
    const pool = positive.slice();
    for (let i = 0; i < m; i++) {
      const j = i + Math.floor(pick() * (n - i));
      [pool[i], pool[j]] = [pool[j], pool[i]];
    }
    observed = pool.slice(0, m).sort();
  }
  const observedSummary = subsampled ? summarise(observed) : summary;
  const fits = FAMILY_NAMES.map((name): FamilyFit => {
    const family = FAMILIES[name];
    const parameters = family.fit(summary);
    const cdf = (x: number) => family.cdf(parameters, x);
    const ks = ksStatistic(sorted, cdf);
    const ad = adStatistic(sorted, cdf, (x) => family.survival(parameters, x));
    const logLikelihood = family.logLikelihood(parameters, summary);
    let ksPValue: number | null = null;
    let adPValue: number | null = null;
    const degenerate = Object.values(parameters).some((v) => !Number.isFinite(v));
    if (replicates > 0 && n >= 5 && !degenerate) {
      const uniform = seedrandom.alea(`${seed}:${name}`);
      const u = () => {
        let x = uniform();
        while (x === 0) x = uniform();
        return x;
      };
      let ksAbove = 0;
      let adAbove = 0;
      let target = Math.sqrt(n) * ks;
      let adTarget = ad;
      if (subsampled) {
        const q = family.fit(observedSummary);
        const oc = (x: number) => family.cdf(q, x);
        target = Math.sqrt(m) * ksStatistic(observed, oc);
        adTarget = adStatistic(observed, oc, (x) => family.survival(q, x));
      }
      for (let b = 0; b < replicates; b++) {
        const draw = new Float64Array(m);
        let k = 0;
        while (k < m) {
          const x = roundTo(family.draw(parameters, u), resolution);
          if (x > 0) draw[k++] = x;
        }
        draw.sort();
        const s = summarise(draw);
        const p = family.fit(s);
        const bc = (x: number) => family.cdf(p, x);
        if (Math.sqrt(m) * ksStatistic(draw, bc) >= target) ksAbove++;
        if (adStatistic(draw, bc, (x) => family.survival(p, x)) >= adTarget) adAbove++;
      }
      ksPValue = (1 + ksAbove) / (replicates + 1);
      adPValue = (1 + adAbove) / (replicates + 1);
    }
    return {
      family: name,
      parameters,
      mean: family.mean(parameters),
      cv: family.cv(parameters),
      logLikelihood,
      aic: 2 * family.parameterNames.length - 2 * logLikelihood,
      ks,
      ad,
      ksPValue,
      adPValue,
    };
  });
  fits.sort((a, b) => a.ks - b.ks);
  return {
    n,
    zeros,
    mean: summary.mean,
    cv: Math.sqrt(ss / (n - 1)) / summary.mean,
    resolution,
    fits,
    pValueMethod:
      replicates > 0
        ? `parametric bootstrap, ${replicates} samples of ${m} values${
            subsampled ? ` compared with a random subsample of ${m} of the ${n} values` : m < n ? ` (√m·D compared with √n·D)` : ""
          }, draws rounded to ${resolution ? `the recording resolution ${resolution}` : "no resolution"}, seed "${seed}"; the classical Kolmogorov p-value is not valid with estimated parameters`
        : "not computed",
  };
}
