import { BatchSizeSampler, LawSampler } from "./laws";
import { Random, SUBSTREAM } from "./random";
import type { Scenario } from "./scenario";
import { freshCallRate, lawMean, mmppOf, stationaryOfGenerator } from "./traffic";

/**
 * Counters of one replication, measured after the warm-up. This is the contract every event loop
 * (this reference loop and any specialised one) must fill identically: each field's meaning is
 * stated here, and the estimators of result.ts read only these fields (through the JSON-safe
 * ReplicationRecord of aggregate.ts), so a loop that fills them the same way gives the same result.
 */
export interface ReplicationStats {
  index: number;
  /** Fresh calls offered to the group under study (for `overflow`: the overflow calls). */
  calls: number;
  /** Fresh calls whose first attempt was refused (no free server, no free waiting position). */
  blockedFirst: number;
  /** All attempts: first attempts plus repeated attempts. */
  attempts: number;
  blockedAttempts: number;
  /** Calls that ended without service: refused and not retrying, out of attempts, or abandoned. */
  lost: number;
  /** Attempts admitted: seized a server at once or took a waiting position. */
  admitted: number;
  waited: number;
  abandoned: number;
  /** Total time spent waiting by admitted attempts (served or abandoned). */
  waitSum: number;
  /** Length of the measured period. */
  time: number;
  /** Time integral of the number of busy servers. */
  busyIntegral: number;
  orbitIntegral: number;
  queueIntegral: number;
  /** Time with all servers busy (= occupancy[servers], kept when the vector is folded away). */
  allBusyTime: number;
  /** Time spent at each busy count 0..servers. */
  occupancy: Float64Array;
  /** Events processed, warm-up included. */
  events: number;
  /** Fresh calls discarded as warm-up (chosen by MSER-5 when warm-up is "auto"). */
  warmupCalls: number;
  warmupTime: number;
  /**
   * Integral over the measured period of the fresh-call arrival intensity at the group under study,
   * i.e. the compensator of the fresh-call count (Bremaud, Point Processes and Queues, 1981): for
   * `poisson` rate x time; `mmpp`/`on-off` the current phase's rate; `time-varying` the profile's
   * rate; `finite-source` idle sources x idleRate; `overflow` the sum of the rates of the primaries
   * that are full (servers 0: always). Where the process has no such intensity it is the long-run
   * mean call rate x time (`renewal`: 1 / mean interarrival; `batch`: rate x mean batch size).
   * Its expectation equals that of `calls` (up to one call at the period's ends).
   */
  intensityIntegral: number;
  /**
   * The same integral restricted to the time when a first attempt would be refused (no free
   * server and no free waiting position): its expectation equals that of `blockedFirst` where the
   * process has an intensity and calls arrive one at a time (not `renewal`, not `batch`).
   */
  refusingIntensityIntegral: number;
  /** Time with no free server and no free waiting position (= allBusyTime without waiting positions). */
  refusingTime: number;
  /**
   * Time with the group near refusal: busy servers + waiting calls >= servers + waitingPositions -
   * `nearRefusalMargin(scenario)` (the refusing states included).
   */
  nearRefusalTime: number;
  /** Fresh calls whose first attempt arrived with the group near refusal (level judged just before the attempt). */
  nearRefusalCalls: number;
  /** Intensity integral (as `intensityIntegral`) over the time near refusal: compensator of `nearRefusalCalls`. */
  nearRefusalIntensityIntegral: number;
  /** Holding draws (and their sum) of calls that seized a server when the level just before was near refusal. */
  nearRefusalHoldingDraws: number;
  nearRefusalHoldingSum: number;
  /**
   * `renewal` only: sum over interarrival times drawn during the measured period while the group
   * was near refusal of (draw / mean - 1); expectation 0 by Wald's identity (the weight is known
   * before the draw).
   */
  nearRefusalGapDeviation: number;
  /**
   * `mmpp`/`on-off` only: sum over phase sojourns drawn during the measured period of
   * (sojourn x exit rate - 1) x (phase rate / mean rate - 1), and the same over sojourns drawn
   * while near refusal; expectation 0 by Wald's identity. A long stay in a busy phase is what
   * fills the group, so these track the burst lengths behind the estimate's variance.
   */
  phaseSojournDeviation: number;
  nearRefusalPhaseSojournDeviation: number;
  /** Holding times drawn during the measured period for the group under study (one per call that seized a server). */
  holdingDraws: number;
  /** Sum of those draws: holdingSum - holdingDraws x (the law's mean) has expectation 0 (Wald's identity). */
  holdingSum: number;
  /** `overflow` only (else empty): arrivals offered to each primary group during the measured period. */
  primaryArrivals: number[];
  /** `overflow` only (else empty): of those, the ones that found the primary full and overflowed to the group under study. */
  primaryOverflows: number[];
  /**
   * `time-varying` only (else empty), one entry per profile segment, summed over every cycle of the
   * measured period (a segment is "where in the cycle", not one interval of time): fresh calls
   * offered, their first attempts refused, and the time with all servers busy. A call belongs to the
   * segment containing its arrival instant (a boundary instant to the segment it ends). The time
   * spent in each segment is a function of the measured period alone (result.ts computes it from
   * warmupTime and time). Summed over segments they give calls, blockedFirst and allBusyTime.
   */
  segmentCalls: number[];
  segmentBlockedFirst: number[];
  segmentAllBusyTime: number[];
  /**
   * `time-varying` with retrials or waiting positions only (else empty; without them it equals
   * segmentBlockedFirst): calls given up in the measured period (refused for good, out of attempts
   * or abandoned), each counted for the segment where it first arrived. Summed over segments they
   * give lost.
   */
  segmentLost: number[];
  /**
   * Snapshot at the middle of the measured period (the fresh arrival at which half the calls, or
   * for horizon runs half the horizon, are reached; all 0 if the period ended before): elapsed
   * measured time and the busy, retrying and waiting integrals so far. Comparing the halves shows
   * a state still drifting after the warm-up.
   */
  halfTime: number;
  halfBusyIntegral: number;
  halfOrbitIntegral: number;
  halfQueueIntegral: number;
  /** 1 when the automatic warm-up (MSER-5) chose its last admissible truncation point for some watched state, else 0 (set by ReplicationJob). */
  warmupAtBound: number;
  /** Which loop produced these counters (dispatch.ts); absent means this reference loop. */
  path?: "reference" | "specialised" | "markov";
}

