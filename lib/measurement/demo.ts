import seedrandom from "seedrandom";
import { FAMILIES } from "./laws";
import { formatLocal } from "./timestamps";

/**
 * The invented call-record file of the demo workspace, drawn from a process whose parameters
 * are known, so a test can check that the characterisation finds them again. Calls arrive as a
 * Poisson stream whose rate is constant within each clock hour (the daily profile), except the
 * busy hour, which is an interrupted Poisson (on-off) stream of the same kind the scenario
 * maker fits; holding times are lognormal; outcomes and routes are drawn independently.
 */
export const DEMO_TRAFFIC = {
  seed: "spillway-demo-call-records-1",
  firstDay: "2026-01-12",
  days: 10,
  offset: "+01:00",
  offsetMinutes: 60,
  /** calls per hour in each clock hour; the busy hour's figure is the on-off stream's mean */
  hourlyRate: [6, 4, 3, 3, 4, 8, 20, 45, 90, 120, 150, 125, 110, 100, 95, 105, 100, 80, 60, 45, 35, 25, 15, 10],
  busyHourStart: 10,
  /** on-off stream in the busy hour, minutes: mean rate = onRate · meanOn / (meanOn + meanOff) = 150/h */
  onOff: { onRatePerMinute: 5, meanOnMinutes: 1, meanOffMinutes: 1 },
  holding: { law: "lognormal" as const, meanSeconds: 150, cv: 1 },
  /** durations are written to 0.1 s */
  resolution: 0.1,
  outcomes: { answered: 0.97, abandoned: 0.02, blocked: 0.01 },
  routes: { north: 0.6, south: 0.4 },
};

export const DEMO_CSV_PATH = "public/demo/measured-call-records.csv";

/** The lognormal parameters (μ, σ) of the demo holding law: σ² = ln(1 + cv²), μ = ln m − σ²/2. */
export function demoLognormal(): { mu: number; sigma: number } {
  const s2 = Math.log(1 + DEMO_TRAFFIC.holding.cv ** 2);
  return { mu: Math.log(DEMO_TRAFFIC.holding.meanSeconds) - s2 / 2, sigma: Math.sqrt(s2) };
}

export interface DemoCall {
  start: number;
  duration: number;
  outcome: "answered" | "abandoned" | "blocked";
  route: string;
}

export function generateDemoCalls(): DemoCall[] {
  const t = DEMO_TRAFFIC;
  const rng = seedrandom.alea(t.seed);
  const u = () => {
    let x = rng();
    while (x === 0) x = rng();
    return x;
  };
  const exp = (mean: number) => -mean * Math.log(u());
  const lognormal = demoLognormal();
  const day0 = Date.parse(`${t.firstDay}T00:00:00Z`) - t.offsetMinutes * 60_000;
  const starts: number[] = [];
  for (let d = 0; d < t.days; d++) {
    for (let h = 0; h < 24; h++) {
      const from = day0 + (d * 24 + h) * 3_600_000;
      const to = from + 3_600_000;
      if (h === t.busyHourStart) {
        const { onRatePerMinute, meanOnMinutes, meanOffMinutes } = t.onOff;
        let on = u() < meanOnMinutes / (meanOnMinutes + meanOffMinutes); // stationary phase at the start
        let time = from;
        while (time < to) {
          const phaseEnd = Math.min(to, time + exp((on ? meanOnMinutes : meanOffMinutes) * 60_000));
          if (on) for (let a = time + exp(60_000 / onRatePerMinute); a < phaseEnd; a += exp(60_000 / onRatePerMinute)) starts.push(a);
          time = phaseEnd;
          on = !on;
        }
      } else {
        const mean = 3_600_000 / t.hourlyRate[h];
        for (let a = from + exp(mean); a < to; a += exp(mean)) starts.push(a);
      }
    }
  }
  return starts.map((start) => {
    const r = u();
    const outcome = r < t.outcomes.answered ? "answered" : r < t.outcomes.answered + t.outcomes.abandoned ? "abandoned" : "blocked";
    const holding = FAMILIES.lognormal.draw(lognormal, u);
    const duration = outcome === "answered" ? Math.max(t.resolution, Math.round(holding / t.resolution) * t.resolution) : 0;
    return { start: Math.round(start), duration, outcome, route: u() < t.routes.north ? "north" : "south" };
  });
}

export function demoCsv(): string {
  const lines = ["call_start,duration_s,outcome,route"];
  for (const c of generateDemoCalls()) {
    const local = formatLocal(c.start, DEMO_TRAFFIC.offsetMinutes);
    const ms = String(c.start % 1000).padStart(3, "0");
    lines.push(`${local.slice(0, 19)}.${ms}${local.slice(19)},${c.duration.toFixed(1)},${c.outcome},${c.route}`);
  }
  return lines.join("\n") + "\n";
}
