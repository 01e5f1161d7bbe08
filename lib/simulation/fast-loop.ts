import { nearRefusalMargin, type ReplicationOptions, type ReplicationStats } from "./engine";
import { BatchSizeSampler, LawSampler } from "./laws";
import { Random, SUBSTREAM } from "./random";
import type { Scenario } from "./scenario";
import { mmppOf, stationaryOfGenerator } from "./traffic";
import { zigExponential as importedZigExponential } from "./ziggurat";

// A module-local binding: module loaders that turn imports into property getters (tsx, vitest)
// would otherwise pay a getter call on every draw.
const zigExponential = importedZigExponential;

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
  private readonly rate: number = 0;
  private readonly sources: number = 0;
  private readonly idleRate: number = 0;
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
  private overflowIntensity = 0;

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

  private t = 0;
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
  private readonly meanCallRate: number = 0;
  private intensityIntegral = 0;
  private refusingIntensityIntegral = 0;
  private refusingTime = 0;
  private holdingDraws = 0;
  private holdingSum = 0;
  /** Lowest level (busy + waiting) counted as near refusal (engine.ts nearRefusalMargin). */
  private readonly nearLevel: number;
  private nearRefusalTime = 0;
  private nearRefusalCalls = 0;
  private nearRefusalIntensityIntegral = 0;
  private nearRefusalHoldingDraws = 0;
  private nearRefusalHoldingSum = 0;
  private nearRefusalGapDeviation = 0;
  private phaseSojournDeviation = 0;
  private nearRefusalPhaseSojournDeviation = 0;
  private readonly halfCalls: number;
  private readonly halfSpan: number;
  private halfTaken = false;
  private halfTime = 0;
  private halfBusyIntegral = 0;
  private halfOrbitIntegral = 0;
  private halfQueueIntegral = 0;
  private readonly occupancy: Float64Array;

  constructor(scenario: Scenario, index: number, options: FastLoopOptions = {}) {
    const refusal = fastLoopRefusal(scenario);
    if (refusal) throw new Error(`the specialised loop does not run this scenario: ${refusal}`);
    this.index = index;
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
    this.control = this.horizon === Infinity ? Infinity : this.t + this.horizon;
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

  /** The next fresh arrival instant after `t` (for finite sources it depends on the state). */
  private freshArrivalAfter(t: number, busy: number, orbit: number, waiting: number): number {
    switch (this.arrivalKind) {
      case A_MMPP: {
        const r = this.phaseRates[this.phase];
        return r > 0 ? t + unitExponential(this.arrivalRng, this.zig) / r : Infinity;
      }
      case A_RENEWAL: {
        const gap = this.interarrival!.sample(this.arrivalRng);
        if (this.measuring && busy + waiting >= this.nearLevel) this.nearRefusalGapDeviation += gap / this.interarrival!.mean - 1;
        return t + gap;
      }
      case A_FINITE: {
        const idle = this.sources - busy - orbit - waiting;
        return idle > 0 ? t + unitExponential(this.arrivalRng, this.zig) / (idle * this.idleRate) : Infinity;
      }
      default:
        return t + unitExponential(this.arrivalRng, this.zig) / this.rate;
    }
  }

  private push(time: number, data: number): void {
    if (this.heapSize === this.heapTime.length) {
      const time2 = new Float64Array(this.heapSize * 2);
      const data2 = new Float64Array(this.heapSize * 2);
      time2.set(this.heapTime);
      data2.set(this.heapData);
      this.heapTime = time2;
      this.heapData = data2;
    }
    const ht = this.heapTime;
    const hd = this.heapData;
    let i = this.heapSize++;
    while (i > 0) {
      const parent = (i - 1) >> 1;
      const pt = ht[parent];
      if (pt <= time) break;
      ht[i] = pt;
      hd[i] = hd[parent];
      i = parent;
    }
    ht[i] = time;
    hd[i] = data;
  }

  /** Removes the root; the caller has read it already. */
  private popRoot(): void {
    const ht = this.heapTime;
    const hd = this.heapData;
    const n = --this.heapSize;
    if (n === 0) return;
    const time = ht[n];
    const data = hd[n];
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
    hd[i] = data;
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
    // Processes whose intensity the loop integrates (the others get rate x time in stats()).
    const integrated = kind === A_MMPP || finite || overflow;
    const holding = this.holding;
    const hr = this.holdingRng;
    const rr = this.retryRng;
    const retryDelay = this.retryDelay;
    const persistence = this.persistence;
    const maxAttempts = this.maxAttempts;
    const patience = this.patience;
    const callsTarget = this.callsTarget;
    const traceEvery = this.traceEvery;
    const sources = this.sources;
    const idleRate = this.idleRate;
    const phaseRates = this.phaseRates;
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
    let finished = false;
    const limit = events + maxEvents;
    while (events < limit) {
      let next = this.heapSize > 0 ? this.heapTime[0] : Infinity;
      let source = 0; // 0 heap, 1 phase change, 2 fresh arrival
      if (this.nextPhase < next) {
        next = this.nextPhase;
        source = 1;
      }
      if (nextArrival < next) {
        if (source === 0 && this.heapSize > 0 && next - nextArrival <= TIE * next) next = nextArrival;
        else {
          next = nextArrival;
          source = 2;
        }
      }
      const atControl = this.control <= next;
      if (!atControl && next === Infinity) {
        finished = true; // nothing can happen any more
        break;
      }
      // Integrate the state over [t, to): the same operations, in the same order, as engine.ts.
      const to = atControl ? this.control : next;
      const dt = to - t;
      occupancy[busy] += dt;
      busyIntegral += busy * dt;
      orbitIntegral += orbit * dt;
      queueIntegral += waiting * dt;
      const refusing = busy === servers && waiting === waitingPositions;
      const near = busy + waiting >= nearLevel;
      if (waitingPositions > 0) {
        if (refusing) refusingTime += dt;
        if (near) nearTime += dt;
      }
      if (integrated) {
        const intensity = kind === A_MMPP ? phaseRates[this.phase] * dt : finite ? (sources - busy - orbit - waiting) * idleRate * dt : this.overflowIntensity * dt;
        if (intensity >= 0) {
          intensityIntegral += intensity;
          if (refusing) refusingIntensityIntegral += intensity;
          if (near) nearIntensity += intensity;
        }
      }
      t = to;
      if (atControl) {
        if (this.measuring) {
          finished = true;
          break;
        }
        this.t = t;
        this.startMeasuring();
        calls = blockedFirst = attempts = blockedAttempts = lost = admitted = holdingDraws = 0;
        busyIntegral = orbitIntegral = queueIntegral = refusingTime = intensityIntegral = refusingIntensityIntegral = holdingSum = 0;
        nearTime = nearCalls = nearIntensity = nearDraws = nearSum = 0;
        continue;
      }
      events++;

      // What the event asks for: `tries` attempts numbered `attempt`, fresh or repeated.
      let tries = 0;
      let attempt = 1;
      let fresh = true;
      let refuseAll = false;
      if (source === 2) {
        let overflowed = -1;
        if (overflow) {
          const u = this.arrivalRng.next();
          let i = 0;
          while (u > this.primaryChoice[i]) i++;
          if (this.primaryBusy[i] < this.primaryServers[i]) {
            if (this.measuring) this.primaryArrivals[i]++;
            if (++this.primaryBusy[i] === this.primaryServers[i]) this.overflowIntensity += this.primaryRates[i];
            this.push(t + holding.sample(hr), i * 4 + K_PRIMARY_DEPARTURE);
            nextArrival = t + unitExponential(this.arrivalRng, this.zig) / this.rate;
            continue;
          }
          overflowed = i;
        }
        if (!this.measuring && this.callsSeen >= this.warmupCallsTarget && this.warmupTimeTarget === 0) {
          this.t = t;
          this.startMeasuring();
          calls = blockedFirst = attempts = blockedAttempts = lost = admitted = holdingDraws = 0;
          busyIntegral = orbitIntegral = queueIntegral = refusingTime = intensityIntegral = refusingIntensityIntegral = holdingSum = 0;
        nearTime = nearCalls = nearIntensity = nearDraws = nearSum = 0;
        }
        if (this.measuring && calls >= callsTarget) {
          events--;
          finished = true;
          break;
        }
        if (overflowed >= 0 && this.measuring) {
          this.primaryArrivals[overflowed]++;
          this.primaryOverflows[overflowed]++;
        }
        if (traceEvery > 0 && this.callsSeen >= this.nextTrace) {
          this.traceTime.push(t);
          this.traceBusy.push(busyIntegral);
          this.traceOrbit.push(orbitIntegral);
          this.traceQueue.push(queueIntegral);
          this.traceCalls.push(this.callsSeen);
          while (this.nextTrace <= this.callsSeen) this.nextTrace += traceEvery;
        }
        if (kind === A_BATCH) {
          tries = this.batchSize!.sample(this.arrivalRng);
          refuseAll = this.allOrNothing && tries > servers - busy + waitingPositions - waiting;
          if (refuseAll && busy + waiting >= nearLevel) nearCalls += tries;
        } else tries = 1;
        this.callsSeen += tries;
        calls += tries;
      } else if (source === 1) {
        const jump = this.phaseJump[this.phase];
        const u = this.arrivalRng.next();
        let j = 0;
        while (u > jump[j]) j++;
        this.phase = j;
        this.t = t;
        this.enterPhase(busy + waiting);
        nextArrival = this.nextArrival;
        continue;
      } else {
        const data = this.heapData[0];
        this.popRoot();
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
            const h = holding.sample(hr);
            holdingDraws++;
            holdingSum += h;
            if (level >= nearLevel) {
              nearDraws++;
              nearSum += h;
            }
            this.push(t + h, K_DEPARTURE);
            break;
          }
          if (waiting === 0) this.queueHead = this.queueTail; // drop abandoned leftovers
        } else if (k === K_PRIMARY_DEPARTURE) {
          if (this.primaryBusy[payload]-- === this.primaryServers[payload]) this.overflowIntensity -= this.primaryRates[payload];
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

      for (let c = 0; c < tries; c++) {
        attempts++;
        const level = busy + waiting;
        if (fresh && !refuseAll && level >= nearLevel) nearCalls++;
        if (!refuseAll && busy < servers) {
          busy++;
          admitted++;
          const h = holding.sample(hr);
          holdingDraws++;
          holdingSum += h;
          if (level >= nearLevel) {
            nearDraws++;
            nearSum += h;
          }
          this.push(t + h, K_DEPARTURE);
          continue;
        }
        if (!refuseAll && waiting < waitingPositions) {
          admitted++;
          this.waited++;
          waiting++;
          if (this.queueTail - this.queueHead === this.queueArrival.length) this.growQueue();
          const id = this.queueTail++;
          const pos = id % this.queueArrival.length;
          this.queueArrival[pos] = t;
          this.queueAlive[pos] = 1;
          if (patience) this.push(t + patience.sample(this.patienceRng), id * 4 + K_ABANDON);
          continue;
        }
        blockedAttempts++;
        if (fresh) blockedFirst++;
        if (retryDelay && attempt < maxAttempts && rr.next() < persistence) {
          orbit++;
          this.push(t + retryDelay.sample(rr), attempt * 4 + K_RETRY);
        } else lost++;
      }
      if (source === 2) {
        if (this.measuring && !this.halfTaken && (calls >= this.halfCalls || t - this.measureStart >= this.halfSpan)) {
          this.halfTaken = true;
          this.halfTime = t - this.measureStart;
          this.halfBusyIntegral = busyIntegral;
          this.halfOrbitIntegral = orbitIntegral;
          this.halfQueueIntegral = queueIntegral;
        }
        nextArrival = this.freshArrivalAfter(t, busy, orbit, waiting);
      } else if (finite) nextArrival = this.freshArrivalAfter(t, busy, orbit, waiting); // idle count changed; the clock is memoryless
    }
    this.t = t;
    this.busy = busy;
    this.orbit = orbit;
    this.waiting = waiting;
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
    if (finished) this.done = true;
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
