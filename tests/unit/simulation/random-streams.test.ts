// Sanity of the random streams and law samplers at fixed seeds. Bounds: 5 standard errors of the
// sample mean (CLT; a correct sampler exceeds it with probability ~6e-7), with the SE from the
// law's known standard deviation, or for second moments from the sample's own fourth moment.
import { describe, expect, it } from "vitest";
import { BatchSizeSampler, LawSampler, Random, type BatchSizeLaw, type Law } from "../../../lib/simulation";

const N = 200_000;

function moments(draw: () => number): { mean: number; m2: number; m4: number } {
  let s1 = 0;
  let s2 = 0;
  let s4 = 0;
  for (let i = 0; i < N; i++) {
    const x = draw();
    s1 += x;
    s2 += x * x;
    s4 += x * x * x * x;
  }
  return { mean: s1 / N, m2: s2 / N, m4: s4 / N };
}

function expectWithin5SE(sample: number, expected: number, sd: number, what: string) {
  const se = sd / Math.sqrt(N);
  expect(Math.abs(sample - expected), `${what}: |${sample} - ${expected}| <= 5 x ${se}`).toBeLessThanOrEqual(5 * se);
}

// [law, mean, variance] with textbook moments (e.g. Johnson, Kotz & Balakrishnan, Continuous Univariate Distributions).
const laws: Array<[Law, number, number, boolean]> = [
  [{ law: "exponential", mean: 2 }, 2, 4, true],
  [{ law: "erlang", k: 4, mean: 2 }, 2, 1, true],
  [{ law: "hyperexponential", mean: 1, scv: 5 }, 1, 5, true],
  [{ law: "hyperexponential", probabilities: [0.2, 0.8], means: [3, 0.5] }, 1, 2 * (0.2 * 9 + 0.8 * 0.25) - 1, true],
  [{ law: "lognormal", mean: 1, cv: 0.8 }, 1, 0.64, true],
  [{ law: "gamma", mean: 3, cv: 0.5 }, 3, 2.25, true],
  [{ law: "gamma", mean: 1, cv: 2 }, 1, 4, true], // shape 1/4 < 1: the boost branch
  [{ law: "weibull", mean: 1, cv: 0.6 }, 1, 0.36, true],
  [{ law: "weibull", shape: 2, scale: 1 }, Math.sqrt(Math.PI) / 2, 1 - Math.PI / 4, true],
  // Pareto shape 3: finite variance, infinite fourth moment, so only the mean is checked.
  [{ law: "pareto", mean: 1, shape: 3 }, 1, (((2 / 3) ** 2) * 3) / (4 * 1), false],
  [{ law: "uniform", min: 1, max: 3 }, 2, 1 / 3, true],
  [{ law: "empirical", samples: [1, 2, 2, 7] }, 3, (1 + 4 + 4 + 49) / 4 - 9, true],
];

describe("law samplers: sample mean and variance within 5 standard errors", () => {
  laws.forEach(([law, mean, variance, checkVariance], i) => {
    it(`${JSON.stringify(law)}`, () => {
      const sampler = new LawSampler(law);
      expect(sampler.mean).toBeCloseTo(mean, 10);
      const rng = new Random(2026, i, 0);
      const m = moments(() => sampler.sample(rng));
      expectWithin5SE(m.mean, mean, Math.sqrt(variance), "mean");
      if (checkVariance) {
        const secondMoment = variance + mean * mean;
        expectWithin5SE(m.m2, secondMoment, Math.sqrt(m.m4 - m.m2 * m.m2), "second moment");
      }
    });
  });

  it("deterministic law returns its value", () => {
    const s = new LawSampler({ law: "deterministic", value: 2.5 });
    const rng = new Random(1, 0, 0);
    for (let i = 0; i < 10; i++) expect(s.sample(rng)).toBe(2.5);
  });

  const batches: Array<[BatchSizeLaw, number, number]> = [
    [{ law: "geometric", mean: 3 }, 3, 3 * 2], // var = m (m - 1)
    [{ law: "geometric", mean: 1 }, 1, 0],
    [{ law: "fixed", value: 4 }, 4, 0],
    [{ law: "uniform", min: 2, max: 6 }, 4, (25 - 1) / 12],
    [{ law: "empirical", values: [1, 5], probabilities: [0.75, 0.25] }, 2, 0.75 + 6.25 - 4],
  ];
  batches.forEach(([law, mean, variance], i) => {
    it(`batch size ${JSON.stringify(law)}`, () => {
      const sampler = new BatchSizeSampler(law);
      const rng = new Random(77, i, 0);
      const m = moments(() => sampler.sample(rng));
      if (variance === 0) expect(m.mean).toBe(mean);
      else {
        expectWithin5SE(m.mean, mean, Math.sqrt(variance), "mean");
        expectWithin5SE(m.m2, variance + mean * mean, Math.sqrt(m.m4 - m.m2 * m.m2), "second moment");
      }
    });
  });
});

