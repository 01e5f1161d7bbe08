// Coverage of the nominal 95 % intervals over many independent seeded runs (Law 2015, ch. 9:
// the t interval on replication means). M/M/5/5 at 4 erlangs: exact value Erlang B(5, 4).
import binomialCdf from "@stdlib/stats-base-dists-binomial-cdf";
import tQuantile from "@stdlib/stats-base-dists-t-quantile";
import { describe, expect, it } from "vitest";
import { erlangB } from "../../../lib/teletraffic";
import { parseScenario, runScenario } from "../../../lib/simulation/node";

const RUNS = 600;
const REPLICATIONS = 10;
/** Accept a coverage count in [LOW, HIGH]; too high would mean intervals too wide. */
const LOW = 545;
const HIGH = 590;

describe("confidence-interval coverage (binomial acceptance region)", () => {
  it("acceptance region: a correct engine passes with overwhelming probability, 30 % too narrow intervals fail", () => {
    // Correct engine: the count of covering intervals is Binomial(600, 0.95).
    const failCorrect = binomialCdf(LOW - 1, RUNS, 0.95) + (1 - binomialCdf(HIGH, RUNS, 0.95));
    // Intervals 30 % too narrow cover with P(|T_9| < 0.7 t(0.975, 9)) = 0.853.
    const narrowCoverage = 1 - 2 * (1 - tCdfApprox(0.7 * tQuantile(0.975, REPLICATIONS - 1), REPLICATIONS - 1));
    const passNarrow = 1 - binomialCdf(LOW - 1, RUNS, narrowCoverage);
    // Computed: failCorrect = 1.3e-5, narrowCoverage = 0.852, passNarrow = 2.7e-5.
    expect(failCorrect).toBeLessThan(5e-5);
    expect(narrowCoverage).toBeGreaterThan(0.84);
    expect(narrowCoverage).toBeLessThan(0.87);
    expect(passNarrow).toBeLessThan(1e-4);
  });

  it(`${RUNS} seeded runs of M/M/5/5: nominal 95 % intervals cover Erlang B at a binomially consistent rate`, async () => {
    const exact = erlangB(5, 4);
    let covered = 0;
    let coveredNarrow = 0;
    for (let run = 0; run < RUNS; run++) {
      const scenario = parseScenario({
        servers: 5,
        arrivals: { process: "poisson", rate: 4 },
        holding: { law: "exponential", mean: 1 },
        run: { seed: 10_000 + run, replications: REPLICATIONS, callsPerReplication: 2_000, warmupCalls: 200 },
      });
      const r = await runScenario(scenario);
      const error = Math.abs(r.callCongestion.estimate - exact);
      if (error <= r.callCongestion.halfWidth) covered++;
      if (error <= 0.7 * r.callCongestion.halfWidth) coveredNarrow++;
    }
    // At these seeds: 569 of 600 covered (94.8 %); with 0.7 x half-widths 507 (84.5 %).
    expect(covered, `covered ${covered} of ${RUNS}`).toBeGreaterThanOrEqual(LOW);
    expect(covered, `covered ${covered} of ${RUNS}`).toBeLessThanOrEqual(HIGH);
    // The same runs with intervals 30 % too narrow fall outside the region: the test has power.
    expect(coveredNarrow, `narrow intervals covered ${coveredNarrow}`).toBeLessThan(LOW);
  }, 60_000);
});

/** Student t CDF by numerical integration of its density (Simpson, 2000 panels), for the power figure only. */
function tCdfApprox(x: number, df: number): number {
  const lnc = lnGammaLocal((df + 1) / 2) - lnGammaLocal(df / 2) - 0.5 * Math.log(df * Math.PI);
  const f = (t: number) => Math.exp(lnc - ((df + 1) / 2) * Math.log(1 + (t * t) / df));
  const n = 2000;
  const h = x / n;
  let s = f(0) + f(x);
  for (let i = 1; i < n; i++) s += (i % 2 ? 4 : 2) * f(i * h);
  return 0.5 + (s * h) / 3;
}

function lnGammaLocal(x: number): number {
  // Stirling series with shift; accurate to ~1e-10 for x >= 0.5 (Abramowitz & Stegun 6.1.41).
  let shift = 0;
  while (x < 8) {
    shift -= Math.log(x);
    x += 1;
  }
  return shift + (x - 0.5) * Math.log(x) - x + 0.5 * Math.log(2 * Math.PI) + 1 / (12 * x) - 1 / (360 * x ** 3) + 1 / (1260 * x ** 5);
}
