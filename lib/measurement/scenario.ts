import { z } from "zod";
import { MAX_TRAFFIC, minServersForBlocking } from "../teletraffic/erlang-b";
import { parseScenario, type Law, type Scenario } from "../simulation/scenario";
import type { Characterisation } from "./characterise";
import { MeasurementInputError } from "./errors";
import { FAMILIES, FAMILY_NAMES, type FamilyName } from "./laws";
import { renewalPeakedness } from "../teletraffic/renewal";
import { exponentialKernelIntegral, onOffInterarrivalScv, onOffPeakedness, shapeOfFamily, shapeOfSample, survivalSquareIntegral, type HoldingShape, type OnOff } from "./peakedness";

/**
 * From a characterisation to a scenario the engine runs (lib/simulation/scenario.ts). Time unit:
 * minutes (rates per minute, holding means in minutes).
 *
 * Arrivals, busy hour: Poisson when the measured peakedness Z is within its tolerance of 1
 * (max(0.05, 2 × its standard error under Poisson, see characterise.ts)); above that an on-off
 * stream matched by moments to the busy-hour rate, Z (with the chosen holding law) and the
 * interarrival squared coefficient of variation; below it a renewal stream with gamma
 * interarrivals matched to Z. From interval counts (no calls in progress to measure) the index
 * of dispersion of the counts takes Z's place. Daily profile: the mean rate of every clock
 * interval as a repeating time-varying rate.
 */
export const makeScenarioOptionsSchema = z.strictObject({
  source: z.enum(["busy-hour", "daily-profile"]).default("busy-hour"),
  holding: z.enum(["best", "empirical", ...FAMILY_NAMES]).default("best"),
  /** grade of service for the proposed number of servers (1 % is common practice, no source) */
  targetBlocking: z.number().gt(0, "must be > 0").lt(1, "must be < 1").default(0.01),
  seed: z.number().int("must be an integer").min(0, "must be >= 0").max(2 ** 31, "must be <= 2147483648").default(1),
  replications: z.number().int("must be an integer").min(2, "must be >= 2").max(200, "must be <= 200").default(20),
});
export type MakeScenarioOptions = z.input<typeof makeScenarioOptionsSchema>;

export interface ArrivalFit {
  model: "poisson" | "on-off" | "renewal" | "time-varying";
  /** the measured figure the fit matched: peakedness, or the index of dispersion for interval counts */
  measured: { quantity: "peakedness" | "index of dispersion" | "none"; value: number | null; tolerance: number | null };
  /** the fitted stream's value of the same quantity, computed from its parameters */
  fitted: number | null;
  /** for on-off: the interarrival squared coefficient of variation, measured and fitted */
  interarrivalScv?: { measured: number | null; fitted: number };
  method: string;
}

export interface MadeScenario {
  scenario: Scenario;
  timeUnit: "minute";
  offeredTraffic: number;
  holding: { law: FamilyName | "empirical" | "exponential (given mean)"; meanMinutes: number };
  arrivals: ArrivalFit;
  servers: { value: number; method: string; targetBlocking: number };
  notes: string[];
}

function scaleLaw(law: Law, factor: number): Law {
  switch (law.law) {
    case "exponential":
    case "lognormal":
    case "gamma":
      return { ...law, mean: law.mean * factor };
    case "weibull":
      return { ...law, scale: law.scale! * factor };
    case "empirical":
      return { ...law, samples: law.samples.map((x) => x * factor) };
    default:
      throw new Error(`scaleLaw: ${law.law} is not made here`);
  }
}

function scaleShape(shape: HoldingShape, factor: number): HoldingShape {
  return { mean: shape.mean * factor, x: shape.x.map((v) => v * factor), s: shape.s };
}

/** Bisection for an increasing (sign = 1) or decreasing (sign = −1) function on a log scale. */
function solveLog(f: (x: number) => number, target: number, lo: number, hi: number, sign: 1 | -1): number {
  for (let i = 0; i < 200 && hi / lo > 1 + 1e-12; i++) {
    const mid = Math.sqrt(lo * hi);
    if (sign * (f(mid) - target) < 0) lo = mid;
    else hi = mid;
  }
  return Math.sqrt(lo * hi);
}

