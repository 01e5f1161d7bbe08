import { nearRefusalMargin, type ReplicationOptions, type ReplicationStats } from "./engine";
import { BatchSizeSampler, LawSampler } from "./laws";
import { Random, SUBSTREAM } from "./random";
import type { Scenario } from "./scenario";
import type { Law } from "../teletraffic/laws";
import { mmppOf, stationaryOfGenerator } from "./traffic";
import * as ziggurat from "./ziggurat";

// Module-local bindings: module loaders that turn imports into property getters (tsx, vitest)
// would otherwise pay a getter call on every draw.
const { zigExponential, zigNormal, ke, we, kn, wn, exponentialFix, normalFix } = ziggurat;

// Random.next(): (k + 0.5) / 2^32 for the 32-bit word k (random.ts); the loop draws uniforms inline.
const U_STEP = 2.3283064365386963e-10;
const U_HALF = 1.1641532182693481e-10;

/**
 * The specialised event loop: the reference loop's model and event order (engine.ts), with the
 * whole state in locals for the length of a slice, the event list a binary heap keyed on time only
 * (kind and payload packed into one number beside it), and the laws switched on numeric codes
 * inside the loop. With `streams: "ziggurat"` (the default) exponential and normal draws come from
 * ziggurats (ziggurat.ts) instead of logarithms; with `streams: "reference"` every draw is the
 * reference loop's, and a test checks the statistics are bit-identical to engine.ts.
 *
 * A heap keyed on time only pops events due at exactly the same instant in an arbitrary order.
 * That changes nothing when the simultaneous events commute (departures, primary departures); it
 * would when a retry or an abandonment meets another heap event at the same instant, which only
 * lattice laws make possible, so `fastLoopApplies` leaves those scenarios to the reference loop.
 * Time-varying arrivals also stay there (their clock is the reference loop's own).
 */

/**
 * Events in a replication's first slice: enough for V8 to give advance() its feedback vector
 * (allocated after about eight times its bytecode size has run), few enough to end before the
 * loop is optimised (see advance()).
 */
const FIRST_SLICE = 1000;

/** Same instant tolerance as the reference loop (engine.ts TIE; see there why). */
const TIE = 16 * Number.EPSILON;

// Heap entry kinds, packed as data = payload * 4 + kind.
const K_DEPARTURE = 0;
const K_PRIMARY_DEPARTURE = 1;
const K_RETRY = 2;
const K_ABANDON = 3;

const A_POISSON = 0;
const A_MMPP = 1;
const A_RENEWAL = 2;
const A_BATCH = 3;
const A_OVERFLOW = 4;
const A_FINITE = 5;

/**
 * Starting value of every field that will hold fractions. V8 gives a field the representation of the
 * first value stored in it, and a field created holding a small integer that later receives a
 * fraction deprecates the object's hidden class: that deoptimised the loop a few times per run, and
 * again in every fresh worker thread. NaN is a double, and a field left at it would show in the
 * results; the constructor stores every real starting value.
 */
const UNSET = Number.NaN;

export type StreamKind = "ziggurat" | "reference";

export interface FastLoopOptions extends Omit<ReplicationOptions, "generalLoop"> {
  /** "reference" reproduces the reference loop's draws exactly (for the equality test). */
  streams?: StreamKind;
}

const lattice = (law: { law: string } | undefined) => law !== undefined && (law.law === "deterministic" || law.law === "empirical");

/** Why the specialised loop cannot run a scenario, or undefined when it can. */
export function fastLoopRefusal(scenario: Scenario): string | undefined {
  if (scenario.arrivals.process === "time-varying") return "time-varying arrivals";
  const reordering = (scenario.retrials && scenario.retrials.persistence > 0) || scenario.patience;
  if (reordering && (lattice(scenario.holding) || lattice(scenario.patience) || lattice(scenario.retrials?.delay)))
    return "simultaneous heap events of different kinds are possible (lattice laws with retrials or patience)";
  return undefined;
}

/** What a LawSampler keeps (laws.ts): read here to draw the commonest laws where the loop can inline them. */
interface SamplerParameters {
  readonly code: number;
  readonly a: number;
  readonly b: number;
  readonly table: Float64Array;
  readonly values: Float64Array;
}

// The sampler codes of the ziggurat laws drawn inline, taken from laws.ts itself. Means and
// coefficients of variation that are not small integers also settle LawSampler's fields on their
// double representation at load, before any loop is compiled against them.
const codeOf = (law: Law) => new LawSampler(law, { ziggurat: true }).code;
const ZIG_EXPONENTIAL = codeOf({ law: "exponential", mean: 0.5 });
const ZIG_LOGNORMAL = codeOf({ law: "lognormal", mean: 0.5, cv: 0.5 });
const ZIG_HYPEREXPONENTIAL = codeOf({ law: "hyperexponential", mean: 0.5, scv: 4 });

/**
 * LawSampler.sample with the commonest ziggurat laws written out: the same operations in the same
 * order, so the same draws. For the patience draw, which the loop does not write out (advance()
 * writes out the holding, interarrival and retry-delay draws, which are hot). Every other law goes
 * to the sampler.
 */
function draw(sampler: LawSampler, rng: Random): number {
  const p = sampler as unknown as SamplerParameters;
  const code = p.code;
  return code === ZIG_EXPONENTIAL
    ? p.a * zigExponential(rng)
    : code === ZIG_LOGNORMAL
      ? Math.exp(p.a + p.b * zigNormal(rng))
      : code === ZIG_HYPEREXPONENTIAL
        ? hyperexponentialDraw(p, rng)
        : sampler.sample(rng);
}

function hyperexponentialDraw(p: SamplerParameters, rng: Random): number {
  const table = p.table;
  const u = rng.next();
  let i = 0;
  while (i < table.length - 1 && u > table[i]) i++;
  return p.values[i] * zigExponential(rng);
}

/** No law: the parameters `advance` reads for a sampler the scenario does not have. */
const NO_LAW: SamplerParameters = { code: -1, a: 0, b: 0, table: new Float64Array(0), values: new Float64Array(0) };

/** A sampler's parameters, for the laws `advance` draws inline. */
function inlineLaw(sampler: LawSampler | undefined): SamplerParameters {
  return sampler ? (sampler as unknown as SamplerParameters) : NO_LAW;
}

