import { BatchSizeSampler, LawSampler } from "./laws";
import { Random, SUBSTREAM } from "./random";
import type { Scenario } from "./scenario";

/** Counters of one replication, measured after the warm-up. */
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
const K_ABANDON = 3;

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

/** Stationary distribution of a CTMC generator with off-diagonal rates q[i][j] (Gaussian elimination). */
export function stationaryOfGenerator(q: number[][]): number[] {
  const k = q.length;
  const a = Array.from({ length: k }, (_, j) => Array.from({ length: k + 1 }, () => 0));
  // Rows are the balance equations pi Q = 0 (transposed); the last is replaced by sum(pi) = 1.
  for (let i = 0; i < k; i++) {
    let out = 0;
    for (let j = 0; j < k; j++) if (j !== i) out += q[i][j];
    for (let j = 0; j < k; j++) a[j][i] = j === i ? -out : q[i][j];
  }
  for (let i = 0; i <= k; i++) a[k - 1][i] = 1;
  for (let c = 0; c < k; c++) {
    let p = c;
    for (let r = c + 1; r < k; r++) if (Math.abs(a[r][c]) > Math.abs(a[p][c])) p = r;
    [a[c], a[p]] = [a[p], a[c]];
    for (let r = 0; r < k; r++) {
      if (r === c || a[r][c] === 0) continue;
      const f = a[r][c] / a[c][c];
      for (let j = c; j <= k; j++) a[r][j] -= f * a[c][j];
    }
  }
  return a.map((row, i) => Math.max(0, row[k] / row[i]));
}

