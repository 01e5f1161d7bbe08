// The sweep parameter registry: how each swept quantity is read from a scenario and applied to one.
// Pure: no database, no framework. Every apply keeps what the parameter does not name (above all
// the mean call rate, for the shape parameters peakedness and burstiness).
import { freshCallRate, lawMean, lnGamma, type Arrivals, type Law, type Scenario } from "../simulation/scenario";
import { batchPeakedness } from "../teletraffic/peakedness";
import { mmppOfferedMoments, stationaryOfGenerator } from "../teletraffic/peakedness";

/** The parameter cannot be read from or applied to this scenario; `field` names the definition field. */
export class SweepParameterError extends Error {
  constructor(
    message: string,
    readonly field: string = "parameter",
  ) {
    super(message);
    this.name = "SweepParameterError";
  }
}

export interface SweepParameter {
  label: string;
  unit: string;
  /** Values must be whole numbers. */
  integer: boolean;
  /** Smallest allowed value, and whether it is allowed itself. */
  min: number;
  minInclusive: boolean;
  max?: number;
  /** What applying a value does to the scenario, in one sentence (shown beside the sweep form). */
  mapping: string;
  read(s: Scenario): number;
  apply(s: Scenario, value: number): Scenario;
}

const refuse = (name: string, message: string): never => {
  throw new SweepParameterError(`${name}: ${message}`);
};

/** Multiplies every time value of a law by `f` (the shape, and so the coefficient of variation, is kept). */
export function scaleLaw(law: Law, f: number): Law {
  switch (law.law) {
    case "exponential":
    case "erlang":
    case "lognormal":
    case "gamma":
    case "pareto":
      return { ...law, mean: law.mean * f };
    case "deterministic":
      return { ...law, value: law.value * f };
    case "hyperexponential":
      return law.means ? { ...law, means: law.means.map((m) => m * f) } : { ...law, mean: law.mean! * f };
    case "weibull":
      return law.mean !== undefined ? { ...law, mean: law.mean * f } : { ...law, scale: law.scale! * f };
    case "uniform":
      return { ...law, min: law.min * f, max: law.max * f };
    case "empirical":
      return { ...law, samples: law.samples.map((x) => x * f) };
  }
}

/** Squared coefficient of variation of a law (Infinity when its variance is infinite). */
export function lawScv(law: Law): number {
  const m = lawMean(law);
  switch (law.law) {
    case "exponential":
      return 1;
    case "deterministic":
      return 0;
    case "erlang":
      return 1 / law.k;
    case "lognormal":
    case "gamma":
      return law.cv * law.cv;
    case "hyperexponential": {
      if (law.scv !== undefined) return law.scv;
      const second = law.probabilities!.reduce((s, p, i) => s + 2 * p * law.means![i] ** 2, 0);
      return second / (m * m) - 1;
    }
    case "weibull": {
      if (law.cv !== undefined) return law.cv * law.cv;
      const k = law.shape!;
      return Math.exp(lnGamma(1 + 2 / k) - 2 * lnGamma(1 + 1 / k)) - 1;
    }
    case "pareto":
      return law.shape > 2 ? 1 / (law.shape * (law.shape - 2)) : Infinity;
    case "uniform":
      return (law.max - law.min) ** 2 / 12 / (m * m);
    case "empirical": {
      let v = 0;
      for (const x of law.samples) v += (x - m) ** 2;
      return v / law.samples.length / (m * m);
    }
  }
}

/** Mean fresh-call rate at the group under study (for overflow: the overflow calls). */
export function meanCallRate(s: Scenario): number {
  return freshCallRate(s.arrivals, lawMean(s.holding));
}

/** Traffic offered to the group under study in erlangs: what the sizing formulas are given. */
export function trafficAtGroup(s: Scenario): number {
  return meanCallRate(s) * lawMean(s.holding);
}

function withArrivals(s: Scenario, arrivals: Arrivals): Scenario {
  return { ...s, arrivals };
}

// ---- offered traffic ------------------------------------------------------------------------

function readOfferedTraffic(s: Scenario): number {
  if (s.arrivals.process === "overflow") return s.arrivals.primaries.reduce((sum, p) => sum + p.traffic, 0);
  return trafficAtGroup(s);
}