/**
 * Relative tolerance under which a heap event and a fresh arrival are one instant. Why: event
 * times are sums rounded at each step, so with deterministic laws a departure due exactly when
 * an arrival comes (interarrival 0.1, holding 0.3: 0.1 + 0.1 + 0.1 != 0 + 0.3 in binary) landed
 * an ulp or two after it, and D/D/3 with 3 E reported 16 % blocking instead of 0. A few ulps of
 * accumulated rounding are covered; continuous laws almost never come this close.
 */
const TIE = 16 * Number.EPSILON;

const K_DEPARTURE = 0;
const K_PRIMARY_DEPARTURE = 1;
const K_RETRY = 2;
/**
 * A retry's heap payload is its attempt number plus ORIGIN_STRIDE × the profile segment where the
 * call first arrived (time-varying only; else the segment is 0 and the payload the attempt number).
 * Attempts are at most LIMITS.maxAttempts (1 000) < ORIGIN_STRIDE.
 */
const ORIGIN_STRIDE = 2048;
const K_ABANDON = 3;

/**
 * Width of the "near refusal" window in levels below the capacity: about one standard deviation
 * of the busy count of the offered traffic on an unlimited group (sqrt(A), Poisson). The controls
 * of result.ts weight arrivals and holding times drawn in this window, where a fluctuation moves
 * the refusing time most (the approximating-martingale idea, Henderson & Glynn, Math. OR 27, 2002).
 */
export function nearRefusalMargin(scenario: Scenario): number {
  const h = lawMean(scenario.holding);
  const traffic = freshCallRate(scenario.arrivals, h) * h;
  return Math.max(1, Math.ceil(Math.sqrt(Number.isFinite(traffic) ? traffic : 1)));
}

const P_POISSON = 0;
const P_MMPP = 1;
const P_RENEWAL = 2;
const P_BATCH = 3;
const P_OVERFLOW = 4;
const P_FINITE = 5;
const P_TIME_VARYING = 6;

export interface ReplicationOptions {
  /** Overrides the scenario's warm-up with a number of fresh calls (used after MSER-5). */
  warmupCalls?: number;
  /** Record busy-integral snapshots every `traceEvery` fresh calls (MSER-5 pilot). */
  traceEvery?: number;
  /** Always use the general event loop (tests compare it with the fast path). */
  generalLoop?: boolean;
}

export { mmppOf, stationaryOfGenerator };

/**
 * One replication as a resumable state machine: `advance` runs a bounded number of events so
 * callers can report progress and honour cancellation between slices. The event list is a
 * binary heap on parallel typed arrays (time, tie sequence, kind, payload); the fresh-arrival
 * and phase-change clocks live outside the heap because each has exactly one pending instant.
 */
export class Replication {
  readonly index: number;
  done = false;

  // configuration
  private readonly servers: number;
  private readonly waitingPositions: number;
  private readonly process: number;
  private readonly holding: LawSampler;
  private readonly exponentialHoldingMean: number;
  private readonly interarrival?: LawSampler;
  private readonly batchSize?: BatchSizeSampler;
  private readonly allOrNothing: boolean;
  private readonly retryDelay?: LawSampler;
  private readonly persistence: number;
  private readonly maxAttempts: number;
  private readonly patience?: LawSampler;
  private readonly rate: number;
  private readonly sources: number;
  private readonly idleRate: number;
  // mmpp
  private readonly phaseRates: Float64Array = new Float64Array(0);
  private readonly phaseOut: Float64Array = new Float64Array(0);
  private readonly phaseJump: Float64Array[] = [];
  private phase = 0;
  private nextPhase = Infinity;
  // overflow
  private readonly primaryServers: Int32Array = new Int32Array(0);
  private readonly primaryBusy: Int32Array = new Int32Array(0);
  private readonly primaryChoice: Float64Array = new Float64Array(0);
  private readonly primaryRates: Float64Array = new Float64Array(0);
  private readonly primaryArrivals: Float64Array = new Float64Array(0);
  private readonly primaryOverflows: Float64Array = new Float64Array(0);
  /** Sum of the rates of the primaries that are full: the overflow stream's intensity. */
  private overflowIntensity = 0;
  // time-varying profile
  private readonly profileEnd: Float64Array = new Float64Array(0);
  private readonly profileRate: Float64Array = new Float64Array(0);
  private readonly cycle: number = 0;
  /** Integral of the profile's rate from the cycle start to the end of each segment. */
  private readonly profileCumulative: Float64Array = new Float64Array(0);
  private readonly cycleIntegral: number = 0;
  private segment = 0;
  private cycleStart = 0;
  /** Duration of each profile segment. */
  private readonly profileDuration: Float64Array = new Float64Array(0);
  // The profile segment holding the clock t (the arrival generator's `segment` runs ahead with nextArrival).
  private clockSegment = 0;
  private clockCycleStart = 0;
  private clockSegmentEnd = Infinity;
  // per-segment counters (time-varying only; see ReplicationStats)
  private readonly segmentCalls: Float64Array = new Float64Array(0);
  private readonly segmentBlockedFirst: Float64Array = new Float64Array(0);
  private readonly segmentAllBusyTime: Float64Array = new Float64Array(0);
  private readonly segmentLost: Float64Array = new Float64Array(0);

  // random streams
  private readonly arrivalRng: Random;
  private readonly holdingRng: Random;
  private readonly retryRng: Random;
  private readonly patienceRng: Random;

  // event list
  private heapTime: Float64Array;
  private heapSeq: Float64Array;
  private heapKind: Uint8Array;
  private heapPayload: Float64Array;
  private heapSize = 0;
  private seq = 0;

  // waiting line (ring buffer; abandoned entries are skipped lazily)
  private queueArrival: Float64Array;
  private queueAlive: Uint8Array;
  /** Profile segment where each waiting call first arrived (time-varying; segments <= 1 000). */
  private queueOrigin: Uint16Array;
  private queueHead = 0;
  private queueTail = 0;

