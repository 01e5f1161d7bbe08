import { hyperexponentialBranches } from "../teletraffic/law-formulas";
import { nearRefusalMargin, type ReplicationOptions, type ReplicationStats } from "./engine";
import { Random, SUBSTREAM } from "./random";
import type { Scenario } from "./scenario";
import { mmppOf, stationaryOfGenerator } from "./traffic";

/**
 * The Markov path: for a loss group whose model is a continuous-time Markov chain throughout
 * (exponential holding; Poisson, MMPP/on-off, finite-source or overflow arrivals (each primary
 * group's busy count is part of the state), or renewal arrivals with a phase-type interarrival law
 * (exponential, Erlang, hyperexponential: the current phase is part of the state); no waiting line,
 * no retrials), it simulates the embedded jump chain only and credits every visited state with its
 * expected sojourn 1/q(state) instead of a drawn one: the discrete-time conversion of Hordijk,
 * Iglehart & Schassberger (Adv. Appl. Prob. 8, 1976), whose time averages have a variance no
 * larger than those of the continuous-time simulation (Fox & Glynn, Management Science 36, 1990).
 * No event list and one uniform per jump. With overflow and phase-type arrivals the calls offered
 * still arrive singly with a known intensity (the rates of the full primaries; the completion rate
 * of the current phase when it ends an interarrival time), so the intensity estimator applies.
 *
 * So the clock of this path is the sum of expected sojourns: time integrals (busyIntegral,
 * occupancy, allBusyTime, intensities) are conditional expectations given the jump sequence, while
 * counts of calls (calls, blockedFirst, admitted) are still counts of the simulated jumps. A
 * horizon or warm-up time is measured on that clock. It is a different estimator of the same
 * quantities as the event loops, not the same sample path; tests compare it statistically.
 * Holding times, interarrival gaps and phase sojourns are never drawn: `holdingSum` is
 * `holdingDraws` x the mean and the sojourn deviations are 0, so those control variates have
 * nothing to correct here (the expected sojourns already removed that noise).
 */

/** Why the Markov path does not apply to a scenario, or undefined when it does (the dispatch rule). */
export function markovPathRefusal(scenario: Scenario): string | undefined {
  if (scenario.holding.law !== "exponential") return "holding is not exponential";
  if (scenario.waitingPositions > 0) return "a waiting line";
  if (scenario.retrials && scenario.retrials.persistence > 0) return "repeated attempts";
  const a = scenario.arrivals;
  if (a.process === "renewal") return phaseTypeOf(a.interarrival) ? undefined : `renewal arrivals with a ${a.interarrival.law} law (not phase-type)`;
  if (a.process !== "poisson" && a.process !== "mmpp" && a.process !== "on-off" && a.process !== "finite-source" && a.process !== "overflow") return `${a.process} arrivals`;
  return undefined;
}

/**
 * A phase-type interarrival law as phases: each phase's completion rate, whether its completion
 * ends the interarrival time (an arrival), and the law of the first phase of the next one.
 */
function phaseTypeOf(law: Extract<Scenario["arrivals"], { process: "renewal" }>["interarrival"]): { rates: number[]; arrival: boolean[]; start: number[] } | undefined {
  switch (law.law) {
    case "exponential":
      return { rates: [1 / law.mean], arrival: [true], start: [1] };
    case "erlang":
      return { rates: new Array<number>(law.k).fill(law.k / law.mean), arrival: Array.from({ length: law.k }, (_, i) => i === law.k - 1), start: [1, ...new Array<number>(law.k - 1).fill(0)] };
    case "hyperexponential": {
      const b = hyperexponentialBranches(law);
      return { rates: b.means.map((m) => 1 / m), arrival: b.means.map(() => true), start: b.probabilities };
    }
    default:
      return undefined;
  }
}

const A_POISSON = 0;
const A_MMPP = 1;
const A_FINITE = 2;
const A_OVERFLOW = 3;
const A_PHASE = 4;
const NO_CALL = -1;
const GROUP_DEPARTURE = -2;

/** Index drawn from cumulative weights `cumulative` (last entry 1) by a uniform v. */
function pick(cumulative: Float64Array, v: number): number {
  let j = 0;
  while (v > cumulative[j]) j++;
  return j;
}

export class MarkovReplication {
  readonly index: number;
  done = false;
  readonly path = "markov" as const;