/** Standard exponential draw of the chosen streams; -log(u) is the reference loop's form. */
function unitExponential(rng: Random, zig: boolean): number {
  return zig ? zigExponential(rng) : -Math.log(rng.next());
}

export class FastReplication {
  readonly index: number;
  done = false;
  readonly path = "specialised" as const;

  private readonly zig: boolean;
  private readonly servers: number;
  private readonly waitingPositions: number;
  private readonly arrivalKind: number;
  private readonly holding: LawSampler;
  private readonly interarrival?: LawSampler;
  private readonly batchSize?: BatchSizeSampler;
  private readonly allOrNothing: boolean = false;
  private readonly retryDelay?: LawSampler;
  private readonly persistence: number;
  private readonly maxAttempts: number;
  private readonly patience?: LawSampler;
  private readonly rate: number = UNSET;
  private readonly sources: number = 0;
  private readonly idleRate: number = UNSET;
  private readonly phaseRates: Float64Array = new Float64Array(0);
  private readonly phaseOut: Float64Array = new Float64Array(0);
  private readonly phaseJump: Float64Array[] = [];
  private phaseWeight: Float64Array = new Float64Array(0);
  private readonly primaryServers: Int32Array = new Int32Array(0);
  private readonly primaryBusy: Int32Array = new Int32Array(0);
  private readonly primaryChoice: Float64Array = new Float64Array(0);
  private readonly primaryRates: Float64Array = new Float64Array(0);
  private readonly primaryArrivals: Float64Array = new Float64Array(0);
  private readonly primaryOverflows: Float64Array = new Float64Array(0);
  /** Sum of the rates of the primaries that are full: the overflow stream's intensity. */
  private overflowIntensity = UNSET;

  private readonly arrivalRng: Random;
  private readonly holdingRng: Random;
  private readonly retryRng: Random;
  private readonly patienceRng: Random;

  private heapTime: Float64Array;
  private heapData: Float64Array;
  private heapSize = 0;

  private queueArrival: Float64Array;
  private queueAlive: Uint8Array;
  private queueHead = 0;
  private queueTail = 0;

  private t = UNSET;
  private busy = 0;
  private orbit = 0;
  private waiting = 0;
  private phase = 0;
  private nextPhase = Infinity;
  private nextArrival = Infinity;
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
  /** Events in the next slice at most: FIRST_SLICE, then no cap (see advance()). Starts as a double (see UNSET). */
  private sliceCap = Infinity;

  private calls = 0;
  private blockedFirst = 0;
  private attempts = 0;
  private blockedAttempts = 0;
  private lost = 0;
  private admitted = 0;
  private waited = 0;
  private abandoned = 0;
  private waitSum = UNSET;
  private busyIntegral = UNSET;
  private orbitIntegral = UNSET;
  private queueIntegral = UNSET;
  private measureStart = UNSET;
  private events = 0;
  private readonly meanCallRate: number = UNSET;
  private intensityIntegral = UNSET;
  private refusingIntensityIntegral = UNSET;
  private refusingTime = UNSET;
  private holdingDraws = 0;
  private holdingSum = UNSET;
  /** Lowest level (busy + waiting) counted as near refusal (engine.ts nearRefusalMargin). */
  private readonly nearLevel: number;
  private nearRefusalTime = UNSET;
  private nearRefusalCalls = 0;
  private nearRefusalIntensityIntegral = UNSET;
  private nearRefusalHoldingDraws = 0;
  private nearRefusalHoldingSum = UNSET;
  private nearRefusalGapDeviation = UNSET;
  private phaseSojournDeviation = UNSET;
  private nearRefusalPhaseSojournDeviation = UNSET;
  private readonly halfCalls: number;
  private readonly halfSpan: number;
  private halfTaken = false;
  private halfTime = UNSET;
  private halfBusyIntegral = UNSET;
  private halfOrbitIntegral = UNSET;
  private halfQueueIntegral = UNSET;
  private readonly occupancy: Float64Array;

  constructor(scenario: Scenario, index: number, options: FastLoopOptions = {}) {
    const refusal = fastLoopRefusal(scenario);
    if (refusal) throw new Error(`the specialised loop does not run this scenario: ${refusal}`);
    this.index = index;
    this.sliceCap = FIRST_SLICE;
    this.t = this.measureStart = this.overflowIntensity = 0;
    this.rate = this.idleRate = this.meanCallRate = 0;
    const zig = (this.zig = (options.streams ?? "ziggurat") === "ziggurat");
    const seed = scenario.run.seed;
    this.arrivalRng = new Random(seed, index, SUBSTREAM.arrivals);
    this.holdingRng = new Random(seed, index, SUBSTREAM.holding);
    this.retryRng = new Random(seed, index, SUBSTREAM.retrials);
    this.patienceRng = new Random(seed, index, SUBSTREAM.patience);
    this.servers = scenario.servers;
    this.waitingPositions = scenario.waitingPositions;
    this.holding = new LawSampler(scenario.holding, { ziggurat: zig });
    this.patience = scenario.patience ? new LawSampler(scenario.patience, { ziggurat: zig }) : undefined;
    const retrials = scenario.retrials;
    this.retryDelay = retrials && retrials.persistence > 0 ? new LawSampler(retrials.delay, { ziggurat: zig }) : undefined;
    this.persistence = retrials?.persistence ?? 0;
    this.maxAttempts = retrials?.maxAttempts ?? Infinity;
    this.occupancy = new Float64Array(this.servers + 1);
    this.zeroStatistics();

    const a = scenario.arrivals;
    const mmpp = mmppOf(a);
    let kind = A_POISSON;
    let primaryServers = 0;
    if (a.process === "poisson") this.meanCallRate = this.rate = a.rate;
    else if (mmpp) {
      kind = A_MMPP;
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
        jump[k - 1] = 1;
        this.phaseJump.push(jump);
      }
    } else if (a.process === "renewal") {
      kind = A_RENEWAL;
      this.interarrival = new LawSampler(a.interarrival, { ziggurat: zig });
      this.meanCallRate = 1 / this.interarrival.mean;
    } else if (a.process === "batch") {
      kind = A_BATCH;
      this.rate = a.rate;
      this.batchSize = new BatchSizeSampler(a.batchSize);
      this.meanCallRate = a.rate * this.batchSize.mean;
      this.allOrNothing = a.admission === "all-or-nothing";
    } else if (a.process === "overflow") {
      kind = A_OVERFLOW;
      const rates = a.primaries.map((p) => p.traffic / this.holding.mean);
      const rate = rates.reduce((x, y) => x + y, 0);
      this.rate = rate;
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
      primaryServers = a.primaries.reduce((x, p) => x + p.servers, 0);
    } else if (a.process === "finite-source") {
      kind = A_FINITE;
      this.sources = a.sources;
      this.idleRate = a.idleRate;
    }
    this.arrivalKind = kind;