  // state
  private t = 0;
  private busy = 0;
  private orbit = 0;
  private waiting = 0;
  private nextArrival = Infinity;
  private control = Infinity;
  private measuring = false;
  private callsSeen = 0;
  private readonly warmupCallsTarget: number;
  private readonly warmupTimeTarget: number;
  private readonly callsTarget: number;
  private readonly horizon: number;
  private readonly traceEvery: number;
  private readonly fastPath: boolean;
  readonly traceTime: number[] = [];
  readonly traceBusy: number[] = [];
  /** Retrying and waiting integrals at the same trace points (MSER-5 watches every state that can drift). */
  readonly traceOrbit: number[] = [];
  readonly traceQueue: number[] = [];
  /** Fresh calls seen before each trace point (the warm-up that cutting there discards). */
  readonly traceCalls: number[] = [];
  private nextTrace = 0;

  // statistics
  private calls = 0;
  private blockedFirst = 0;
  private attempts = 0;
  private blockedAttempts = 0;
  private lost = 0;
  private admitted = 0;
  private waited = 0;
  private abandoned = 0;
  private waitSum = 0;
  private busyIntegral = 0;
  private orbitIntegral = 0;
  private queueIntegral = 0;
  private measureStart = 0;
  private events = 0;
  /** Long-run mean fresh-call rate where the process has no intensity kept in the loop (poisson, batch, renewal). */
  private readonly meanCallRate: number = 0;
  private intensityIntegral = 0;
  private refusingIntensityIntegral = 0;
  private refusingTime = 0;
  private holdingDraws = 0;
  private holdingSum = 0;
  /** Lowest level (busy + waiting) counted as near refusal. */
  private readonly nearLevel: number;
  private nearRefusalTime = 0;
  private nearRefusalCalls = 0;
  private nearRefusalIntensityIntegral = 0;
  private nearRefusalHoldingDraws = 0;
  private nearRefusalHoldingSum = 0;
  private nearRefusalGapDeviation = 0;
  private phaseSojournDeviation = 0;
  private nearRefusalPhaseSojournDeviation = 0;
  /** MMPP: phase rate / stationary mean rate - 1, the weight of a sojourn's deviation. */
  private phaseWeight: Float64Array = new Float64Array(0);
  private readonly halfCalls: number;
  private readonly halfSpan: number;
  private halfTaken = false;
  private halfTime = 0;
  private halfBusyIntegral = 0;
  private halfOrbitIntegral = 0;
  private halfQueueIntegral = 0;
  private readonly occupancy: Float64Array;

  constructor(scenario: Scenario, index: number, options: ReplicationOptions = {}) {
    this.index = index;
    const seed = scenario.run.seed;
    this.arrivalRng = new Random(seed, index, SUBSTREAM.arrivals);
    this.holdingRng = new Random(seed, index, SUBSTREAM.holding);
    this.retryRng = new Random(seed, index, SUBSTREAM.retrials);
    this.patienceRng = new Random(seed, index, SUBSTREAM.patience);

    this.servers = scenario.servers;
    this.waitingPositions = scenario.waitingPositions;
    this.holding = new LawSampler(scenario.holding);
    this.exponentialHoldingMean = scenario.holding.law === "exponential" ? scenario.holding.mean : 0;
    this.patience = scenario.patience ? new LawSampler(scenario.patience) : undefined;
    const retrials = scenario.retrials;
    this.retryDelay = retrials && retrials.persistence > 0 ? new LawSampler(retrials.delay) : undefined;
    this.persistence = retrials?.persistence ?? 0;
    this.maxAttempts = retrials?.maxAttempts ?? Infinity;
    this.occupancy = new Float64Array(this.servers + 1);

    const a = scenario.arrivals;
    let rate = 0;
    let sources = 0;
    let idleRate = 0;
    let allOrNothing = false;
    let process = P_POISSON;
    let cycle = 0;
    const mmpp = mmppOf(a);
    let meanCallRate = 0;
    if (a.process === "poisson") meanCallRate = rate = a.rate;
    else if (mmpp) {
      process = P_MMPP;
      const k = mmpp.rates.length;
      this.phaseRates = Float64Array.from(mmpp.rates);
      this.phaseOut = new Float64Array(k);
      for (let i = 0; i < k; i++) {
        let out = 0;
        for (let j = 0; j < k; j++) if (j !== i) out += mmpp.switching[i][j];
        this.phaseOut[i] = out;
        const jump = new Float64Array(k);
        let s = 0;
        for (let j = 0; j < k; j++) {
          if (j !== i) s += mmpp.switching[i][j];
          jump[j] = out > 0 ? s / out : j >= i ? 1 : 0;
        }
        jump[k - 1] = 1; // rounding must not let a draw fall past the last phase
        this.phaseJump.push(jump);
      }
    } else if (a.process === "renewal") {
      process = P_RENEWAL;
      this.interarrival = new LawSampler(a.interarrival);
      meanCallRate = 1 / this.interarrival.mean;
    } else if (a.process === "batch") {
      process = P_BATCH;
      rate = a.rate;
      this.batchSize = new BatchSizeSampler(a.batchSize);
      meanCallRate = rate * this.batchSize.mean;
      allOrNothing = a.admission === "all-or-nothing";
    } else if (a.process === "overflow") {
      process = P_OVERFLOW;
      const rates = a.primaries.map((p) => p.traffic / this.holding.mean);
      rate = rates.reduce((x, y) => x + y, 0);
      this.primaryServers = Int32Array.from(a.primaries.map((p) => p.servers));
      this.primaryBusy = new Int32Array(a.primaries.length);
      let s = 0;
      this.primaryChoice = Float64Array.from(rates.map((r) => (s += r) / rate));
      this.primaryChoice[this.primaryChoice.length - 1] = 1;
      this.primaryRates = Float64Array.from(rates);
      this.primaryArrivals = new Float64Array(rates.length);
      this.primaryOverflows = new Float64Array(rates.length);
      rates.forEach((r, i) => {
        if (this.primaryServers[i] === 0) this.overflowIntensity += r;
      });
    } else if (a.process === "finite-source") {
      process = P_FINITE;
      sources = a.sources;
      idleRate = a.idleRate;
    } else if (a.process === "time-varying") {
      process = P_TIME_VARYING;
      this.profileEnd = new Float64Array(a.profile.length);
      this.profileRate = Float64Array.from(a.profile.map((s) => s.rate));
      this.profileDuration = Float64Array.from(a.profile.map((s) => s.duration));
      this.profileCumulative = new Float64Array(a.profile.length);
      let integral = 0;
      a.profile.forEach((s, i) => {
        this.profileEnd[i] = cycle += s.duration;
        this.profileCumulative[i] = integral += s.rate * s.duration;
      });
      this.cycleIntegral = integral;
      this.clockSegmentEnd = this.profileEnd[0];
      const m = a.profile.length;
      this.segmentCalls = new Float64Array(m);
      this.segmentBlockedFirst = new Float64Array(m);
      this.segmentAllBusyTime = new Float64Array(m);
      if (scenario.waitingPositions > 0 || (retrials && retrials.persistence > 0)) this.segmentLost = new Float64Array(m);
    }
    this.process = process;
    this.rate = rate;
    this.sources = sources;
    this.idleRate = idleRate;
    this.allOrNothing = allOrNothing;
    this.cycle = cycle;
    this.meanCallRate = meanCallRate;

    const capacity = 64;
    this.heapTime = new Float64Array(capacity);
    this.heapSeq = new Float64Array(capacity);
    this.heapKind = new Uint8Array(capacity);
    this.heapPayload = new Float64Array(capacity);
    this.queueArrival = new Float64Array(this.waitingPositions > 0 ? 16 : 0);
    this.queueAlive = new Uint8Array(this.queueArrival.length);
    this.queueOrigin = new Uint16Array(this.queueArrival.length);

    const run = scenario.run;
    this.callsTarget = run.callsPerReplication ?? Infinity;
    this.horizon = run.horizon ?? Infinity;
    this.warmupCallsTarget = options.warmupCalls ?? run.warmupCalls ?? 0;
    this.warmupTimeTarget = options.warmupCalls !== undefined ? 0 : (run.warmupTime ?? 0);
    this.traceEvery = options.traceEvery ?? 0;
    this.nearLevel = Math.max(0, this.servers + this.waitingPositions - nearRefusalMargin(scenario));
    this.halfCalls = this.callsTarget === Infinity ? Infinity : Math.ceil(this.callsTarget / 2);
    this.halfSpan = this.horizon === Infinity ? Infinity : this.horizon / 2;
    this.fastPath =
      !options.generalLoop && this.exponentialHoldingMean > 0 && process === P_POISSON && this.waitingPositions === 0 && !this.retryDelay && this.traceEvery === 0;
    if (this.warmupCallsTarget === 0 && this.warmupTimeTarget === 0) this.startMeasuring();
    else if (this.warmupTimeTarget > 0) this.control = this.warmupTimeTarget;

    // Start: empty system, MMPP phase drawn from its stationary law.
    if (process === P_MMPP) {
      const pi = stationaryOfGenerator(mmpp!.switching);
      const mean = pi.reduce((acc, p, i) => acc + p * mmpp!.rates[i], 0);
      this.phaseWeight = Float64Array.from(mmpp!.rates, (r) => r / mean - 1);
      const u = this.arrivalRng.next();
      let s = 0;
      this.phase = pi.length - 1;
      for (let i = 0; i < pi.length; i++) if (u <= (s += pi[i])) {
        this.phase = i;
        break;
      }
      this.enterPhase();
    } else this.scheduleFreshArrival();
  }