  private readonly servers: number;
  private readonly serviceRate: number;
  private readonly holdingMean: number;
  private readonly arrivalKind: number;
  private readonly rate: number = 0;
  private readonly sources: number = 0;
  private readonly idleRate: number = 0;
  private readonly phaseRates: Float64Array = new Float64Array(0);
  private readonly phaseOut: Float64Array = new Float64Array(0);
  private readonly phaseJump: Float64Array[] = [];
  /** Overflow: each primary's rate, servers, busy count and cumulative choice; the sums kept as they change. */
  private readonly primaryRates: Float64Array = new Float64Array(0);
  private readonly primaryServers: Int32Array = new Int32Array(0);
  private readonly primaryBusy: Int32Array = new Int32Array(0);
  private readonly primaryChoice: Float64Array = new Float64Array(0);
  private readonly primaryTotal: number = 0;
  private primaryBusySum = 0;
  private overflowIntensity = 0;
  private readonly primaryArrivals: Float64Array = new Float64Array(0);
  private readonly primaryOverflows: Float64Array = new Float64Array(0);
  /** Phase-type renewal: completion rate and arrival flag per phase, cumulative law of the first phase. */
  private readonly phaseArrival: Uint8Array = new Uint8Array(0);
  private readonly phaseStart: Float64Array = new Float64Array(0);
  private readonly rng: Random;

  private t = 0;
  private busy = 0;
  private phase = 0;
  private control = Infinity;
  private measuring = false;
  private callsSeen = 0;
  private readonly warmupCallsTarget: number;
  private readonly warmupTimeTarget: number;
  private readonly callsTarget: number;
  private readonly horizon: number;
  private readonly traceEvery: number;
  readonly traceTime: number[] = [];
  readonly traceBusy: number[] = [];
  readonly traceOrbit: number[] = [];
  readonly traceQueue: number[] = [];
  readonly traceCalls: number[] = [];
  private nextTrace = 0;

  private calls = 0;
  private blockedFirst = 0;
  private busyIntegral = 0;
  private intensityIntegral = 0;
  private refusingIntensityIntegral = 0;
  /** Lowest busy count counted as near refusal (engine.ts nearRefusalMargin). */
  private readonly nearLevel: number;
  private nearRefusalCalls = 0;
  private nearRefusalIntensityIntegral = 0;
  private nearRefusalAdmitted = 0;
  private measureStart = 0;
  private events = 0;
  private readonly halfCalls: number;
  private readonly halfSpan: number;
  private halfTaken = false;
  private halfTime = 0;
  private halfBusyIntegral = 0;
  private readonly occupancy: Float64Array;