    // Without retrials or patience the heap never holds more than the servers in use.
    const capacity = this.retryDelay || this.patience ? 64 : this.servers + primaryServers + 1;
    this.heapTime = new Float64Array(capacity);
    this.heapData = new Float64Array(capacity);
    this.queueArrival = new Float64Array(this.waitingPositions > 0 ? 16 : 0);
    this.queueAlive = new Uint8Array(this.queueArrival.length);

    const run = scenario.run;
    this.callsTarget = run.callsPerReplication ?? Infinity;
    this.horizon = run.horizon ?? Infinity;
    this.warmupCallsTarget = options.warmupCalls ?? run.warmupCalls ?? 0;
    this.warmupTimeTarget = options.warmupCalls !== undefined ? 0 : (run.warmupTime ?? 0);
    this.traceEvery = options.traceEvery ?? 0;
    this.nearLevel = Math.max(0, this.servers + this.waitingPositions - nearRefusalMargin(scenario));
    this.halfCalls = this.callsTarget === Infinity ? Infinity : Math.ceil(this.callsTarget / 2);
    this.halfSpan = this.horizon === Infinity ? Infinity : this.horizon / 2;
    if (this.warmupCallsTarget === 0 && this.warmupTimeTarget === 0) this.startMeasuring();
    else if (this.warmupTimeTarget > 0) this.control = this.warmupTimeTarget;