  private startMeasuring(): void {
    this.measuring = true;
    this.measureStart = this.t;
    this.calls = this.blockedFirst = this.attempts = this.blockedAttempts = this.lost = 0;
    this.admitted = this.waited = this.abandoned = 0;
    this.waitSum = this.busyIntegral = this.orbitIntegral = this.queueIntegral = 0;
    this.intensityIntegral = this.refusingIntensityIntegral = this.refusingTime = 0;
    this.holdingDraws = this.holdingSum = 0;
    this.nearRefusalTime = this.nearRefusalCalls = this.nearRefusalIntensityIntegral = this.nearRefusalHoldingDraws = this.nearRefusalHoldingSum = 0;
    this.nearRefusalGapDeviation = this.phaseSojournDeviation = this.nearRefusalPhaseSojournDeviation = 0;
    this.primaryArrivals.fill(0);
    this.primaryOverflows.fill(0);
    this.segmentCalls.fill(0);
    this.segmentBlockedFirst.fill(0);
    this.segmentAllBusyTime.fill(0);
    this.segmentLost.fill(0);
    this.halfTaken = false;
    this.halfTime = this.halfBusyIntegral = this.halfOrbitIntegral = this.halfQueueIntegral = 0;
    this.occupancy.fill(0);
    this.control = this.horizon === Infinity ? Infinity : this.t + this.horizon;
  }

  private enterPhase(): void {
    const p = this.phase;
    const out = this.phaseOut[p];
    if (out > 0) {
      const e = -Math.log(this.arrivalRng.next()); // sojourn x exit rate: a unit exponential
      this.nextPhase = this.t + e / out;
      if (this.measuring) {
        const deviation = (e - 1) * this.phaseWeight[p];
        this.phaseSojournDeviation += deviation;
        if (this.busy + this.waiting >= this.nearLevel) this.nearRefusalPhaseSojournDeviation += deviation;
      }
    } else this.nextPhase = Infinity;
    const r = this.phaseRates[p];
    this.nextArrival = r > 0 ? this.t - Math.log(this.arrivalRng.next()) / r : Infinity;
  }

  private scheduleFreshArrival(): void {
    const t = this.t;
    switch (this.process) {
      case P_POISSON:
      case P_BATCH:
      case P_OVERFLOW:
        this.nextArrival = t - Math.log(this.arrivalRng.next()) / this.rate;
        return;
      case P_MMPP: {
        const r = this.phaseRates[this.phase];
        this.nextArrival = r > 0 ? t - Math.log(this.arrivalRng.next()) / r : Infinity;
        return;
      }
      case P_RENEWAL: {
        const gap = this.interarrival!.sample(this.arrivalRng);
        this.nextArrival = t + gap;
        if (this.measuring && this.busy + this.waiting >= this.nearLevel) this.nearRefusalGapDeviation += gap / this.interarrival!.mean - 1;
        return;
      }
      case P_FINITE: {
        const idle = this.sources - this.busy - this.orbit - this.waiting;
        this.nextArrival = idle > 0 ? t - Math.log(this.arrivalRng.next()) / (idle * this.idleRate) : Infinity;
        return;
      }
      case P_TIME_VARYING:
        this.nextArrival = this.nextTimeVaryingArrival();
        return;
    }
  }