  constructor(scenario: Scenario, index: number, options: Omit<ReplicationOptions, "generalLoop"> = {}) {
    const refusal = markovPathRefusal(scenario);
    if (refusal) throw new Error(`the Markov path does not run this scenario: ${refusal}`);
    this.index = index;
    this.rng = new Random(scenario.run.seed, index, SUBSTREAM.arrivals);
    this.servers = scenario.servers;
    this.holdingMean = (scenario.holding as { mean: number }).mean;
    this.serviceRate = 1 / this.holdingMean;
    this.occupancy = new Float64Array(this.servers + 1);
    const a = scenario.arrivals;
    const mmpp = mmppOf(a);
    if (a.process === "poisson") {
      this.arrivalKind = A_POISSON;
      this.rate = a.rate;
    } else if (a.process === "overflow") {
      this.arrivalKind = A_OVERFLOW;
      // As the event loops: primary i is offered Poisson calls at traffic_i / mean holding.
      const rates = a.primaries.map((g) => g.traffic / this.holdingMean);
      this.primaryRates = Float64Array.from(rates);
      this.primaryServers = Int32Array.from(a.primaries.map((g) => g.servers));
      this.primaryBusy = new Int32Array(rates.length);
      this.primaryTotal = rates.reduce((x, y) => x + y, 0);
      let c = 0;
      this.primaryChoice = Float64Array.from(rates.map((r) => (c += r) / this.primaryTotal));
      this.primaryChoice[rates.length - 1] = 1;
      this.primaryArrivals = new Float64Array(rates.length);
      this.primaryOverflows = new Float64Array(rates.length);
      rates.forEach((r, i) => {
        if (this.primaryServers[i] === 0) this.overflowIntensity += r;
      });
    } else if (a.process === "renewal") {
      this.arrivalKind = A_PHASE;
      const ph = phaseTypeOf(a.interarrival)!;
      this.phaseRates = Float64Array.from(ph.rates);
      this.phaseArrival = Uint8Array.from(ph.arrival.map(Number));
      let c = 0;
      this.phaseStart = Float64Array.from(ph.start.map((x) => (c += x)));
      this.phaseStart[ph.start.length - 1] = 1;
      // Start at the beginning of an interarrival time (the warm-up removes the start).
      this.phase = pick(this.phaseStart, this.rng.next());
    } else if (a.process === "finite-source") {
      this.arrivalKind = A_FINITE;
      this.sources = a.sources;
      this.idleRate = a.idleRate;
    } else {
      this.arrivalKind = A_MMPP;
      const k = mmpp!.rates.length;
      this.phaseRates = Float64Array.from(mmpp!.rates);
      this.phaseOut = new Float64Array(k);
      for (let i = 0; i < k; i++) {
        let out = 0;
        for (let j = 0; j < k; j++) if (j !== i) out += mmpp!.switching[i][j];
        this.phaseOut[i] = out;
        const jump = new Float64Array(k);
        let s = 0;
        for (let j = 0; j < k; j++) {
          if (j !== i) s += mmpp!.switching[i][j];
          jump[j] = out > 0 ? s / out : j >= i ? 1 : 0;
        }
        jump[k - 1] = 1;
        this.phaseJump.push(jump);
      }
      // Start in the stationary phase law, like the event loops.
      const pi = stationaryOfGenerator(mmpp!.switching);
      const u = this.rng.next();
      let s = 0;
      this.phase = pi.length - 1;
      for (let i = 0; i < pi.length; i++)
        if (u <= (s += pi[i])) {
          this.phase = i;
          break;
        }
    }
    const run = scenario.run;
    this.callsTarget = run.callsPerReplication ?? Infinity;
    this.horizon = run.horizon ?? Infinity;
    this.warmupCallsTarget = options.warmupCalls ?? run.warmupCalls ?? 0;
    this.warmupTimeTarget = options.warmupCalls !== undefined ? 0 : (run.warmupTime ?? 0);
    this.traceEvery = options.traceEvery ?? 0;
    this.nearLevel = Math.max(0, this.servers - nearRefusalMargin(scenario));
    this.halfCalls = this.callsTarget === Infinity ? Infinity : Math.ceil(this.callsTarget / 2);
    this.halfSpan = this.horizon === Infinity ? Infinity : this.horizon / 2;
    if (this.warmupCallsTarget === 0 && this.warmupTimeTarget === 0) this.startMeasuring();
    else if (this.warmupTimeTarget > 0) this.control = this.warmupTimeTarget;
  }

  private startMeasuring(): void {
    this.measuring = true;
    this.measureStart = this.t;
    this.calls = this.blockedFirst = 0;
    this.busyIntegral = this.intensityIntegral = this.refusingIntensityIntegral = 0;
    this.nearRefusalCalls = this.nearRefusalIntensityIntegral = this.nearRefusalAdmitted = 0;
    this.primaryArrivals.fill(0);
    this.primaryOverflows.fill(0);
    this.halfTaken = false;
    this.halfTime = this.halfBusyIntegral = 0;
    this.occupancy.fill(0);
    this.control = this.horizon === Infinity ? Infinity : this.t + this.horizon;
  }