/** MMPP phase rates and switching matrix for `mmpp` and its `on-off` special case. */
export function mmppOf(arrivals: Scenario["arrivals"]): { rates: number[]; switching: number[][] } | undefined {
  if (arrivals.process === "mmpp") return { rates: arrivals.rates, switching: arrivals.switching };
  if (arrivals.process === "on-off")
    return {
      rates: [arrivals.onRate, 0],
      switching: [
        [0, 1 / arrivals.meanOn],
        [1 / arrivals.meanOff, 0],
      ],
    };
  return undefined;
}

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
  // time-varying profile
  private readonly profileEnd: Float64Array = new Float64Array(0);
  private readonly profileRate: Float64Array = new Float64Array(0);
  private readonly cycle: number = 0;
  private segment = 0;
  private cycleStart = 0;

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
    if (a.process === "poisson") rate = a.rate;
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
    } else if (a.process === "batch") {
      process = P_BATCH;
      rate = a.rate;
      this.batchSize = new BatchSizeSampler(a.batchSize);
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
    } else if (a.process === "finite-source") {
      process = P_FINITE;
      sources = a.sources;
      idleRate = a.idleRate;
    } else if (a.process === "time-varying") {
      process = P_TIME_VARYING;
      this.profileEnd = new Float64Array(a.profile.length);
      this.profileRate = Float64Array.from(a.profile.map((s) => s.rate));
      a.profile.forEach((s, i) => (this.profileEnd[i] = cycle += s.duration));
    }
    this.process = process;
    this.rate = rate;
    this.sources = sources;
    this.idleRate = idleRate;
    this.allOrNothing = allOrNothing;
    this.cycle = cycle;

    const capacity = 64;
    this.heapTime = new Float64Array(capacity);
    this.heapSeq = new Float64Array(capacity);
    this.heapKind = new Uint8Array(capacity);
    this.heapPayload = new Float64Array(capacity);
    this.queueArrival = new Float64Array(this.waitingPositions > 0 ? 16 : 0);
    this.queueAlive = new Uint8Array(this.queueArrival.length);

    const run = scenario.run;
    this.callsTarget = run.callsPerReplication ?? Infinity;
    this.horizon = run.horizon ?? Infinity;
    this.warmupCallsTarget = options.warmupCalls ?? run.warmupCalls ?? 0;
    this.warmupTimeTarget = options.warmupCalls !== undefined ? 0 : (run.warmupTime ?? 0);
    this.traceEvery = options.traceEvery ?? 0;
    this.fastPath =
      !options.generalLoop && this.exponentialHoldingMean > 0 && process === P_POISSON && this.waitingPositions === 0 && !this.retryDelay && this.traceEvery === 0;
    if (this.warmupCallsTarget === 0 && this.warmupTimeTarget === 0) this.startMeasuring();
    else if (this.warmupTimeTarget > 0) this.control = this.warmupTimeTarget;

    // Start: empty system, MMPP phase drawn from its stationary law.
    if (process === P_MMPP) {
      const pi = stationaryOfGenerator(mmpp!.switching);
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
    this.occupancy.fill(0);
    this.control = this.horizon === Infinity ? Infinity : this.t + this.horizon;
  }

  private enterPhase(): void {
    const p = this.phase;
    const out = this.phaseOut[p];
    this.nextPhase = out > 0 ? this.t - Math.log(this.arrivalRng.next()) / out : Infinity;
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
      case P_RENEWAL:
        this.nextArrival = t + this.interarrival!.sample(this.arrivalRng);
        return;
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
      }
    }
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
    for (let id = this.queueHead; id < this.queueTail; id++) {
      arrival[id % cap] = this.queueArrival[id % old];
      alive[id % cap] = this.queueAlive[id % old];
    }
    this.queueArrival = arrival;
    this.queueAlive = alive;
  }

  /** One attempt (fresh or repeated) at the group under study. */
  private attempt(attemptNumber: number, fresh: boolean): void {
    this.attempts++;
    if (this.busy < this.servers) {
      this.busy++;
      this.admitted++;
      this.push(this.t + this.holding.sample(this.holdingRng), K_DEPARTURE, 0);
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
      if (this.patience) this.push(this.t + this.patience.sample(this.patienceRng), K_ABANDON, id);
      return;
    }
    this.blockedAttempts++;
    if (fresh) this.blockedFirst++;
    this.refused(attemptNumber);
  }

  private refused(attemptNumber: number): void {
    if (this.retryDelay && attemptNumber < this.maxAttempts && this.retryRng.next() < this.persistence) {
      this.orbit++;
      this.push(this.t + this.retryDelay.sample(this.retryRng), K_RETRY, attemptNumber);
    } else this.lost++;
  }

  /** Fresh arrival instant: returns false when the replication has enough calls. */
  private freshArrival(): boolean {
    if (this.process === P_OVERFLOW) {
      const u = this.arrivalRng.next();
      let i = 0;
      while (u > this.primaryChoice[i]) i++;
      if (this.primaryBusy[i] < this.primaryServers[i]) {
        this.primaryBusy[i]++;
        this.push(this.t + this.holding.sample(this.holdingRng), K_PRIMARY_DEPARTURE, i);
        this.scheduleFreshArrival();
        return true;
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
        for (let c = 0; c < size; c++) this.refused(1);
      } else for (let c = 0; c < size; c++) this.attempt(1, true);
    } else {
      this.callsSeen++;
      this.calls++;
      this.attempt(1, true);
    }
    this.scheduleFreshArrival();
    return true;
  }

  private departure(): void {
    this.busy--;
    while (this.waiting > 0) {
      const pos = this.queueHead % this.queueArrival.length;
      this.queueHead++;
      if (this.queueAlive[pos] === 0) continue;
      this.queueAlive[pos] = 0;
      this.waiting--;
      this.waitSum += this.t - this.queueArrival[pos];
      this.busy++;
      this.push(this.t + this.holding.sample(this.holdingRng), K_DEPARTURE, 0);
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
    this.lost++;
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
      else if (kind === K_PRIMARY_DEPARTURE) this.primaryBusy[payload]--;
      else if (kind === K_RETRY) {
        this.orbit--;
        this.attempt(payload + 1, false);
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
      }
      if (this.measuring && calls >= this.callsTarget) {
        finished = true;
        break;
      }
      events++;
      this.callsSeen++;
      calls++;
      if (busy < servers) {
        busy++;
        const time = t - meanHolding * Math.log(hr.next());
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
    };
  }
}