    if (kind === A_MMPP) {
      const pi = stationaryOfGenerator(mmpp!.switching);
      const mean = pi.reduce((acc, p, i) => acc + p * mmpp!.rates[i], 0);
      this.phaseWeight = Float64Array.from(mmpp!.rates, (r) => r / mean - 1);
      const u = this.arrivalRng.next();
      let s = 0;
      this.phase = pi.length - 1;
      for (let i = 0; i < pi.length; i++)
        if (u <= (s += pi[i])) {
          this.phase = i;
          break;
        }
      this.enterPhase(0);
    } else this.nextArrival = this.freshArrivalAfter(0, 0, 0, 0);
  }

  private startMeasuring(): void {
    this.measuring = true;
    this.measureStart = this.t;
    this.zeroStatistics();
    this.control = this.horizon === Infinity ? Infinity : this.t + this.horizon;
  }

  private zeroStatistics(): void {
    this.calls = this.blockedFirst = this.attempts = this.blockedAttempts = this.lost = 0;
    this.admitted = this.waited = this.abandoned = 0;
    this.waitSum = this.busyIntegral = this.orbitIntegral = this.queueIntegral = 0;
    this.intensityIntegral = this.refusingIntensityIntegral = this.refusingTime = 0;
    this.holdingDraws = this.holdingSum = 0;
    this.nearRefusalTime = this.nearRefusalCalls = this.nearRefusalIntensityIntegral = this.nearRefusalHoldingDraws = this.nearRefusalHoldingSum = 0;
    this.nearRefusalGapDeviation = this.phaseSojournDeviation = this.nearRefusalPhaseSojournDeviation = 0;
    this.primaryArrivals.fill(0);
    this.primaryOverflows.fill(0);
    this.halfTaken = false;
    this.halfTime = this.halfBusyIntegral = this.halfOrbitIntegral = this.halfQueueIntegral = 0;
    this.occupancy.fill(0);
  }

  /** Draws both MMPP clocks for the current phase (phase change first, as the reference loop does); `level` is busy + waiting. */
  private enterPhase(level: number): void {
    const p = this.phase;
    const out = this.phaseOut[p];
    if (out > 0) {
      const e = unitExponential(this.arrivalRng, this.zig); // sojourn x exit rate: a unit exponential
      this.nextPhase = this.t + e / out;
      if (this.measuring) {
        const deviation = (e - 1) * this.phaseWeight[p];
        this.phaseSojournDeviation += deviation;
        if (level >= this.nearLevel) this.nearRefusalPhaseSojournDeviation += deviation;
      }
    } else this.nextPhase = Infinity;
    const r = this.phaseRates[p];
    this.nextArrival = r > 0 ? this.t + unitExponential(this.arrivalRng, this.zig) / r : Infinity;
  }

  /** One renewal interarrival gap; `level` is busy + waiting when it is drawn. */
  private renewalGap(level: number): number {
    const gap = draw(this.interarrival!, this.arrivalRng);
    if (this.measuring && level >= this.nearLevel) this.nearRefusalGapDeviation += gap / this.interarrival!.mean - 1;
    return gap;
  }

  /** The next fresh arrival instant after `t` (for finite sources it depends on the state). */
  private freshArrivalAfter(t: number, busy: number, orbit: number, waiting: number): number {
    switch (this.arrivalKind) {
      case A_MMPP: {
        const r = this.phaseRates[this.phase];
        return r > 0 ? t + unitExponential(this.arrivalRng, this.zig) / r : Infinity;
      }
      case A_RENEWAL:
        return t + this.renewalGap(busy + waiting);
      case A_FINITE: {
        const idle = this.sources - busy - orbit - waiting;
        return idle > 0 ? t + unitExponential(this.arrivalRng, this.zig) / (idle * this.idleRate) : Infinity;
      }
      default:
        return t + unitExponential(this.arrivalRng, this.zig) / this.rate;
    }
  }

  /** Doubles the event list's arrays; `size` entries are in use. */
  private growHeap(size: number): void {
    const time = new Float64Array(size * 2);
    const data = new Float64Array(size * 2);
    time.set(this.heapTime);
    data.set(this.heapData);
    this.heapTime = time;
    this.heapData = data;
  }

  private growQueue(): void {
    const old = this.queueArrival.length;
    const cap = old * 2;
    const arrival = new Float64Array(cap);
    const alive = new Uint8Array(cap);
    for (let id = this.queueHead; id < this.queueTail; id++) {
      arrival[id % cap] = this.queueArrival[id % old];
      alive[id % cap] = this.queueAlive[id % old];
    }
    this.queueArrival = arrival;
    this.queueAlive = alive;
  }

  /** Runs up to `maxEvents` events; returns true once the replication is complete. */
  advance(maxEvents: number): boolean {
    if (this.done) return true;
    const occupancy = this.occupancy;
    const servers = this.servers;
    const waitingPositions = this.waitingPositions;
    const kind = this.arrivalKind;
    const finite = kind === A_FINITE;
    const overflow = kind === A_OVERFLOW;
    const mmpp = kind === A_MMPP;
    const renewal = kind === A_RENEWAL;
    // Processes whose intensity the loop integrates (the others get rate x time in stats()).
    const integrated = mmpp || finite || overflow;
    const holding = this.holding;
    const retryDelay = this.retryDelay;
    const retrying = retryDelay !== undefined;
    const persistence = this.persistence;
    const maxAttempts = this.maxAttempts;
    const patience = this.patience;
    const callsTarget = this.callsTarget;
    const traceEvery = this.traceEvery;
    const sources = this.sources;
    const idleRate = this.idleRate;
    const phaseRates = this.phaseRates;
    const phaseOut = this.phaseOut;
    const phaseWeight = this.phaseWeight;
    const phaseJump = this.phaseJump;
    const primaryChoice = this.primaryChoice;
    const primaryBusy = this.primaryBusy;
    const primaryServers = this.primaryServers;
    const primaryRates = this.primaryRates;
    const interarrival = this.interarrival;
    const interarrivalMean = interarrival ? interarrival.mean : 0;
    const zig = this.zig;
    const rate = this.rate;
    // Poisson-timed fresh arrivals (Poisson, batch, overflow): their next instant is a unit exponential over `rate`.
    const poissonTimed = kind === A_POISSON || kind === A_BATCH || overflow;
    // The laws drawn inline below (see `inlineLaw`); any other law goes to its sampler.
    const { code: hlCode, a: hlA, b: hlB, table: hlTable, values: hlValues } = inlineLaw(holding);
    const hlFast = hlCode === ZIG_EXPONENTIAL || hlCode === ZIG_HYPEREXPONENTIAL || hlCode === ZIG_LOGNORMAL;
    const { code: glCode, a: glA, b: glB, table: glTable, values: glValues } = inlineLaw(interarrival);
    const glFast = glCode === ZIG_EXPONENTIAL || glCode === ZIG_HYPEREXPONENTIAL || glCode === ZIG_LOGNORMAL;
    const { code: dlCode, a: dlA, b: dlB, table: dlTable, values: dlValues } = inlineLaw(retryDelay);
    const dlFast = dlCode === ZIG_EXPONENTIAL || dlCode === ZIG_HYPEREXPONENTIAL || dlCode === ZIG_LOGNORMAL;
    // The arrival, holding and retry streams' xoshiro128** words, in locals for the slice: every
    // draw on them is written out below (random.ts nextUint32, the same operations), with the
    // ziggurat's fast path inline and its rare slow path (ziggurat.ts) called on the objects after
    // the words are stored back. Called, a draw returns its double boxed, which allocates; and
    // V8's inlining budget runs out long before this loop's draw sites are all inlined. The unary
    // plus on every call's result below is for the same reason: a variable that may receive a
    // call's (tagged) result is kept boxed on every path, the fast one included.
    const ar = this.arrivalRng;
    const hr = this.holdingRng;
    const rr = this.retryRng;
    let ar0 = ar.a, ar1 = ar.b, ar2 = ar.c, ar3 = ar.d;
    let hr0 = hr.a, hr1 = hr.b, hr2 = hr.c, hr3 = hr.d;
    let rr0 = rr.a, rr1 = rr.b, rr2 = rr.c, rr3 = rr.d;
    // The event list in locals for the slice: pushes and pops are written out in the loop below
    // (growHeap() replaces the arrays when full).
    let ht = this.heapTime;
    let hd = this.heapData;
    let hn = this.heapSize;
    // Copies of fields, stored back at the end of the slice (startMeasuring() resets some).
    let nextPhase = this.nextPhase;
    let control = this.control;
    let measuring = this.measuring;
    let phase = this.phase;
    let callsSeen = this.callsSeen;
    let overflowIntensity = this.overflowIntensity;
    let halfTaken = this.halfTaken;
    let halfTime = this.halfTime;
    let halfBusy = this.halfBusyIntegral;
    let halfOrbit = this.halfOrbitIntegral;
    let halfQueue = this.halfQueueIntegral;
    const halfCalls = this.halfCalls;
    const halfSpan = this.halfSpan;
    let measureStart = this.measureStart;
    let t = this.t;
    let busy = this.busy;
    let orbit = this.orbit;
    let waiting = this.waiting;
    let nextArrival = this.nextArrival;
    let events = this.events;
    let calls = this.calls;
    let blockedFirst = this.blockedFirst;
    let attempts = this.attempts;
    let blockedAttempts = this.blockedAttempts;
    let lost = this.lost;
    let admitted = this.admitted;
    let busyIntegral = this.busyIntegral;
    let orbitIntegral = this.orbitIntegral;
    let queueIntegral = this.queueIntegral;
    let refusingTime = this.refusingTime;
    let intensityIntegral = this.intensityIntegral;
    let refusingIntensityIntegral = this.refusingIntensityIntegral;
    let holdingDraws = this.holdingDraws;
    let holdingSum = this.holdingSum;
    const nearLevel = this.nearLevel;
    let nearTime = this.nearRefusalTime;
    let nearCalls = this.nearRefusalCalls;
    let nearIntensity = this.nearRefusalIntensityIntegral;
    let nearDraws = this.nearRefusalHoldingDraws;
    let nearSum = this.nearRefusalHoldingSum;
    let gapDeviation = this.nearRefusalGapDeviation;
    let sojournDeviation = this.phaseSojournDeviation;
    let nearSojournDeviation = this.nearRefusalPhaseSojournDeviation;
    let finished = false;
    // The first slice is short, so that the code after the loop runs (and V8 records what it
    // meets there) before the loop is optimised: reached first from optimised code, it would
    // deoptimise the loop in every new process or thread. The caller just asks again.
    const cap = this.sliceCap;
    this.sliceCap = Infinity;
    const limit = events + (maxEvents < cap ? maxEvents : cap);
    while (events < limit) {
      let next = hn > 0 ? ht[0] : Infinity;
      let source = 0; // 0 heap, 1 phase change, 2 fresh arrival
      if (nextPhase < next) {
        next = nextPhase;
        source = 1;
      }
      if (nextArrival < next) {
        if (source === 0 && hn > 0 && next - nextArrival <= TIE * next) next = nextArrival;
        else {
          next = nextArrival;
          source = 2;
        }
      }
      const atControl = control <= next;
      if (!atControl && next === Infinity) {
        finished = true; // nothing can happen any more
        break;
      }
      // Integrate the state over [t, to): the same operations, in the same order, as engine.ts.
      const to = atControl ? control : next;
      const dt = to - t;
      // The orbit and the waiting line stay empty without retrials and waiting positions: their
      // integrals would only add zeros (exactly), so they are skipped.
      occupancy[busy] += dt;
      busyIntegral += busy * dt;
      if (retrying) orbitIntegral += orbit * dt;
      if (waitingPositions > 0) {
        queueIntegral += waiting * dt;
        if (busy === servers && waiting === waitingPositions) refusingTime += dt;
        if (busy + waiting >= nearLevel) nearTime += dt;
      }
      if (integrated) {
        const intensity = mmpp ? phaseRates[phase] * dt : finite ? (sources - busy - orbit - waiting) * idleRate * dt : overflowIntensity * dt;
        if (intensity >= 0) {
          intensityIntegral += intensity;
          if (busy === servers && waiting === waitingPositions) refusingIntensityIntegral += intensity;
          if (busy + waiting >= nearLevel) nearIntensity += intensity;
        }
      }
      t = to;
      if (atControl) {
        if (measuring) {
          finished = true;
          break;
        }
        this.t = t;
        this.startMeasuring();
        measuring = true;
        control = this.control;
        calls = blockedFirst = attempts = blockedAttempts = lost = admitted = holdingDraws = 0;
        busyIntegral = orbitIntegral = queueIntegral = refusingTime = intensityIntegral = refusingIntensityIntegral = holdingSum = 0;
        nearTime = nearCalls = nearIntensity = nearDraws = nearSum = gapDeviation = sojournDeviation = nearSojournDeviation = 0;
        halfTaken = false;
        halfTime = halfBusy = halfOrbit = halfQueue = 0;
        measureStart = this.measureStart;
        continue;
      }

      // What the event asks for: `tries` attempts numbered `attempt`, fresh or repeated.
      let tries = 0;
      let attempt = 1;
      let fresh = true;
      let refuseAll = false;
      // At most one heap entry from the event itself (a primary or a waiting call taking a server).
      let pushTime = 0;
      let pushData = -1;
      // A departure's holding time is drawn where it is pushed (one draw site);
      // `servedLevel` is the level the call saw, -1 for a primary call (not counted).
      let served = false;
      let servedLevel = -1;
      let primary = false;
      let overflowed = -1;
      // The next fresh arrival instant is drawn at the end of the event (one draw site): after every
      // fresh arrival and phase change, and after every event for finite sources (the idle count
      // may have changed; the clock is memoryless).
      let redraw = finite;
      if (source === 2) {
        redraw = true;
        if (overflow) {
          const m = Math.imul(ar1, 5), out = Math.imul((m << 7) | (m >>> 25), 9), s = ar1 << 9;
          ar2 ^= ar0; ar3 ^= ar1; ar1 ^= ar2; ar0 ^= ar3; ar2 ^= s; ar3 = (ar3 << 11) | (ar3 >>> 21);
          const u = (out >>> 0) * U_STEP + U_HALF;
          let i = 0;
          while (u > primaryChoice[i]) i++;
          if (primaryBusy[i] < primaryServers[i]) {
            if (measuring) this.primaryArrivals[i]++;
            if (++primaryBusy[i] === primaryServers[i]) overflowIntensity += primaryRates[i];
            served = true;
            pushData = i * 4 + K_PRIMARY_DEPARTURE;
            primary = true;
          } else overflowed = i;
        }
        if (!primary) {
          if (!measuring && callsSeen >= this.warmupCallsTarget && this.warmupTimeTarget === 0) {
            this.t = t;
            this.startMeasuring();
            measuring = true;
            control = this.control;
            calls = blockedFirst = attempts = blockedAttempts = lost = admitted = holdingDraws = 0;
            busyIntegral = orbitIntegral = queueIntegral = refusingTime = intensityIntegral = refusingIntensityIntegral = holdingSum = 0;
            nearTime = nearCalls = nearIntensity = nearDraws = nearSum = gapDeviation = sojournDeviation = nearSojournDeviation = 0;
            halfTaken = false;
            halfTime = halfBusy = halfOrbit = halfQueue = 0;
            measureStart = this.measureStart;
          }
          if (measuring && calls >= callsTarget) {
            finished = true; // this arrival is not part of the run (nor counted among its events)
            break;
          }
          if (overflowed >= 0 && measuring) {
            this.primaryArrivals[overflowed]++;
            this.primaryOverflows[overflowed]++;
          }
          if (traceEvery > 0 && callsSeen >= this.nextTrace) {
            this.traceTime.push(t);
            this.traceBusy.push(busyIntegral);
            this.traceOrbit.push(orbitIntegral);
            this.traceQueue.push(queueIntegral);
            this.traceCalls.push(callsSeen);
            while (this.nextTrace <= callsSeen) this.nextTrace += traceEvery;
          }
          if (kind === A_BATCH) {
            ar.a = ar0; ar.b = ar1; ar.c = ar2; ar.d = ar3;
            tries = +this.batchSize!.sample(ar);
            ar0 = ar.a; ar1 = ar.b; ar2 = ar.c; ar3 = ar.d;
            refuseAll = this.allOrNothing && tries > servers - busy + waitingPositions - waiting;
            if (refuseAll && busy + waiting >= nearLevel) nearCalls += tries;
          } else tries = 1;
          callsSeen += tries;
          calls += tries;
        }
      } else if (source === 1) {
        // A phase change (enterPhase: the phase's sojourn clock first, its arrival clock below).
        const jump = phaseJump[phase];
        const m = Math.imul(ar1, 5), out = Math.imul((m << 7) | (m >>> 25), 9), s = ar1 << 9;
        ar2 ^= ar0; ar3 ^= ar1; ar1 ^= ar2; ar0 ^= ar3; ar2 ^= s; ar3 = (ar3 << 11) | (ar3 >>> 21);
        const u = (out >>> 0) * U_STEP + U_HALF;
        let j = 0;
        while (u > jump[j]) j++;
        phase = j;
        const exit = phaseOut[phase];
        if (exit > 0) {
          // Sojourn x exit rate: a unit exponential.
          const m = Math.imul(ar1, 5), out = Math.imul((m << 7) | (m >>> 25), 9), s = ar1 << 9;
          ar2 ^= ar0; ar3 ^= ar1; ar1 ^= ar2; ar0 ^= ar3; ar2 ^= s; ar3 = (ar3 << 11) | (ar3 >>> 21);
          const w = out >>> 0, iz = out & 255;
          let e = 0;
          if (!zig) e = -Math.log(w * U_STEP + U_HALF);
          else if (w < ke[iz]) e = w * we[iz];
          else {
            ar.a = ar0; ar.b = ar1; ar.c = ar2; ar.d = ar3;
            e = +exponentialFix(ar, w, iz);
            ar0 = ar.a; ar1 = ar.b; ar2 = ar.c; ar3 = ar.d;
          }
          nextPhase = t + e / exit;
          if (measuring) {
            const deviation = (e - 1) * phaseWeight[phase];
            sojournDeviation += deviation;
            if (busy + waiting >= nearLevel) nearSojournDeviation += deviation;
          }
        } else nextPhase = Infinity;
        redraw = true;
      } else {
        const data = hd[0];
        // Remove the root: the last entry sifts down from the top.
        const n = --hn;
        if (n > 0) {
          const time = ht[n];
          const last = hd[n];
          let i = 0;
          for (;;) {
            let child = 2 * i + 1;
            if (child >= n) break;
            if (child + 1 < n && ht[child + 1] < ht[child]) child++;
            const ct = ht[child];
            if (time <= ct) break;
            ht[i] = ct;
            hd[i] = hd[child];
            i = child;
          }
          ht[i] = time;
          hd[i] = last;
        }
        const k = data < 2147483648 ? data & 3 : data % 4; // integer path; float modulo only for huge queue ids
        const payload = (data - k) / 4;
        if (k === K_DEPARTURE) {
          busy--;
          while (waiting > 0) {
            const pos = this.queueHead % this.queueArrival.length;
            this.queueHead++;
            if (this.queueAlive[pos] === 0) continue;
            this.queueAlive[pos] = 0;
            const level = busy + waiting; // just before this call leaves the line for a server
            waiting--;
            this.waitSum += t - this.queueArrival[pos];
            busy++;
            served = true;
            servedLevel = level;
            pushData = K_DEPARTURE;
            break;
          }
          if (waiting === 0 && waitingPositions > 0) this.queueHead = this.queueTail; // drop abandoned leftovers (no line, no leftovers)
        } else if (k === K_PRIMARY_DEPARTURE) {
          if (primaryBusy[payload]-- === primaryServers[payload]) overflowIntensity -= primaryRates[payload];
        } else if (k === K_RETRY) {
          orbit--;
          tries = 1;
          attempt = payload + 1;
          fresh = false;
        } else if (payload >= this.queueHead) {
          const pos = payload % this.queueArrival.length;
          if (this.queueAlive[pos] !== 0) {
            this.queueAlive[pos] = 0;
            waiting--;
            this.abandoned++;
            lost++;
            this.waitSum += t - this.queueArrival[pos];
          }
        }
      }

      // Each attempt below may add one heap entry too: `c === -1` is the event's own entry.
      for (let c = pushData >= 0 ? -1 : 0; c < tries; c++) {
        if (c >= 0) {
          pushData = -1;
          served = false;
          attempts++;
          const level = busy + waiting;
          if (fresh && !refuseAll && level >= nearLevel) nearCalls++;
          if (!refuseAll && busy < servers) {
            busy++;
            admitted++;
            served = true;
            servedLevel = level;
            pushData = K_DEPARTURE;
          } else if (!refuseAll && waiting < waitingPositions) {
            admitted++;
            this.waited++;
            waiting++;
            if (this.queueTail - this.queueHead === this.queueArrival.length) this.growQueue();
            const id = this.queueTail++;
            const pos = id % this.queueArrival.length;
            this.queueArrival[pos] = t;
            this.queueAlive[pos] = 1;
            if (patience) {
              pushTime = t + +draw(patience, this.patienceRng);
              pushData = id * 4 + K_ABANDON;
            }
          } else {
            blockedAttempts++;
            if (fresh) blockedFirst++;
            let retry = false;
            if (retryDelay && attempt < maxAttempts) {
              const m = Math.imul(rr1, 5), out = Math.imul((m << 7) | (m >>> 25), 9), s = rr1 << 9;
              rr2 ^= rr0; rr3 ^= rr1; rr1 ^= rr2; rr0 ^= rr3; rr2 ^= s; rr3 = (rr3 << 11) | (rr3 >>> 21);
              retry = (out >>> 0) * U_STEP + U_HALF < persistence;
            }
            if (retry) {
              orbit++;
              // The retry delay on the retry stream (the law written out as for the holding time below).
              let delay = 0;
              if (dlFast) {
                let scale = dlA;
                if (dlCode === ZIG_HYPEREXPONENTIAL) {
                  const m = Math.imul(rr1, 5), out = Math.imul((m << 7) | (m >>> 25), 9), s = rr1 << 9;
                  rr2 ^= rr0; rr3 ^= rr1; rr1 ^= rr2; rr0 ^= rr3; rr2 ^= s; rr3 = (rr3 << 11) | (rr3 >>> 21);
                  const u = (out >>> 0) * U_STEP + U_HALF;
                  let i = 0;
                  while (i < dlTable.length - 1 && u > dlTable[i]) i++;
                  scale = dlValues[i];
                }
                const m = Math.imul(rr1, 5), out = Math.imul((m << 7) | (m >>> 25), 9), s = rr1 << 9;
                rr2 ^= rr0; rr3 ^= rr1; rr1 ^= rr2; rr0 ^= rr3; rr2 ^= s; rr3 = (rr3 << 11) | (rr3 >>> 21);
                if (dlCode === ZIG_LOGNORMAL) {
                  const iz = out & 127;
                  let z = 0;
                  if (Math.abs(out) < kn[iz]) z = out * wn[iz];
                  else {
                    rr.a = rr0; rr.b = rr1; rr.c = rr2; rr.d = rr3;
                    z = +normalFix(rr, out, iz);
                    rr0 = rr.a; rr1 = rr.b; rr2 = rr.c; rr3 = rr.d;
                  }
                  delay = Math.exp(dlA + dlB * z);
                } else {
                  const w = out >>> 0, iz = out & 255;
                  let e = 0;
                  if (w < ke[iz]) e = w * we[iz];
                  else {
                    rr.a = rr0; rr.b = rr1; rr.c = rr2; rr.d = rr3;
                    e = +exponentialFix(rr, w, iz);
                    rr0 = rr.a; rr1 = rr.b; rr2 = rr.c; rr3 = rr.d;
                  }
                  delay = scale * e;
                }
              } else {
                rr.a = rr0; rr.b = rr1; rr.c = rr2; rr.d = rr3;
                delay = +retryDelay!.sample(rr);
                rr0 = rr.a; rr1 = rr.b; rr2 = rr.c; rr3 = rr.d;
              }
              pushTime = t + delay;
              pushData = attempt * 4 + K_RETRY;
            } else lost++;
          }
          if (pushData < 0) continue;
        }
        if (served) {
          // The holding time on the holding stream: LawSampler.sample's operations, in its order,
          // for the ziggurat exponential, hyperexponential and lognormal laws; any other law is
          // sampled by the sampler itself.
          let h = 0;
          if (hlFast) {
            let scale = hlA;
            if (hlCode === ZIG_HYPEREXPONENTIAL) {
              const m = Math.imul(hr1, 5), out = Math.imul((m << 7) | (m >>> 25), 9), s = hr1 << 9;
              hr2 ^= hr0; hr3 ^= hr1; hr1 ^= hr2; hr0 ^= hr3; hr2 ^= s; hr3 = (hr3 << 11) | (hr3 >>> 21);
              const u = (out >>> 0) * U_STEP + U_HALF;
              let i = 0;
              while (i < hlTable.length - 1 && u > hlTable[i]) i++;
              scale = hlValues[i];
            }
            const m = Math.imul(hr1, 5), out = Math.imul((m << 7) | (m >>> 25), 9), s = hr1 << 9;
            hr2 ^= hr0; hr3 ^= hr1; hr1 ^= hr2; hr0 ^= hr3; hr2 ^= s; hr3 = (hr3 << 11) | (hr3 >>> 21);
            if (hlCode === ZIG_LOGNORMAL) {
              const iz = out & 127;
              let z = 0;
              if (Math.abs(out) < kn[iz]) z = out * wn[iz];
              else {
                hr.a = hr0; hr.b = hr1; hr.c = hr2; hr.d = hr3;
                z = +normalFix(hr, out, iz);
                hr0 = hr.a; hr1 = hr.b; hr2 = hr.c; hr3 = hr.d;
              }
              h = Math.exp(hlA + hlB * z);
            } else {
              const w = out >>> 0, iz = out & 255;
              let e = 0;
              if (w < ke[iz]) e = w * we[iz];
              else {
                hr.a = hr0; hr.b = hr1; hr.c = hr2; hr.d = hr3;
                e = +exponentialFix(hr, w, iz);
                hr0 = hr.a; hr1 = hr.b; hr2 = hr.c; hr3 = hr.d;
              }
              h = scale * e;
            }
          } else {
            hr.a = hr0; hr.b = hr1; hr.c = hr2; hr.d = hr3;
            h = +holding.sample(hr);
            hr0 = hr.a; hr1 = hr.b; hr2 = hr.c; hr3 = hr.d;
          }
          if (servedLevel >= 0) {
            holdingDraws++;
            holdingSum += h;
            if (servedLevel >= nearLevel) {
              nearDraws++;
              nearSum += h;
            }
          }
          pushTime = t + h;
        }
        // Insert (pushTime, pushData): sift up from the end.
        if (hn === ht.length) {
          this.growHeap(hn);
          ht = this.heapTime;
          hd = this.heapData;
        }
        let i = hn++;
        while (i > 0) {
          const parent = (i - 1) >> 1;
          const pt = ht[parent];
          if (pt <= pushTime) break;
          ht[i] = pt;
          hd[i] = hd[parent];
          i = parent;
        }
        ht[i] = pushTime;
        hd[i] = pushData;
      }
      if (redraw) {
        if (source === 2 && !primary && measuring && !halfTaken) {
          // The first half's figures: locals only (stored at the end of the slice), since code
          // first reached in the optimised loop deoptimises it (see the first slice above).
          const elapsed = t - measureStart;
          if (calls >= halfCalls || elapsed >= halfSpan) {
            halfTaken = true;
            halfTime = elapsed;
            halfBusy = busyIntegral;
            halfOrbit = orbitIntegral;
            halfQueue = queueIntegral;
          }
        }
        if (renewal) {
          // The interarrival gap on the arrival stream (the law written out as for the holding time).
          let gap = 0;
          if (glFast) {
            let scale = glA;
            if (glCode === ZIG_HYPEREXPONENTIAL) {
              const m = Math.imul(ar1, 5), out = Math.imul((m << 7) | (m >>> 25), 9), s = ar1 << 9;
              ar2 ^= ar0; ar3 ^= ar1; ar1 ^= ar2; ar0 ^= ar3; ar2 ^= s; ar3 = (ar3 << 11) | (ar3 >>> 21);
              const u = (out >>> 0) * U_STEP + U_HALF;
              let i = 0;
              while (i < glTable.length - 1 && u > glTable[i]) i++;
              scale = glValues[i];
            }
            const m = Math.imul(ar1, 5), out = Math.imul((m << 7) | (m >>> 25), 9), s = ar1 << 9;
            ar2 ^= ar0; ar3 ^= ar1; ar1 ^= ar2; ar0 ^= ar3; ar2 ^= s; ar3 = (ar3 << 11) | (ar3 >>> 21);
            if (glCode === ZIG_LOGNORMAL) {
              const iz = out & 127;
              let z = 0;
              if (Math.abs(out) < kn[iz]) z = out * wn[iz];
              else {
                ar.a = ar0; ar.b = ar1; ar.c = ar2; ar.d = ar3;
                z = +normalFix(ar, out, iz);
                ar0 = ar.a; ar1 = ar.b; ar2 = ar.c; ar3 = ar.d;
              }
              gap = Math.exp(glA + glB * z);
            } else {
              const w = out >>> 0, iz = out & 255;
              let e = 0;
              if (w < ke[iz]) e = w * we[iz];
              else {
                ar.a = ar0; ar.b = ar1; ar.c = ar2; ar.d = ar3;
                e = +exponentialFix(ar, w, iz);
                ar0 = ar.a; ar1 = ar.b; ar2 = ar.c; ar3 = ar.d;
              }
              gap = scale * e;
            }
          } else {
            ar.a = ar0; ar.b = ar1; ar.c = ar2; ar.d = ar3;
            gap = +interarrival!.sample(ar);
            ar0 = ar.a; ar1 = ar.b; ar2 = ar.c; ar3 = ar.d;
          }
          if (measuring && busy + waiting >= nearLevel) gapDeviation += gap / interarrivalMean - 1;
          nextArrival = t + gap;
        } else {
          // A unit exponential over the current rate (freshArrivalAfter's cases, the same operations).
          let r = rate;
          let live = true;
          if (mmpp) {
            r = phaseRates[phase];
            live = r > 0;
          } else if (finite) {
            const idle = sources - busy - orbit - waiting;
            r = idle * idleRate;
            live = idle > 0;
          }
          if (live) {
            const m = Math.imul(ar1, 5), out = Math.imul((m << 7) | (m >>> 25), 9), s = ar1 << 9;
            ar2 ^= ar0; ar3 ^= ar1; ar1 ^= ar2; ar0 ^= ar3; ar2 ^= s; ar3 = (ar3 << 11) | (ar3 >>> 21);
            const w = out >>> 0, iz = out & 255;
            let e = 0;
            if (!zig) e = -Math.log(w * U_STEP + U_HALF);
            else if (w < ke[iz]) e = w * we[iz];
            else {
              ar.a = ar0; ar.b = ar1; ar.c = ar2; ar.d = ar3;
              e = +exponentialFix(ar, w, iz);
              ar0 = ar.a; ar1 = ar.b; ar2 = ar.c; ar3 = ar.d;
            }
            nextArrival = t + e / r;
          } else nextArrival = Infinity;
        }
      }
      // Counted here, at the end, so that the run's last arrival (which breaks out above) is not:
      // code first reached in the optimised loop (an `events--` there) deoptimises it.
      events++;
    }
    ar.a = ar0; ar.b = ar1; ar.c = ar2; ar.d = ar3;
    hr.a = hr0; hr.b = hr1; hr.c = hr2; hr.d = hr3;
    rr.a = rr0; rr.b = rr1; rr.c = rr2; rr.d = rr3;
    this.heapSize = hn;
    this.t = t;
    this.busy = busy;
    this.orbit = orbit;
    this.waiting = waiting;
    this.phase = phase;
    this.callsSeen = callsSeen;
    this.overflowIntensity = overflowIntensity;
    this.nextPhase = nextPhase;
    this.nextArrival = nextArrival;
    this.events = events;
    this.calls = calls;
    this.blockedFirst = blockedFirst;
    this.attempts = attempts;
    this.blockedAttempts = blockedAttempts;
    this.lost = lost;
    this.admitted = admitted;
    this.busyIntegral = busyIntegral;
    this.orbitIntegral = orbitIntegral;
    this.queueIntegral = queueIntegral;
    this.refusingTime = refusingTime;
    this.intensityIntegral = intensityIntegral;
    this.refusingIntensityIntegral = refusingIntensityIntegral;
    this.holdingDraws = holdingDraws;
    this.holdingSum = holdingSum;
    this.nearRefusalTime = nearTime;
    this.nearRefusalCalls = nearCalls;
    this.nearRefusalIntensityIntegral = nearIntensity;
    this.nearRefusalHoldingDraws = nearDraws;
    this.nearRefusalHoldingSum = nearSum;
    this.nearRefusalGapDeviation = gapDeviation;
    this.phaseSojournDeviation = sojournDeviation;
    this.nearRefusalPhaseSojournDeviation = nearSojournDeviation;
    this.halfTaken = halfTaken;
    this.halfTime = halfTime;
    this.halfBusyIntegral = halfBusy;
    this.halfOrbitIntegral = halfOrbit;
    this.halfQueueIntegral = halfQueue;
    this.done = finished;
    return finished;
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
      // Time-varying profiles run on the reference loop only (dispatch.ts).
      segmentCalls: [],
      segmentBlockedFirst: [],
      segmentAllBusyTime: [],
      segmentLost: [],
      halfTime: this.halfTime,
      halfBusyIntegral: this.halfBusyIntegral,
      halfOrbitIntegral: this.halfOrbitIntegral,
      halfQueueIntegral: this.halfQueueIntegral,
      warmupAtBound: 0,
      path: this.path,
    };
  }

  /** Without waiting positions the level is the busy count, so the window's time is read off the occupancy (as engine.ts does). */
  private nearTime(): number {
    if (this.waitingPositions > 0) return this.nearRefusalTime;
    let sum = 0;
    for (let k = this.nearLevel; k <= this.servers; k++) sum += this.occupancy[k];
    return sum;
  }

  private intensityStats(): { intensityIntegral: number; refusingIntensityIntegral: number; nearRefusalIntensityIntegral: number } {
    if (this.meanCallRate === 0)
      return { intensityIntegral: this.intensityIntegral, refusingIntensityIntegral: this.refusingIntensityIntegral, nearRefusalIntensityIntegral: this.nearRefusalIntensityIntegral };
    // Constant rate: the same products as the reference loop.
    const refusing = this.waitingPositions > 0 ? this.refusingTime : this.occupancy[this.servers];
    return {
      intensityIntegral: this.meanCallRate * (this.t - this.measureStart),
      refusingIntensityIntegral: this.meanCallRate * refusing,
      nearRefusalIntensityIntegral: this.meanCallRate * this.nearTime(),
    };
  }
}