  /**
   * Exact inversion of the integrated piecewise-constant rate: a unit-rate Poisson process run on
   * the clock of the cumulative rate (Cinlar, Introduction to Stochastic Processes, 1975).
   */
  private nextTimeVaryingArrival(): number {
    let need = -Math.log(this.arrivalRng.next());
    let now = this.t;
    for (;;) {
      const end = this.cycleStart + this.profileEnd[this.segment];
      const r = this.profileRate[this.segment];
      const available = r * (end - now);
      if (available >= need && r > 0) return now + need / r;
      need -= available;
      now = end;
      if (++this.segment === this.profileEnd.length) {
        this.segment = 0;
        this.cycleStart += this.cycle;
        // Why: a profile with near-empty stretches needs many cycles per arrival; walking them one
        // segment at a time held the loop (and its cancellation check) for ever. Whole cycles are
        // skipped in one step; each call then walks at most one cycle's segments.
        if (need > this.cycleIntegral) {
          const cycles = Math.floor(need / this.cycleIntegral);
          need = Math.max(0, need - cycles * this.cycleIntegral);
          this.cycleStart += cycles * this.cycle;
          if (!Number.isFinite(this.cycleStart)) return Infinity; // no arrival within floating-point time
        }
        now = this.cycleStart;
      }
    }
  }

  /**
   * Moves the segment clock from t to `to`, adding the all-busy time to each profile segment the
   * interval crosses. An instant on a boundary stays in the segment it ends.
   */
  private advanceSegmentClock(to: number, allBusy: boolean): void {
    let from = this.t;
    const m = this.profileEnd.length;
    while (to > this.clockSegmentEnd) {
      if (allBusy) this.segmentAllBusyTime[this.clockSegment] += this.clockSegmentEnd - from;
      from = this.clockSegmentEnd;
      if (++this.clockSegment === m) {
        this.clockSegment = 0;
        this.clockCycleStart += this.cycle;
        // Whole cycles in one step: an idle stretch of a near-empty profile can span very many.
        let cycles = Math.floor((to - this.clockCycleStart) / this.cycle);
        if (cycles > 0 && this.clockCycleStart + cycles * this.cycle > to) cycles--;
        if (cycles > 0) {
          if (allBusy) for (let i = 0; i < m; i++) this.segmentAllBusyTime[i] += cycles * this.profileDuration[i];
          this.clockCycleStart += cycles * this.cycle;
          from = this.clockCycleStart;
        }
      }
      this.clockSegmentEnd = this.clockCycleStart + this.profileEnd[this.clockSegment];
    }
    if (allBusy) this.segmentAllBusyTime[this.clockSegment] += to - from;
  }