/**
 * On-off stream with mean rate `rate`, peakedness z on the given holding law, and interarrival
 * scv c² when both can hold. With a = 1/meanOn + 1/meanOff and p = meanOn/(meanOn + meanOff):
 * c² − 1 = 2 λ(1 − p)/a and Z − 1 = λ(1 − p) I(a)/m (peakedness.ts), so
 * (c² − 1) / (2 (Z − 1)) = m / (a I(a)), decreasing in a from ∞ to m / (2 ∫S²): solved for a.
 * When c² is too small for that, a = 1/m (switching as fast as calls end) is taken instead.
 */
export function fitOnOff(rate: number, z: number, scv: number | null, holding: HoldingShape): { stream: OnOff; matchedScv: boolean } {
  const m = holding.mean;
  const ratio = scv !== null && scv > 1 ? (scv - 1) / (2 * (z - 1)) : NaN;
  const g = (a: number) => m / (a * exponentialKernelIntegral(holding, a));
  const limit = m / (2 * survivalSquareIntegral(holding));
  let a = 1 / m;
  let matchedScv = false;
  if (ratio > limit * 1.001) {
    let lo = 1 / m;
    let hi = 1 / m;
    while (g(lo) < ratio && lo > 1e-12 / m) lo /= 4;
    while (g(hi) > ratio && hi < 1e12 / m) hi *= 4;
    a = solveLog(g, ratio, lo, hi, -1);
    matchedScv = true;
  }
  const offPart = ((z - 1) * m) / exponentialKernelIntegral(holding, a); // λ(1 − p)
  const onRate = rate + offPart;
  const p = rate / onRate;
  return { stream: { onRate, meanOn: 1 / (a * (1 - p)), meanOff: 1 / (a * p) }, matchedScv };
}

/**
 * Peakedness of a renewal stream with gamma interarrival times (mean τ, coefficient of variation
 * cv) on an infinite group with exponential holding of mean m: lib/teletraffic's Takács formula
 * Z = 1/(1 − φ(1/m)) − m/τ, φ(s) = (1 + s τ cv²)^(−1/cv²).
 */
export function gammaRenewalPeakedness(meanInterarrival: number, cv: number, meanHolding: number): number {
  return renewalPeakedness({ law: "gamma", mean: meanInterarrival, cv }, meanHolding);
}

/** Gamma renewal interarrival cv whose peakedness (exponential holding of mean m) is z; z below the cv → 0 limit is clamped. */
export function fitGammaRenewal(rate: number, z: number, meanHolding: number): { cv: number; clamped: boolean } {
  const minCv = 0.05;
  const zOf = (cv: number) => gammaRenewalPeakedness(1 / rate, cv, meanHolding);
  if (z <= zOf(minCv)) return { cv: minCv, clamped: true };
  return { cv: solveLog(zOf, z, minCv, 1, 1), clamped: false };
}

