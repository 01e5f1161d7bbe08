import { balancedHyperexponential, weibullShapeForCv } from "../teletraffic/law-formulas";
import type { BatchSizeLaw, Law } from "../teletraffic/laws";
import { lnGamma } from "../teletraffic/numeric";
import type { Random } from "./random";
import * as ziggurat from "./ziggurat";

// Module-local bindings: loaders that turn imports into property getters would pay one per draw.
const { zigExponential, zigGamma, zigNormal } = ziggurat;

/** Numeric law codes: the hot loop switches on these instead of calling closures. */
export const LAW = {
  exponential: 0,
  deterministic: 1,
  erlang: 2,
  hyperexponential: 3,
  lognormal: 4,
  gamma: 5,
  weibull: 6,
  pareto: 7,
  uniform: 8,
  empirical: 9,
} as const;

// One balanced hyperexponential and one Weibull fit for the whole program.
export { balancedHyperexponential, weibullShapeForCv };

/**
 * Codes of the ziggurat variants (`LawSampler(law, { ziggurat: true })`): the same laws drawn
 * with ziggurat exponentials and normals (ziggurat.ts) instead of logarithms and the polar method.
 * Different streams, same laws; the reference loop keeps the codes above.
 */
const ZIGGURAT_CODE: Partial<Record<number, number>> = { [LAW.exponential]: 10, [LAW.erlang]: 11, [LAW.hyperexponential]: 12, [LAW.lognormal]: 13, [LAW.gamma]: 14 };

/** Precomputed sampler of one continuous law. */
export class LawSampler {
  readonly code: number;
  readonly mean: number;
  private a = 0;
  private b = 0;
  private k = 0;
  private table: Float64Array = new Float64Array(0);
  private values: Float64Array = new Float64Array(0);

  constructor(law: Law, options: { ziggurat?: boolean } = {}) {
    this.code = (options.ziggurat ? ZIGGURAT_CODE[LAW[law.law]] : undefined) ?? LAW[law.law];
    switch (law.law) {
      case "exponential":
        this.a = law.mean;
        this.mean = law.mean;
        break;
      case "deterministic":
        this.a = law.value;
        this.mean = law.value;
        break;
      case "erlang":
        this.k = law.k;
        this.a = law.mean / law.k;
        this.mean = law.mean;
        break;
      case "hyperexponential": {
        const branches = law.probabilities && law.means ? { probabilities: law.probabilities, means: law.means } : balancedHyperexponential(law.mean!, law.scv!);
        this.table = cumulative(branches.probabilities);
        this.values = Float64Array.from(branches.means);
        this.mean = branches.probabilities.reduce((s, p, i) => s + p * branches.means[i], 0);
        break;
      }
      case "lognormal": {
        const s2 = Math.log(1 + law.cv * law.cv);
        this.a = Math.log(law.mean) - s2 / 2;
        this.b = Math.sqrt(s2);
        this.mean = law.mean;
        break;
      }
      case "gamma":
        this.a = 1 / (law.cv * law.cv); // shape
        this.b = law.mean * law.cv * law.cv; // scale
        this.mean = law.mean;
        break;
      case "weibull": {
        const shape = law.shape ?? weibullShapeForCv(law.cv!);
        const scale = law.scale ?? law.mean! / Math.exp(lnGamma(1 + 1 / shape));
        this.a = scale;
        this.b = 1 / shape;
        this.mean = scale * Math.exp(lnGamma(1 + 1 / shape));
        break;
      }
      case "pareto":
        this.a = (law.mean * (law.shape - 1)) / law.shape; // scale x_m
        this.b = -1 / law.shape;
        this.mean = law.mean;
        break;
      case "uniform":
        this.a = law.min;
        this.b = law.max - law.min;
        this.mean = (law.min + law.max) / 2;
        break;
      case "empirical":
        this.values = Float64Array.from(law.samples);
        this.mean = law.samples.reduce((s, x) => s + x, 0) / law.samples.length;
        break;
    }
  }

  sample(rng: Random): number {
    switch (this.code) {
      case 0:
        return -this.a * Math.log(rng.next());
      case 1:
        return this.a;
      case 2: {
        let product = 1;
        let logSum = 0;
        for (let i = 0; i < this.k; i++) {
          product *= rng.next();
          if (product < 1e-280) {
            logSum += Math.log(product);
            product = 1;
          }
        }
        return -this.a * (logSum + Math.log(product));
      }
      case 3: {
        const u = rng.next();
        let i = 0;
        while (i < this.table.length - 1 && u > this.table[i]) i++;
        return -this.values[i] * Math.log(rng.next());
      }
      case 4:
        return Math.exp(this.a + this.b * rng.normal());
      case 5:
        return this.b * rng.gamma(this.a);
      case 6:
        return this.a * Math.pow(-Math.log(rng.next52()), this.b);
      case 7:
        return this.a * Math.pow(rng.next52(), this.b);
      case 8:
        return this.a + this.b * rng.next();
      case 9:
        return this.values[Math.floor(rng.next() * this.values.length)];
      case 10:
        return this.a * zigExponential(rng);
      case 11: {
        let sum = 0;
        for (let i = 0; i < this.k; i++) sum += zigExponential(rng);
        return this.a * sum;
      }
      case 12: {
        const u = rng.next();
        let i = 0;
        while (i < this.table.length - 1 && u > this.table[i]) i++;
        return this.values[i] * zigExponential(rng);
      }
      case 13:
        return Math.exp(this.a + this.b * zigNormal(rng));
      default:
        return this.b * zigGamma(rng, this.a);
    }
  }
}

function cumulative(probabilities: number[]): Float64Array {
  const table = new Float64Array(probabilities.length);
  let s = 0;
  probabilities.forEach((p, i) => {
    s += p;
    table[i] = s;
  });
  table[table.length - 1] = 1;
  return table;
}

/** Sampler of a batch-size law on {1, 2, ...}. */
export class BatchSizeSampler {
  readonly mean: number;
  private code: number;
  private a = 0;
  private b = 0;
  private table: Float64Array = new Float64Array(0);
  private values: Int32Array = new Int32Array(0);

  constructor(law: BatchSizeLaw) {
    switch (law.law) {
      case "geometric":
        this.code = 0;
        this.a = law.mean > 1 ? 1 / Math.log(1 - 1 / law.mean) : 0; // P(K = k) = (1-p)^(k-1) p, p = 1/mean
        this.mean = law.mean;
        break;
      case "fixed":
        this.code = 1;
        this.a = law.value;
        this.mean = law.value;
        break;
      case "uniform":
        this.code = 2;
        this.a = law.min;
        this.b = law.max - law.min + 1;
        this.mean = (law.min + law.max) / 2;
        break;
      case "empirical":
        this.code = 3;
        this.table = cumulative(law.probabilities);
        this.values = Int32Array.from(law.values);
        this.mean = law.values.reduce((s, v, i) => s + v * law.probabilities[i], 0);
        break;
    }
  }

  sample(rng: Random): number {
    switch (this.code) {
      case 0:
        return this.a === 0 ? 1 : 1 + Math.floor(Math.log(rng.next()) * this.a);
      case 1:
        return this.a;
      case 2:
        return this.a + Math.floor(rng.next() * this.b);
      default: {
        const u = rng.next();
        let i = 0;
        while (i < this.table.length - 1 && u > this.table[i]) i++;
        return this.values[i];
      }
    }
  }
}