  /** Integral of the time-varying profile's rate from time 0 to t (periodic extension). */
  private profileIntegral(t: number): number {
    const cycles = Math.floor(t / this.cycle);
    const within = t - cycles * this.cycle;
    const ends = this.profileEnd;
    let lo = 0;
    let hi = ends.length - 1;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (ends[mid] < within) lo = mid + 1;
      else hi = mid;
    }
    const before = lo > 0 ? this.profileCumulative[lo - 1] : 0;
    const start = lo > 0 ? ends[lo - 1] : 0;
    return cycles * this.cycleIntegral + before + this.profileRate[lo] * Math.min(within - start, ends[lo] - start);
  }

  private push(time: number, kind: number, payload: number): void {
    if (this.heapSize === this.heapTime.length) this.growHeap();
    const ht = this.heapTime;
    const hs = this.heapSeq;
    const hk = this.heapKind;
    const hp = this.heapPayload;
    const seq = this.seq++;
    let i = this.heapSize++;
    while (i > 0) {
      const parent = (i - 1) >> 1;
      const pt = ht[parent];
      if (pt < time || (pt === time && hs[parent] < seq)) break;
      ht[i] = pt;
      hs[i] = hs[parent];
      hk[i] = hk[parent];
      hp[i] = hp[parent];
      i = parent;
    }
    ht[i] = time;
    hs[i] = seq;
    hk[i] = kind;
    hp[i] = payload;
  }

  /** Removes the root; the caller has read it already. */
  private popRoot(): void {
    const ht = this.heapTime;
    const hs = this.heapSeq;
    const hk = this.heapKind;
    const hp = this.heapPayload;
    const n = --this.heapSize;
    if (n === 0) return;
    const time = ht[n];
    const seq = hs[n];
    const kind = hk[n];
    const payload = hp[n];
    let i = 0;
    for (;;) {
      let child = 2 * i + 1;
      if (child >= n) break;
      const right = child + 1;
      if (right < n && (ht[right] < ht[child] || (ht[right] === ht[child] && hs[right] < hs[child]))) child = right;
      const ct = ht[child];
      if (time < ct || (time === ct && seq < hs[child])) break;
      ht[i] = ct;
      hs[i] = hs[child];
      hk[i] = hk[child];
      hp[i] = hp[child];
      i = child;
    }
    ht[i] = time;
    hs[i] = seq;
    hk[i] = kind;
    hp[i] = payload;
  }

  private growHeap(): void {
    const n = this.heapTime.length * 2;
    const grow = <T extends Float64Array | Uint8Array>(old: T, make: (n: number) => T) => {
      const next = make(n);
      next.set(old);
      return next;
    };
    this.heapTime = grow(this.heapTime, (k) => new Float64Array(k));
    this.heapSeq = grow(this.heapSeq, (k) => new Float64Array(k));
    this.heapKind = grow(this.heapKind, (k) => new Uint8Array(k));
    this.heapPayload = grow(this.heapPayload, (k) => new Float64Array(k));
  }

  private growQueue(): void {
    const old = this.queueArrival.length;
    const cap = old * 2;
    const arrival = new Float64Array(cap);
    const alive = new Uint8Array(cap);
    const origin = new Uint16Array(cap);
    for (let id = this.queueHead; id < this.queueTail; id++) {
      arrival[id % cap] = this.queueArrival[id % old];
      alive[id % cap] = this.queueAlive[id % old];
      origin[id % cap] = this.queueOrigin[id % old];
    }
    this.queueArrival = arrival;
    this.queueAlive = alive;
    this.queueOrigin = origin;
  }

  /** One attempt (fresh or repeated) at the group under study; `origin` is the profile segment where the call first arrived. */
  private attempt(attemptNumber: number, fresh: boolean, origin = 0): void {
    this.attempts++;
    const level = this.busy + this.waiting;
    if (fresh && level >= this.nearLevel) this.nearRefusalCalls++;
    if (this.busy < this.servers) {
      this.busy++;
      this.admitted++;
      this.seize(level);
      return;
    }
    if (this.waiting < this.waitingPositions) {
      this.admitted++;
      this.waited++;
      this.waiting++;
      if (this.queueTail - this.queueHead === this.queueArrival.length) this.growQueue();
      const id = this.queueTail++;
      const pos = id % this.queueArrival.length;
      this.queueArrival[pos] = this.t;
      this.queueAlive[pos] = 1;
      this.queueOrigin[pos] = origin;
      if (this.patience) this.push(this.t + this.patience.sample(this.patienceRng), K_ABANDON, id);
      return;
    }
    this.blockedAttempts++;
    if (fresh) {
      this.blockedFirst++;
      if (this.segmentBlockedFirst.length > 0) this.segmentBlockedFirst[this.clockSegment]++;
    }
    this.refused(attemptNumber, origin);
  }

  /** A call seizes a server of the group under study: draw its holding time and schedule the departure. */
  private seize(level: number): void {
    const h = this.holding.sample(this.holdingRng);
    this.holdingDraws++;
    this.holdingSum += h;
    if (level >= this.nearLevel) {
      this.nearRefusalHoldingDraws++;
      this.nearRefusalHoldingSum += h;
    }
    this.push(this.t + h, K_DEPARTURE, 0);
  }

  private refused(attemptNumber: number, origin = 0): void {
    if (this.retryDelay && attemptNumber < this.maxAttempts && this.retryRng.next() < this.persistence) {
      this.orbit++;
      this.push(this.t + this.retryDelay.sample(this.retryRng), K_RETRY, attemptNumber + ORIGIN_STRIDE * origin);
    } else this.lostOne(origin);
  }

  /** A call given up for good, counted for the profile segment where it first arrived. */
  private lostOne(origin: number): void {
    this.lost++;
    if (this.segmentLost.length > 0) this.segmentLost[origin]++;
  }

  /** Fresh arrival instant: returns false when the replication has enough calls. */
  private freshArrival(): boolean {
    if (this.process === P_OVERFLOW) {
      const u = this.arrivalRng.next();
      let i = 0;
      while (u > this.primaryChoice[i]) i++;
      if (this.primaryBusy[i] < this.primaryServers[i]) {
        if (this.measuring) this.primaryArrivals[i]++;
        if (++this.primaryBusy[i] === this.primaryServers[i]) this.overflowIntensity += this.primaryRates[i];
        this.push(this.t + this.holding.sample(this.holdingRng), K_PRIMARY_DEPARTURE, i);
        this.scheduleFreshArrival();
        return true;
      }
      if (!this.measuring && this.callsSeen >= this.warmupCallsTarget && this.warmupTimeTarget === 0) this.startMeasuring();
      if (this.measuring && this.calls >= this.callsTarget) return false;
      if (this.measuring) {
        this.primaryArrivals[i]++;
        this.primaryOverflows[i]++;
      }
    }
    if (!this.measuring && this.callsSeen >= this.warmupCallsTarget && this.warmupTimeTarget === 0) this.startMeasuring();
    if (this.measuring && this.calls >= this.callsTarget) return false;
    // Why: `callsSeen % traceEvery === 0` skipped trace points whenever a batch jumped over a
    // multiple, so batch pilots had unequal, sparse groups and run.ts mapped the MSER cut to
    // d * traceEvery calls instead of the calls actually seen at trace point d. Now a point is
    // taken at the first arrival at or past each multiple, and its call count is recorded.
    if (this.traceEvery > 0 && this.callsSeen >= this.nextTrace) {
      this.traceTime.push(this.t);
      this.traceBusy.push(this.busyIntegral);
      this.traceOrbit.push(this.orbitIntegral);
      this.traceQueue.push(this.queueIntegral);
      this.traceCalls.push(this.callsSeen);
      while (this.nextTrace <= this.callsSeen) this.nextTrace += this.traceEvery;
    }
    if (this.process === P_BATCH) {
      const size = this.batchSize!.sample(this.arrivalRng);
      this.callsSeen += size;
      this.calls += size;
      if (this.allOrNothing && size > this.servers - this.busy + this.waitingPositions - this.waiting) {
        this.attempts += size;
        this.blockedAttempts += size;
        this.blockedFirst += size;
        if (this.busy + this.waiting >= this.nearLevel) this.nearRefusalCalls += size;
        for (let c = 0; c < size; c++) this.refused(1);
      } else for (let c = 0; c < size; c++) this.attempt(1, true);
    } else {
      this.callsSeen++;
      this.calls++;
      if (this.segmentCalls.length > 0) this.segmentCalls[this.clockSegment]++;
      this.attempt(1, true, this.clockSegment);
    }
    if (this.measuring && !this.halfTaken && (this.calls >= this.halfCalls || this.t - this.measureStart >= this.halfSpan)) this.takeHalf(this.busyIntegral);
    this.scheduleFreshArrival();
    return true;
  }

  private takeHalf(busyIntegral: number): void {
    this.halfTaken = true;
    this.halfTime = this.t - this.measureStart;
    this.halfBusyIntegral = busyIntegral;
    this.halfOrbitIntegral = this.orbitIntegral;
    this.halfQueueIntegral = this.queueIntegral;
  }

  private departure(): void {
    this.busy--;
    while (this.waiting > 0) {
      const pos = this.queueHead % this.queueArrival.length;
      this.queueHead++;
      if (this.queueAlive[pos] === 0) continue;
      this.queueAlive[pos] = 0;
      const level = this.busy + this.waiting; // just before this call leaves the line for a server
      this.waiting--;
      this.waitSum += this.t - this.queueArrival[pos];
      this.busy++;
      this.seize(level);
      break;
    }
    if (this.waiting === 0) this.queueHead = this.queueTail; // drop abandoned leftovers
  }

  private abandon(id: number): void {
    if (id < this.queueHead) return; // already served
    const pos = id % this.queueArrival.length;
    if (this.queueAlive[pos] === 0) return;
    this.queueAlive[pos] = 0;
    this.waiting--;
    this.abandoned++;
    this.lostOne(this.queueOrigin[pos]);
    this.waitSum += this.t - this.queueArrival[pos];
  }

  /** Runs up to `maxEvents` events; returns true once the replication is complete. */
  advance(maxEvents: number): boolean {
    if (this.done) return true;
    if (this.fastPath) return this.advancePoissonExponential(maxEvents);
    const occupancy = this.occupancy;
    const finite = this.process === P_FINITE;
    const limit = this.events + maxEvents;
    while (this.events < limit) {
      let next = this.heapSize > 0 ? this.heapTime[0] : Infinity;
      let source = 0; // 0 heap, 1 phase change, 2 fresh arrival
      if (this.nextPhase < next) {
        next = this.nextPhase;
        source = 1;
      }
      if (this.nextArrival < next) {
        // A heap event a few ulps after the arrival is the same instant (see TIE): heap first.
        if (source === 0 && this.heapSize > 0 && next - this.nextArrival <= TIE * next) next = this.nextArrival;
        else {
          next = this.nextArrival;
          source = 2;
        }
      }
      if (this.control <= next) {
        this.integrate(this.control, occupancy);
        if (this.measuring) return this.finish();
        this.startMeasuring();
        continue;
      }
      if (next === Infinity) return this.finish(); // nothing can happen any more
      this.integrate(next, occupancy);
      this.events++;
      if (source === 2) {
        if (!this.freshArrival()) {
          this.events--;
          return this.finish();
        }
        continue;
      }
      if (source === 1) {
        const jump = this.phaseJump[this.phase];
        const u = this.arrivalRng.next();
        let j = 0;
        while (u > jump[j]) j++;
        this.phase = j;
        this.enterPhase();
        continue;
      }
      const kind = this.heapKind[0];
      const payload = this.heapPayload[0];
      this.popRoot();
      if (kind === K_DEPARTURE) this.departure();
      else if (kind === K_PRIMARY_DEPARTURE) {
        if (this.primaryBusy[payload]-- === this.primaryServers[payload]) this.overflowIntensity -= this.primaryRates[payload];
      }
      else if (kind === K_RETRY) {
        this.orbit--;
        const attempt = payload % ORIGIN_STRIDE;
        this.attempt(attempt + 1, false, (payload - attempt) / ORIGIN_STRIDE);
      } else this.abandon(payload);
      if (finite) this.scheduleFreshArrival(); // idle count changed; the clock is memoryless
    }
    return false;
  }

  private integrate(to: number, occupancy: Float64Array): void {
    const dt = to - this.t;
    occupancy[this.busy] += dt;
    this.busyIntegral += this.busy * dt;
    this.orbitIntegral += this.orbit * dt;
    this.queueIntegral += this.waiting * dt;
    const refusing = this.busy === this.servers && this.waiting === this.waitingPositions;
    const near = this.busy + this.waiting >= this.nearLevel;
    if (this.waitingPositions > 0) {
      if (refusing) this.refusingTime += dt;
      if (near) this.nearRefusalTime += dt;
    }
    // Constant-rate processes get rate x time in stats(); the others integrate their intensity here.
    let intensity = -1;
    switch (this.process) {
      case P_MMPP:
        intensity = this.phaseRates[this.phase] * dt;
        break;
      case P_FINITE:
        intensity = (this.sources - this.busy - this.orbit - this.waiting) * this.idleRate * dt;
        break;
      case P_OVERFLOW:
        intensity = this.overflowIntensity * dt;
        break;
      case P_TIME_VARYING:
        intensity = this.profileIntegral(to) - this.profileIntegral(this.t);
        this.advanceSegmentClock(to, this.busy === this.servers);
        break;
    }
    if (intensity >= 0) {
      this.intensityIntegral += intensity;
      if (refusing) this.refusingIntensityIntegral += intensity;
      if (near) this.nearRefusalIntensityIntegral += intensity;
    }
    this.t = to;
  }

  /**
   * Same algorithm and the same random draws as the general loop for Poisson arrivals and
   * exponential holding with no waiting line and no retrials, with the state in locals and the
   * heap inlined; a test checks both give bit-identical statistics.
   */
  private advancePoissonExponential(maxEvents: number): boolean {
    const occupancy = this.occupancy;
    const servers = this.servers;
    const meanHolding = this.exponentialHoldingMean;
    const meanGap = 1 / this.rate;
    const ar = this.arrivalRng;
    const hr = this.holdingRng;
    const ht = this.heapTime;
    const hs = this.heapSeq;
    if (ht.length < servers + 1) {
      while (this.heapTime.length < servers + 1) this.growHeap();
      return this.advancePoissonExponential(maxEvents);
    }
    const hk = this.heapKind;
    const hp = this.heapPayload;
    let n = this.heapSize;
    let seq = this.seq;
    let t = this.t;
    let busy = this.busy;
    let nextArrival = this.nextArrival;
    let events = this.events;
    let calls = this.calls;
    let blocked = this.blockedFirst;
    let busyIntegral = this.busyIntegral;
    let holdingSum = this.holdingSum;
    let nearCalls = this.nearRefusalCalls;
    let nearDraws = this.nearRefusalHoldingDraws;
    let nearSum = this.nearRefusalHoldingSum;
    const nearLevel = this.nearLevel;
    let finished = false;
    const limit = events + maxEvents;
    while (events < limit) {
      // Same tie rule as the general loop (TIE), so both consume the same draws.
      const departureFirst = n > 0 && (ht[0] <= nextArrival || ht[0] - nextArrival <= TIE * ht[0]);
      const next = departureFirst ? Math.min(ht[0], nextArrival) : nextArrival;
      if (this.control <= next) {
        // only a horizon or a warm-up time ends here: leave it to the general bookkeeping
        const dt = this.control - t;
        occupancy[busy] += dt;
        busyIntegral += busy * dt;
        t = this.control;
        if (this.measuring) {
          finished = true;
          break;
        }
        this.t = t;
        this.calls = calls;
        this.blockedFirst = blocked;
        this.startMeasuring();
        calls = 0;
        blocked = 0;
        busyIntegral = 0;
        holdingSum = 0;
        nearCalls = nearDraws = nearSum = 0;
        continue;
      }
      const dt = next - t;
      occupancy[busy] += dt;
      busyIntegral += busy * dt;
      t = next;
      if (departureFirst) {
        events++;
        busy--;
        // pop root
        const last = --n;
        if (last > 0) {
          const time = ht[last];
          const sq = hs[last];
          let i = 0;
          for (;;) {
            let child = 2 * i + 1;
            if (child >= last) break;
            const right = child + 1;
            if (right < last && (ht[right] < ht[child] || (ht[right] === ht[child] && hs[right] < hs[child]))) child = right;
            const ct = ht[child];
            if (time < ct || (time === ct && sq < hs[child])) break;
            ht[i] = ct;
            hs[i] = hs[child];
            i = child;
          }
          ht[i] = time;
          hs[i] = sq;
        }
        continue;
      }
      // fresh arrival
      if (!this.measuring && this.callsSeen >= this.warmupCallsTarget && this.warmupTimeTarget === 0) {
        this.t = t;
        this.startMeasuring();
        calls = 0;
        blocked = 0;
        busyIntegral = 0;
        holdingSum = 0;
        nearCalls = nearDraws = nearSum = 0;
      }
      if (this.measuring && calls >= this.callsTarget) {
        finished = true;
        break;
      }
      events++;
      this.callsSeen++;
      calls++;
      const near = busy >= nearLevel;
      if (near) nearCalls++;
      if (busy < servers) {
        busy++;
        const h = -meanHolding * Math.log(hr.next());
        holdingSum += h;
        if (near) {
          nearDraws++;
          nearSum += h;
        }
        const time = t + h;
        const sq = seq++;
        let i = n++;
        while (i > 0) {
          const parent = (i - 1) >> 1;
          const pt = ht[parent];
          if (pt < time || (pt === time && hs[parent] < sq)) break;
          ht[i] = pt;
          hs[i] = hs[parent];
          i = parent;
        }
        ht[i] = time;
        hs[i] = sq;
      } else blocked++;
      if (this.measuring && !this.halfTaken && (calls >= this.halfCalls || t - this.measureStart >= this.halfSpan)) {
        this.t = t;
        this.takeHalf(busyIntegral);
      }
      nextArrival = t - Math.log(ar.next()) * meanGap;
    }
    hk.fill(K_DEPARTURE, 0, n);
    hp.fill(0, 0, n);
    this.heapSize = n;
    this.seq = seq;
    this.t = t;
    this.busy = busy;
    this.nextArrival = nextArrival;
    this.events = events;
    this.calls = calls;
    this.blockedFirst = blocked;
    // Without waiting or retrials every call is one attempt; refused first attempts are lost.
    this.attempts = calls;
    this.blockedAttempts = blocked;
    this.lost = blocked;
    this.admitted = calls - blocked;
    this.holdingDraws = calls - blocked;
    this.holdingSum = holdingSum;
    this.nearRefusalCalls = nearCalls;
    this.nearRefusalHoldingDraws = nearDraws;
    this.nearRefusalHoldingSum = nearSum;
    this.busyIntegral = busyIntegral;
    if (finished) return this.finish();
    return false;
  }

  private finish(): boolean {
    this.done = true;
    return true;
  }

  /** Fraction of the replication done, for progress reports. */
  progress(): number {
    if (this.done) return 1;
    if (this.callsTarget !== Infinity) return Math.min(1, this.callsSeen / (this.warmupCallsTarget + this.callsTarget));
    const end = this.measuring ? this.control : this.warmupTimeTarget + this.horizon;
    return end === Infinity ? 0 : Math.min(1, this.t / end);
  }

  stats(): ReplicationStats {
    return {
      index: this.index,
      calls: this.calls,
      blockedFirst: this.blockedFirst,
      attempts: this.attempts,
      blockedAttempts: this.blockedAttempts,
      lost: this.lost,
      admitted: this.admitted,
      waited: this.waited,
      abandoned: this.abandoned,
      waitSum: this.waitSum,
      time: this.t - this.measureStart,
      busyIntegral: this.busyIntegral,
      orbitIntegral: this.orbitIntegral,
      queueIntegral: this.queueIntegral,
      allBusyTime: this.occupancy[this.servers],
      occupancy: this.occupancy,
      events: this.events,
      warmupCalls: this.warmupCallsTarget,
      warmupTime: this.measureStart,
      ...this.intensityStats(),
      refusingTime: this.waitingPositions > 0 ? this.refusingTime : this.occupancy[this.servers],
      nearRefusalTime: this.nearTime(),
      nearRefusalCalls: this.nearRefusalCalls,
      nearRefusalHoldingDraws: this.nearRefusalHoldingDraws,
      nearRefusalHoldingSum: this.nearRefusalHoldingSum,
      nearRefusalGapDeviation: this.nearRefusalGapDeviation,
      phaseSojournDeviation: this.phaseSojournDeviation,
      nearRefusalPhaseSojournDeviation: this.nearRefusalPhaseSojournDeviation,
      holdingDraws: this.holdingDraws,
      holdingSum: this.holdingSum,
      primaryArrivals: Array.from(this.primaryArrivals),
      primaryOverflows: Array.from(this.primaryOverflows),
      segmentCalls: Array.from(this.segmentCalls),
      segmentBlockedFirst: Array.from(this.segmentBlockedFirst),
      segmentAllBusyTime: Array.from(this.segmentAllBusyTime),
      segmentLost: Array.from(this.segmentLost),
      halfTime: this.halfTime,
      halfBusyIntegral: this.halfBusyIntegral,
      halfOrbitIntegral: this.halfOrbitIntegral,
      halfQueueIntegral: this.halfQueueIntegral,
      warmupAtBound: 0,
    };
  }

  /** Without waiting positions the level is the busy count, so the window's time is read off the occupancy (the same in every loop). */
  private nearTime(): number {
    if (this.waitingPositions > 0) return this.nearRefusalTime;
    let sum = 0;
    for (let k = this.nearLevel; k <= this.servers; k++) sum += this.occupancy[k];
    return sum;
  }

  private intensityStats(): { intensityIntegral: number; refusingIntensityIntegral: number; nearRefusalIntensityIntegral: number } {
    if (this.meanCallRate === 0)
      return { intensityIntegral: this.intensityIntegral, refusingIntensityIntegral: this.refusingIntensityIntegral, nearRefusalIntensityIntegral: this.nearRefusalIntensityIntegral };
    // Constant rate: the same products in every loop (the fast path keeps no intensity sum).
    const refusing = this.waitingPositions > 0 ? this.refusingTime : this.occupancy[this.servers];
    return {
      intensityIntegral: this.meanCallRate * (this.t - this.measureStart),
      refusingIntensityIntegral: this.meanCallRate * refusing,
      nearRefusalIntensityIntegral: this.meanCallRate * this.nearTime(),
    };
  }
}
