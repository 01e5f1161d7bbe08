import { z } from "zod";
import { assertFiniteResult, inputError, parseInput } from "./errors";

export const MAX_CAPACITY = 1_000_000;
export const MAX_CLASSES = 100;

export const kaufmanRobertsInputSchema = z
  .object({
    capacity: z.number().int().min(1).max(MAX_CAPACITY).describe(`link capacity C in bandwidth units (1..${MAX_CAPACITY})`),
    classes: z
      .array(
        z.object({
          traffic: z.number().min(0).max(1e7).describe("offered traffic of the class in erlangs (calls)"),
          bandwidth: z.number().int().min(1).describe("bandwidth units b_k one call of the class occupies (integer >= 1, <= C)"),
        }),
      )
      .min(1)
      .max(MAX_CLASSES)
      .describe(`traffic classes (1..${MAX_CLASSES}), each Poisson with its own bandwidth`),
  })
  .describe("multi-rate loss link with complete sharing");
export type KaufmanRobertsInput = z.infer<typeof kaufmanRobertsInputSchema>;

export interface KaufmanRobertsClassResult {
  traffic: number;
  bandwidth: number;
  /** time congestion of the class = call congestion (Poisson arrivals): P(occupancy > C - b_k) */
  blocking: number;
  carriedTraffic: number;
}

export interface KaufmanRobertsResult {
  method: string;
  capacity: number;
  classes: KaufmanRobertsClassResult[];
  meanOccupancy: number;
  utilisation: number;
}

/**
 * Kaufman–Roberts recursion (Kaufman 1981, IEEE Trans. Commun. 29; Roberts 1981):
 * c q(c) = Σ_k A_k b_k q(c - b_k). All terms positive; rescaled whenever it grows large.
 */
export function kaufmanRoberts(input: KaufmanRobertsInput): KaufmanRobertsResult {
  const { capacity: c, classes } = parseInput(kaufmanRobertsInputSchema, input);
  classes.forEach((cls, i) => {
    if (cls.bandwidth > c) throw inputError(`classes.${i}.bandwidth`, `must not exceed the capacity ${c}`);
  });
  const q = new Float64Array(c + 1);
  q[0] = 1;
  for (let x = 1; x <= c; x++) {
    let s = 0;
    for (const cls of classes) if (cls.bandwidth <= x) s += cls.traffic * cls.bandwidth * q[x - cls.bandwidth];
    let v = s / x;
    if (v > 1e250) {
      for (let y = 0; y < x; y++) q[y] *= 1e-250;
      v *= 1e-250;
    }
    q[x] = v;
  }
  let total = 0;
  let occupancy = 0;
  for (let x = 0; x <= c; x++) {
    total += q[x];
    occupancy += x * q[x];
  }
  // tail[x] = P(occupancy >= x), summed from the top for accuracy in the small tail
  const results = classes.map((cls) => {
    let tail = 0;
    for (let x = c; x > c - cls.bandwidth; x--) tail += q[x];
    const blocking = tail / total;
    // carried from the admitting states, not A (1 − blocking), which cancels when blocking is near 1
    let head = 0;
    for (let x = 0; x <= c - cls.bandwidth; x++) head += q[x];
    return { traffic: cls.traffic, bandwidth: cls.bandwidth, blocking, carriedTraffic: (cls.traffic * head) / total };
  });
  for (const r of results) assertFiniteResult(r, "kaufmanRoberts");
  return assertFiniteResult(
    {
      method: "Kaufman–Roberts recursion (multi-rate loss, complete sharing)",
      capacity: c,
      classes: results,
      meanOccupancy: occupancy / total,
      utilisation: occupancy / total / c,
    },
    "kaufmanRoberts",
  );
}