function applyOfferedTraffic(s: Scenario, value: number): Scenario {
  const a = s.arrivals;
  const f = value / readOfferedTraffic(s);
  switch (a.process) {
    case "poisson":
    case "batch":
      return withArrivals(s, { ...a, rate: a.rate * f });
    case "mmpp":
      return withArrivals(s, { ...a, rates: a.rates.map((r) => r * f) });
    case "on-off":
      return withArrivals(s, { ...a, onRate: a.onRate * f });
    case "renewal":
      return withArrivals(s, { ...a, interarrival: scaleLaw(a.interarrival, 1 / f) });
    case "overflow":
      return withArrivals(s, { ...a, primaries: a.primaries.map((p) => ({ ...p, traffic: p.traffic * f })) });
    case "time-varying":
      return withArrivals(s, { ...a, profile: a.profile.map((p) => ({ ...p, rate: p.rate * f })) });
    case "finite-source": {
      // Engset's offered traffic A = S b / (1 + b), b = idleRate x mean holding, so b = A / (S - A).
      if (value >= a.sources) refuse("offeredTraffic", `${value} E is not below the ${a.sources} sources, which is the most finite sources can offer`);
      return withArrivals(s, { ...a, idleRate: value / (a.sources - value) / lawMean(s.holding) });
    }
  }
}

// ---- peakedness -------------------------------------------------------------------------------

const peakednessName = "peakedness";

/** Peakedness (variance / mean of the busy servers on an infinite group with exponential holding of the scenario's mean). */
function readPeakedness(s: Scenario): number {
  const a = s.arrivals;
  const h = lawMean(s.holding);
  switch (a.process) {
    case "poisson":
      return 1;
    case "batch":
      return batchPeakedness(a.batchSize);
    case "mmpp":
    case "on-off": {
      const m = mmppParts(a);
      const moments = mmppOfferedMoments(m.rates, m.switching, h);
      return moments.variance / moments.mean;
    }
    default:
      return refuse(peakednessName, notForProcess(a.process));
  }
}

function notForProcess(process: Arrivals["process"]): string {
  const why: Partial<Record<Arrivals["process"], string>> = {
    renewal: "for renewal arrivals sweep burstiness (the squared coefficient of variation of the interarrival times)",
    overflow: "the peakedness of overflow traffic follows from its primary groups; sweep their offered traffic instead",
    "finite-source": "finite-source traffic is smooth (peakedness below 1) and set by the number of sources",
    "time-varying": "a time-varying profile sets its own variation; edit the profile instead",
  };
  return `does not apply to ${process} arrivals: ${why[process] ?? "not supported"}`;
}

function mmppParts(a: Extract<Arrivals, { process: "mmpp" | "on-off" }>): { rates: number[]; switching: number[][] } {
  if (a.process === "mmpp") return { rates: a.rates, switching: a.switching };
  return { rates: [a.onRate, 0], switching: [[0, 1 / a.meanOn], [1 / a.meanOff, 0]] };
}