describe("uniform generator (xoshiro128**, SplitMix64 seeding)", () => {
  it("100-bin chi-square of 1e6 draws below mean + 5 sd of chi-square(99)", () => {
    const rng = new Random(123, 0, 0);
    const bins = new Float64Array(100);
    const n = 1_000_000;
    let outside = 0;
    for (let i = 0; i < n; i++) {
      const u = rng.next();
      if (!(u > 0 && u < 1)) outside++;
      bins[Math.floor(u * 100)]++;
    }
    expect(outside, "draws outside (0, 1)").toBe(0);
    let chi2 = 0;
    for (const b of bins) chi2 += (b - n / 100) ** 2 / (n / 100);
    // chi-square(99): mean 99, sd sqrt(198) = 14.07.
    expect(chi2).toBeLessThan(99 + 5 * Math.sqrt(198));
    expect(chi2).toBeGreaterThan(99 - 5 * Math.sqrt(198));
  });

  it("sub-streams, replications and neighbouring seeds are uncorrelated (|r| < 5 / sqrt(n))", () => {
    const pairs: Array<[Random, Random]> = [
      [new Random(7, 0, 0), new Random(7, 0, 1)], // arrivals vs holding
      [new Random(7, 0, 1), new Random(7, 1, 1)], // neighbouring replications
      [new Random(7, 0, 0), new Random(8, 0, 0)], // neighbouring seeds
    ];
    const n = 100_000;
    for (const [a, b] of pairs) {
      let sa = 0;
      let sb = 0;
      let sab = 0;
      let saa = 0;
      let sbb = 0;
      for (let i = 0; i < n; i++) {
        const x = a.next();
        const y = b.next();
        sa += x;
        sb += y;
        sab += x * y;
        saa += x * x;
        sbb += y * y;
      }
      const r = (sab / n - (sa / n) * (sb / n)) / Math.sqrt((saa / n - (sa / n) ** 2) * (sbb / n - (sb / n) ** 2));
      expect(Math.abs(r)).toBeLessThan(5 / Math.sqrt(n));
    }
  });

  it("the same (seed, replication, substream) reproduces the sequence; another triple does not", () => {
    const a = new Random(99, 4, 2);
    const b = new Random(99, 4, 2);
    const c = new Random(99, 2, 4);
    const sa = Array.from({ length: 8 }, () => a.next());
    expect(Array.from({ length: 8 }, () => b.next())).toEqual(sa);
    expect(Array.from({ length: 8 }, () => c.next())).not.toEqual(sa);
  });
});

describe("52-bit uniforms for heavy-tailed laws", () => {
  it("stay strictly inside (0, 1) at the extreme words and are uniform in mean", () => {
    // (k + 0.5) / 2^52 at k = 0 and k = 2^52 - 1: the largest double below 1 is 1 - 2^-53.
    expect((0 + 0.5) * 2 ** -52).toBeGreaterThan(0);
    expect((2 ** 52 - 1 + 0.5) * 2 ** -52).toBeLessThan(1);
    const rng = new Random(11, 0, 0);
    const n = 200_000;
    let sum = 0;
    for (let i = 0; i < n; i++) {
      const u = rng.next52();
      expect(u > 0 && u < 1).toBe(true);
      sum += u;
    }
    // Mean of U(0,1) is 1/2 with standard error sqrt(1/12/n); 5 standard errors.
    expect(Math.abs(sum / n - 0.5)).toBeLessThan(5 * Math.sqrt(1 / 12 / n));
  });
});