  /** Runs up to `maxEvents` jumps; returns true once the replication is complete. */
  advance(maxEvents: number): boolean {
    if (this.done) return true;
    const occupancy = this.occupancy;
    const servers = this.servers;
    const mu = this.serviceRate;
    const rng = this.rng;
    const kind = this.arrivalKind;
    const phaseRates = this.phaseRates;
    const phaseOut = this.phaseOut;
    let t = this.t;
    let busy = this.busy;
    let phase = this.phase;
    let events = this.events;
    let calls = this.calls;
    let blockedFirst = this.blockedFirst;
    let busyIntegral = this.busyIntegral;
    let intensityIntegral = this.intensityIntegral;
    let refusingIntensityIntegral = this.refusingIntensityIntegral;
    const nearLevel = this.nearLevel;
    let nearCalls = this.nearRefusalCalls;
    let nearIntensity = this.nearRefusalIntensityIntegral;
    let nearAdmitted = this.nearRefusalAdmitted;
    let finished = false;
    const limit = events + maxEvents;
    while (events < limit) {
      // lambda: the intensity of calls offered to the group; q: the total rate out of the state.
      const departures = busy * mu;
      let lambda: number;
      let q: number;
      if (kind === A_POISSON) q = (lambda = this.rate) + departures;
      else if (kind === A_MMPP) q = (lambda = phaseRates[phase]) + departures + phaseOut[phase];
      else if (kind === A_FINITE) q = (lambda = (this.sources - busy) * this.idleRate) + departures;
      else if (kind === A_OVERFLOW) {
        lambda = this.overflowIntensity;
        q = this.primaryTotal + this.primaryBusySum * mu + departures;
      } else {
        lambda = this.phaseArrival[phase] ? phaseRates[phase] : 0;
        q = phaseRates[phase] + departures;
      }
      if (q === 0) {
        finished = true; // absorbing: nothing can happen any more
        break;
      }
      let sojourn = 1 / q;
      // A horizon or warm-up time that falls inside this sojourn splits it.
      while (t + sojourn >= this.control) {
        const part = this.control - t;
        occupancy[busy] += part;
        busyIntegral += busy * part;
        intensityIntegral += lambda * part;
        if (busy === servers) refusingIntensityIntegral += lambda * part;
        if (busy >= nearLevel) nearIntensity += lambda * part;
        t = this.control;
        sojourn -= part;
        if (this.measuring) {
          finished = true;
          break;
        }
        this.t = t;
        this.startMeasuring();
        calls = blockedFirst = 0;
        busyIntegral = intensityIntegral = refusingIntensityIntegral = 0;
        nearCalls = nearIntensity = nearAdmitted = 0;
      }
      if (finished) break;
      occupancy[busy] += sojourn;
      busyIntegral += busy * sojourn;
      intensityIntegral += lambda * sojourn;
      if (busy === servers) refusingIntensityIntegral += lambda * sojourn;
      if (busy >= nearLevel) nearIntensity += lambda * sojourn;
      t += sojourn;
      events++;
      const u = rng.next() * q;
      let call = false;
      let overflowed = NO_CALL;
      if (kind === A_OVERFLOW) {
        overflowed = this.overflowJump(u);
        if (overflowed === GROUP_DEPARTURE) busy--;
        else call = overflowed >= 0;
      }
      else if (kind === A_PHASE) {
        const completion = phaseRates[phase];
        if (u < completion) {
          // The phase ends: an arrival (then the next interarrival's first phase, drawn from the same uniform) or the next phase.
          if (this.phaseArrival[phase]) {
            call = true;
            phase = pick(this.phaseStart, u / completion);
          } else phase++;
        } else busy--;
      } else if (u < lambda) call = true;
      else if (u < lambda + departures) busy--;
      else {
        phase = pick(this.phaseJump[phase], rng.next());
      }
      if (call) {
        // A fresh call.
        if (!this.measuring && this.callsSeen >= this.warmupCallsTarget && this.warmupTimeTarget === 0) {
          this.t = t;
          this.startMeasuring();
          calls = blockedFirst = 0;
          busyIntegral = intensityIntegral = refusingIntensityIntegral = 0;
        nearCalls = nearIntensity = nearAdmitted = 0;
        }
        if (this.measuring && calls >= this.callsTarget) {
          events--;
          finished = true;
          break;
        }
        if (this.traceEvery > 0 && this.callsSeen >= this.nextTrace) {
          this.traceTime.push(t);
          this.traceBusy.push(busyIntegral);
          this.traceOrbit.push(0);
          this.traceQueue.push(0);
          this.traceCalls.push(this.callsSeen);
          while (this.nextTrace <= this.callsSeen) this.nextTrace += this.traceEvery;
        }
        this.callsSeen++;
        calls++;
        if (overflowed >= 0 && this.measuring) {
          this.primaryArrivals[overflowed]++;
          this.primaryOverflows[overflowed]++;
        }
        if (busy >= nearLevel) {
          nearCalls++;
          if (busy < servers) nearAdmitted++;
        }
        if (busy < servers) busy++;
        else blockedFirst++;
        if (this.measuring && !this.halfTaken && (calls >= this.halfCalls || t - this.measureStart >= this.halfSpan)) {
          this.halfTaken = true;
          this.halfTime = t - this.measureStart;
          this.halfBusyIntegral = busyIntegral;
        }
      }
    }
    this.t = t;
    this.busy = busy;
    this.phase = phase;
    this.events = events;
    this.calls = calls;
    this.blockedFirst = blockedFirst;
    this.busyIntegral = busyIntegral;
    this.intensityIntegral = intensityIntegral;
    this.refusingIntensityIntegral = refusingIntensityIntegral;
    this.nearRefusalCalls = nearCalls;
    this.nearRefusalIntensityIntegral = nearIntensity;
    this.nearRefusalAdmitted = nearAdmitted;
    if (finished) this.done = true;
    return finished;
  }