/** Root of an increasing function on [lo, hi] by bisection (60 halvings: below double resolution). */
function bisect(f: (x: number) => number, target: number, lo: number, hi: number): number {
  for (let i = 0; i < 60; i++) {
    const mid = (lo + hi) / 2;
    if (f(mid) < target) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

function applyPeakedness(s: Scenario, z: number): Scenario {
  const a = s.arrivals;
  const h = lawMean(s.holding);
  if (z < 1) refuse(peakednessName, "must be >= 1 (smooth traffic is not offered by this parameter)");
  const rate = meanCallRate(s);
  switch (a.process) {
    case "poisson":
    case "batch": {
      // Poisson batches with geometric sizes of mean m have Z = (1 + E[X^2]/E[X]) / 2 = m, so
      // m = Z; the batch rate becomes (call rate) / Z. Z = 1 is the Poisson process itself.
      if (a.process === "batch" && a.batchSize.law !== "geometric")
        refuse(peakednessName, `is set through a geometric batch-size law (its mean is the peakedness); this scenario's batch sizes are ${a.batchSize.law}`);
      if (z === 1) return withArrivals(s, { process: "poisson", rate });
      return withArrivals(s, { process: "batch", rate: rate / z, batchSize: { law: "geometric", mean: z }, admission: a.process === "batch" ? a.admission : "partial" });
    }
    case "on-off": {
      // Keep the mean rate and the mean on-period; a shorter share of time on (p) with a
      // proportionally higher on-rate gives a higher peakedness, from 1 (always on) upwards.
      const zOf = (p: number) => {
        const m = mmppOfferedMoments([rate / p, 0], [[0, 1 / a.meanOn], [p / ((1 - p) * a.meanOn), 0]], h);
        return m.variance / m.mean;
      };
      const pMin = 1e-6;
      if (z === 1) return withArrivals(s, { process: "poisson", rate });
      if (zOf(pMin) < z) refuse(peakednessName, `${z} is out of reach for these on-periods (at most ${zOf(pMin).toPrecision(4)})`);
      // zOf decreases in p: bisect on q = 1 - p.
      const q = bisect((x) => zOf(1 - x), z, 0, 1 - pMin);
      const p = 1 - q;
      return withArrivals(s, { ...a, onRate: rate / p, meanOff: (a.meanOn * (1 - p)) / p });
    }
    case "mmpp": {
      // Rates pulled towards (c < 1) or pushed away from (c > 1) their mean, which stays put:
      // rate_i = mean + c (rate_i - mean); c = 0 is Poisson, c is capped where a rate reaches 0.
      const pi = stationaryOfGenerator(a.switching);
      const mean = a.rates.reduce((sum, r, i) => sum + r * pi[i], 0);
      const scaled = (c: number) => a.rates.map((r) => Math.max(0, mean + c * (r - mean)));
      const zOf = (c: number) => {
        const m = mmppOfferedMoments(scaled(c), a.switching, h);
        return m.variance / m.mean;
      };
      let cMax = Infinity;
      for (const r of a.rates) if (r < mean) cMax = Math.min(cMax, mean / (mean - r));
      if (!Number.isFinite(cMax)) refuse(peakednessName, "the phases all have the same rate, so there is no variation to scale");
      if (zOf(cMax) < z) refuse(peakednessName, `${z} is out of reach for these phases (at most ${zOf(cMax).toPrecision(4)} before a rate reaches 0)`);
      return withArrivals(s, { ...a, rates: scaled(bisect(zOf, z, 0, cMax)) });
    }
    default:
      return refuse(peakednessName, notForProcess(a.process));
  }
}

// ---- burstiness -------------------------------------------------------------------------------

const burstinessName = "burstiness";
const burstinessScope = "applies to Poisson and renewal arrivals (the squared coefficient of variation of the interarrival times); for MMPP, on-off and batch arrivals sweep peakedness";

function readBurstiness(s: Scenario): number {
  const a = s.arrivals;
  if (a.process === "poisson") return 1;
  if (a.process === "renewal") return lawScv(a.interarrival);
  return refuse(burstinessName, `does not apply to ${a.process} arrivals: it ${burstinessScope}`);
}

/** An interarrival law of the same mean with squared coefficient of variation `b`. */
function lawWithScv(law: Law, b: number): Law {
  const mean = lawMean(law);
  const cv = Math.sqrt(b);
  switch (law.law) {
    case "gamma":
    case "lognormal":
      return { ...law, cv };
    case "weibull":
      return { law: "weibull", mean, cv };
    case "hyperexponential":
      if (b < 1) refuse(burstinessName, "must be >= 1 for hyperexponential interarrival times");
      return { law: "hyperexponential", mean, scv: b };
    default:
      return b === 1 ? { law: "exponential", mean } : { law: "gamma", mean, cv };
  }
}

function applyBurstiness(s: Scenario, b: number): Scenario {
  const a = s.arrivals;
  if (!(b > 0)) refuse(burstinessName, "must be > 0");
  if (a.process === "poisson") return b === 1 ? s : withArrivals(s, { process: "renewal", interarrival: { law: "gamma", mean: 1 / a.rate, cv: Math.sqrt(b) } });
  if (a.process === "renewal") return withArrivals(s, { ...a, interarrival: lawWithScv(a.interarrival, b) });
  return refuse(burstinessName, `does not apply to ${a.process} arrivals: it ${burstinessScope}`);
}

// ---- the registry -----------------------------------------------------------------------------

export const sweepParameters = {
  offeredTraffic: {
    label: "Offered traffic",
    unit: "E",
    integer: false,
    min: 0,
    minInclusive: false,
    mapping:
      "Scales every arrival rate (renewal: the interarrival times; overflow: each primary group's traffic; finite sources: the idle rate) so the mean offered traffic is the value; the arrival pattern's shape and the holding time are kept.",
    read: readOfferedTraffic,
    apply: applyOfferedTraffic,
  },
  servers: {
    label: "Servers",
    unit: "",
    integer: true,
    min: 1,
    minInclusive: true,
    mapping: "Sets the number of servers (circuits) in the group under study.",
    read: (s) => s.servers,
    apply: (s, v) => ({ ...s, servers: v }),
  },
  waitingPositions: {
    label: "Waiting positions",
    unit: "",
    integer: true,
    min: 0,
    minInclusive: true,
    mapping: "Sets the number of waiting positions (0 = a pure loss system).",
    read: (s) => s.waitingPositions,
    apply: (s, v) => ({ ...s, waitingPositions: v }),
  },
  meanHolding: {
    label: "Mean holding time",
    unit: "time units",
    integer: false,
    min: 0,
    minInclusive: false,
    mapping: "Scales the holding-time law to this mean, keeping its shape; arrival rates are kept, so the offered traffic changes with it.",
    read: (s) => lawMean(s.holding),
    apply: (s, v) => ({ ...s, holding: scaleLaw(s.holding, v / lawMean(s.holding)) }),
  },
  retryPersistence: {
    label: "Retry persistence",
    unit: "",
    integer: false,
    min: 0,
    minInclusive: true,
    max: 1,
    mapping: "Sets the probability that a refused call tries again (needs a scenario with repeated attempts).",
    read: (s) => s.retrials?.persistence ?? refuse("retryPersistence", "the scenario has no repeated attempts; add a retrials section first"),
    apply: (s, v) => {
      if (!s.retrials) refuse("retryPersistence", "the scenario has no repeated attempts; add a retrials section first");
      return { ...s, retrials: { ...s.retrials!, persistence: v } };
    },
  },
  peakedness: {
    label: "Peakedness Z",
    unit: "",
    integer: false,
    min: 1,
    minInclusive: true,
    mapping:
      "Variance-to-mean ratio of the busy servers the arrivals would hold on an infinite group with exponential holding of the scenario's mean; the mean call rate is kept. Poisson and geometric-batch arrivals become Poisson batches with geometric sizes of mean Z (Z = 1: Poisson); on-off arrivals keep their mean on-period and get a shorter share of time on with a higher on-rate; MMPP rates are pushed away from (or towards) their mean. Renewal, overflow, finite-source and time-varying arrivals are refused.",
    read: readPeakedness,
    apply: applyPeakedness,
  },
  burstiness: {
    label: "Burstiness (interarrival SCV)",
    unit: "",
    integer: false,
    min: 0,
    minInclusive: false,
    mapping:
      "Squared coefficient of variation of the interarrival times, mean kept. Gamma, lognormal and Weibull laws keep their family, hyperexponential stays balanced (needs >= 1), other laws and Poisson arrivals become gamma (1 = exponential). Other arrival processes are refused (use peakedness).",
    read: readBurstiness,
    apply: applyBurstiness,
  },
} satisfies Record<string, SweepParameter>;

export type SweepParameterName = keyof typeof sweepParameters;
export const sweepParameterNames = Object.keys(sweepParameters) as [SweepParameterName, ...SweepParameterName[]];

/** Checks a value against the parameter's range; the message names the parameter. */
export function checkParameterValue(name: SweepParameterName, value: number): string | undefined {
  const p: SweepParameter = sweepParameters[name];
  if (!Number.isFinite(value)) return "must be a finite number";
  if (p.integer && !Number.isInteger(value)) return "must be a whole number";
  if (p.minInclusive ? value < p.min : value <= p.min) return `must be ${p.minInclusive ? ">=" : ">"} ${p.min}`;
  if (p.max !== undefined && value > p.max) return `must be <= ${p.max}`;
  return undefined;
}