export function makeScenario(c: Characterisation, optionsInput: MakeScenarioOptions = {}): MadeScenario {
  const options = makeScenarioOptionsSchema.parse(optionsInput);
  const notes: string[] = [];
  // Holding law (seconds → minutes).
  let holdingLaw: Law;
  let shape: HoldingShape;
  let holdingName: MadeScenario["holding"]["law"];
  if (c.holding) {
    const chosen = options.holding === "best" ? c.holding.fits[0].family : options.holding;
    if (chosen === "empirical") {
      holdingLaw = { law: "empirical", samples: c.holding.empiricalSample };
      shape = shapeOfSample(c.holding.empiricalSample);
    } else {
      const fit = c.holding.fits.find((f) => f.family === chosen)!;
      holdingLaw = FAMILIES[chosen].scenarioLaw(fit.parameters);
      shape = shapeOfFamily(chosen, fit.parameters);
    }
    holdingName = chosen;
  } else if (c.kind === "call-records") {
    throw new MeasurementInputError(
      "no-data",
      c.meanHoldingSeconds
        ? "the call records have only one answered call with a positive holding time: a holding-time law needs at least two"
        : "the call records have no positive holding times (every answered call lasts 0 s), so no holding-time law can be fitted and no traffic is offered: check the duration column and its unit",
      undefined,
      "duration",
    );
  } else if (c.meanHoldingSeconds) {
    holdingLaw = { law: "exponential", mean: c.meanHoldingSeconds };
    shape = shapeOfFamily("exponential", { mean: c.meanHoldingSeconds });
    holdingName = "exponential (given mean)";
    notes.push("Interval counts carry no holding times: exponential holding with the mean given in the mapping.");
  } else {
    throw new MeasurementInputError("bad-mapping", "a scenario needs a holding time: upload call records, or give the mean holding time (meanHoldingSeconds) with the interval counts", undefined, "meanHoldingSeconds");
  }
  const busyTraffic = c.busy.offeredTraffic ?? 0;
  if (!(c.busy.ratePerHour > 0 && busyTraffic > 0))
    throw new MeasurementInputError("no-data", "no traffic was measured: the busy hour, the busiest hour of the file, has no attempts or no offered traffic (every count is 0), so there is nothing to model");
  // Offered traffic is the measured quantity; the fitted family only shapes the holding law. The
  // law is rescaled (shape kept) to the busy hour's mean holding time, offered traffic / attempt
  // rate, so that the scenario offers exactly the measured busy-hour traffic (the fit's mean is
  // that of the whole period, and the fitted family's mean differs from the sample mean).
  const busyMeanSeconds = (busyTraffic * 3600) / c.busy.ratePerHour;
  const fittedMeanSeconds = shape.mean;
  // equal up to rounding (interval counts with a given mean): keep the law exactly as it is
  const rescale = Math.abs(busyMeanSeconds / fittedMeanSeconds - 1) > 1e-9 ? busyMeanSeconds / fittedMeanSeconds : 1;
  if (rescale !== 1)
    notes.push(
      `The holding law keeps the ${holdingName === "empirical" ? "empirical law's" : `fitted ${holdingName} law's`} shape, with its mean set to the busy hour's measured mean holding time, ${busyMeanSeconds.toFixed(1)} s (offered traffic / attempt rate), instead of ${fittedMeanSeconds.toFixed(1)} s, so the scenario offers the measured ${busyTraffic.toFixed(2)} erlangs.`,
    );
  holdingLaw = scaleLaw(holdingLaw, rescale / 60);
  shape = scaleShape(shape, rescale / 60);
  const m = shape.mean;

  const rate = c.busy.ratePerHour / 60;
  const offeredTraffic = rate * m;
  let arrivals: Scenario["arrivals"];
  let fit: ArrivalFit;
  if (options.source === "daily-profile") {
    const profile = c.profile.ratePerHour.map((r) => ({ duration: c.intervalMinutes, rate: r / 60 }));
    arrivals = { process: "time-varying", profile };
    fit = {
      model: "time-varying",
      measured: { quantity: "none", value: null, tolerance: null },
      fitted: null,
      method: `mean arrival rate of each ${c.intervalMinutes}-minute clock interval over the days measured, repeated every day; Poisson within each interval`,
    };
  } else {
    const measuredZ = c.busy.peakedness;
    const dispersion = c.busy.dispersion;
    const quantity = measuredZ ? "peakedness" : dispersion ? "index of dispersion" : "none";
    const value = measuredZ?.value ?? dispersion?.value ?? null;
    const tolerance = measuredZ ? measuredZ.poissonTolerance : dispersion ? Math.max(0.05, 2 * dispersion.standardErrorIfPoisson) : null;
    const measured = { quantity, value, tolerance } as ArrivalFit["measured"];
    if (value === null || tolerance === null || Math.abs(value - 1) <= tolerance) {
      arrivals = { process: "poisson", rate };
      fit = {
        model: "poisson",
        measured,
        fitted: 1,
        method: value === null ? "Poisson: nothing measured shows otherwise" : `Poisson: |${quantity} − 1| = ${Math.abs(value - 1).toFixed(3)} is within the tolerance ${tolerance!.toFixed(3)}`,
      };
    } else if (value > 1) {
      if (measuredZ) {
        const { stream, matchedScv } = fitOnOff(rate, value, c.busy.interarrivalScv, shape);
        arrivals = { process: "on-off", ...stream };
        fit = {
          model: "on-off",
          measured,
          fitted: onOffPeakedness(stream, shape),
          interarrivalScv: { measured: c.busy.interarrivalScv, fitted: onOffInterarrivalScv(stream) },
          method: matchedScv
            ? "on-off (interrupted Poisson) stream matched to the busy-hour rate, the peakedness with this holding law, and the interarrival scv"
            : "on-off stream matched to the busy-hour rate and the peakedness; the interarrival scv could not be matched as well, so the on-off cycle rate is set to 1/(mean holding time)",
        };
        if (!matchedScv)
          notes.push(
            c.busy.interarrivalScv === null
              ? "The interarrival scv is undefined (fewer than two gaps between busy-hour attempts, or every gap is 0), so only rate and peakedness are matched."
              : `The measured interarrival scv (${c.busy.interarrivalScv.toFixed(2)}) is too low for an on-off stream with this peakedness; only rate and peakedness are matched.`,
          );
      } else {
        // Counts: match the index of dispersion over the count window with the cycle rate a = 1/m:
        // Var N(T)/(λT) = 1 + 2 λ(1 − p) [1/a − (1 − e^{−aT})/(a² T)] for the on-off stream.
        const a = 1 / m;
        const T = dispersion!.windowSeconds / 60;
        const offPart = (value - 1) / (2 * (1 / a - -Math.expm1(-a * T) / (a * a * T)));
        const onRate = rate + offPart;
        const p = rate / onRate;
        const stream = { onRate, meanOn: 1 / (a * (1 - p)), meanOff: 1 / (a * p) };
        arrivals = { process: "on-off", ...stream };
        fit = {
          model: "on-off",
          measured,
          fitted: 1 + 2 * offPart * (1 / a - -Math.expm1(-a * T) / (a * a * T)),
          method: "on-off stream matched to the busy-hour rate and the index of dispersion of the interval counts, with the cycle rate set to 1/(mean holding time)",
        };
        notes.push(`Peakedness on the group is not measured from counts; the fitted stream's peakedness would be ${onOffPeakedness(stream, shape).toFixed(3)}.`);
      }
    } else {
      // renewal: matched to Z from calls, or from counts to the index of dispersion (≈ c² of a renewal stream)
      let cv: number;
      let fitted: number;
      if (measuredZ) {
        const r = fitGammaRenewal(rate, value, m);
        cv = r.cv;
        fitted = gammaRenewalPeakedness(1 / rate, cv, m);
        if (r.clamped) notes.push(`The measured peakedness ${value.toFixed(3)} is below what a renewal stream with this rate and holding mean reaches; the smoothest stream fitted (cv ${cv}) has ${fitted.toFixed(3)}.`);
        if (holdingName !== "exponential") notes.push("The renewal fit uses the exponential-holding peakedness formula (Takács); with other holding laws it is an approximation.");
      } else {
        cv = Math.max(0.05, Math.sqrt(value));
        fitted = cv * cv;
        notes.push("From counts the renewal stream's interarrival scv is set to the index of dispersion (its long-window limit for renewal streams).");
      }
      arrivals = { process: "renewal", interarrival: { law: "gamma", mean: 1 / rate, cv } };
      fit = { model: "renewal", measured, fitted, method: "renewal stream with gamma interarrival times matched to the measured value" };
    }
  }

  if (offeredTraffic > MAX_TRAFFIC)
    throw new MeasurementInputError(
      "no-data",
      `the busy hour's measured offered traffic, ${offeredTraffic.toExponential(3)} erlangs, is beyond what can be sized (at most ${MAX_TRAFFIC} erlangs): check the holding times the characterisation's notes name`,
      undefined,
      "duration",
    );
  const sizing = minServersForBlocking({ traffic: offeredTraffic, target: options.targetBlocking });
  const run =
    options.source === "daily-profile"
      ? { seed: options.seed, replications: options.replications, horizon: 1440, confidence: 0.95 }
      : { seed: options.seed, replications: options.replications, callsPerReplication: 50_000, warmupCalls: 5_000, confidence: 0.95 };
  if (options.source === "daily-profile") notes.push("Each replication simulates one day from midnight with the group empty; the night's low traffic serves as warm-up.");
  const scenario = parseScenario({ servers: sizing.servers, waitingPositions: 0, arrivals, holding: holdingLaw, run });
  return {
    scenario,
    timeUnit: "minute",
    offeredTraffic,
    holding: { law: holdingName, meanMinutes: m },
    arrivals: fit,
    servers: { value: sizing.servers, method: `smallest group with Erlang B blocking <= ${options.targetBlocking} at the busy-hour offered traffic`, targetBlocking: options.targetBlocking },
    notes,
  };
}