  /**
   * One jump of the overflow network below the group: a primary arrival admitted there (NO_CALL),
   * one overflowing (the primary's index: a call offered to the group, counted by the caller), a
   * primary departure (NO_CALL), or, for u beyond those, a departure from the group (GROUP_DEPARTURE).
   */
  private overflowJump(u: number): number {
    if (u < this.primaryTotal) {
      // u / total is uniform on [0, 1) given this branch: it also picks the primary.
      const i = pick(this.primaryChoice, u / this.primaryTotal);
      if (this.primaryBusy[i] === this.primaryServers[i]) return i;
      if (this.measuring) this.primaryArrivals[i]++;
      this.primaryBusySum++;
      if (++this.primaryBusy[i] === this.primaryServers[i]) this.overflowIntensity += this.primaryRates[i];
      return NO_CALL;
    }
    const w = (u - this.primaryTotal) / this.serviceRate;
    if (w >= this.primaryBusySum) return GROUP_DEPARTURE;
    let i = 0;
    let c = this.primaryBusy[0];
    while (w >= c) c += this.primaryBusy[++i];
    this.primaryBusySum--;
    if (this.primaryBusy[i]-- === this.primaryServers[i]) this.overflowIntensity -= this.primaryRates[i];
    return NO_CALL;
  }

  progress(): number {
    if (this.done) return 1;
    if (this.callsTarget !== Infinity) return Math.min(1, this.callsSeen / (this.warmupCallsTarget + this.callsTarget));
    const end = this.measuring ? this.control : this.warmupTimeTarget + this.horizon;
    return end === Infinity ? 0 : Math.min(1, this.t / end);
  }

  stats(): ReplicationStats {
    const admitted = this.calls - this.blockedFirst;
    const time = this.t - this.measureStart;
    const allBusy = this.occupancy[this.servers];
    // Constant-rate Poisson: rate x time, as the event loops report it.
    const poisson = this.arrivalKind === A_POISSON;
    let nearTime = 0;
    for (let k = this.nearLevel; k <= this.servers; k++) nearTime += this.occupancy[k];
    return {
      index: this.index,
      calls: this.calls,
      blockedFirst: this.blockedFirst,
      // No waiting line and no retrials: one attempt per call, refused calls are lost.
      attempts: this.calls,
      blockedAttempts: this.blockedFirst,
      lost: this.blockedFirst,
      admitted,
      waited: 0,
      abandoned: 0,
      waitSum: 0,
      time,
      busyIntegral: this.busyIntegral,
      orbitIntegral: 0,
      queueIntegral: 0,
      allBusyTime: allBusy,
      occupancy: this.occupancy,
      events: this.events,
      warmupCalls: this.warmupCallsTarget,
      warmupTime: this.measureStart,
      intensityIntegral: poisson ? this.rate * time : this.intensityIntegral,
      refusingIntensityIntegral: poisson ? this.rate * allBusy : this.refusingIntensityIntegral,
      refusingTime: allBusy,
      nearRefusalTime: nearTime,
      nearRefusalCalls: this.nearRefusalCalls,
      nearRefusalIntensityIntegral: poisson ? this.rate * nearTime : this.nearRefusalIntensityIntegral,
      nearRefusalHoldingDraws: this.nearRefusalAdmitted,
      nearRefusalHoldingSum: this.nearRefusalAdmitted * this.holdingMean,
      nearRefusalGapDeviation: 0,
      phaseSojournDeviation: 0,
      nearRefusalPhaseSojournDeviation: 0,
      holdingDraws: admitted,
      holdingSum: admitted * this.holdingMean,
      primaryArrivals: Array.from(this.primaryArrivals),
      primaryOverflows: Array.from(this.primaryOverflows),
      // Time-varying profiles run on the reference loop only (dispatch.ts).
      segmentCalls: [],
      segmentBlockedFirst: [],
      segmentAllBusyTime: [],
      segmentLost: [],
      halfTime: this.halfTime,
      halfBusyIntegral: this.halfBusyIntegral,
      halfOrbitIntegral: 0,
      halfQueueIntegral: 0,
      warmupAtBound: 0,
      path: this.path,
    };
  }
}
