import { z } from "zod";
import { inputError, parseInput } from "./errors";
import {
  erlangBSummary,
  maxTrafficForBlocking,
  minServersForBlocking,
  serversField,
  targetField,
  trafficField,
} from "./erlang-b";
import { erlangC, erlangCInputSchema, finiteQueue, finiteQueueInputSchema } from "./erlang-c";
import { engset, engsetIdleRateForOfferedTraffic, engsetIdleRateInputSchema, engsetInputSchema } from "./engset";
import {
  equivalentRandom,
  equivalentRandomInputSchema,
  haywardBlocking,
  haywardInputSchema,
  overflowMoments,
  overflowMomentsInputSchema,
} from "./overflow";
import { extendedErlangB, extendedErlangBInputSchema } from "./retrials";
import { renewalLossInputSchema, renewalLossSystem } from "./renewal";
import { mmppLossInputSchema, mmppLossSystem } from "./mmpp";
import { batchLossInputSchema, batchPoissonLossSystem } from "./batch";
import { overflowLossInputSchema, overflowLossSystem } from "./overflow-chain";
import { kaufmanRoberts, kaufmanRobertsInputSchema } from "./multi-rate";

/** "erlang-b" takes exactly two of servers, traffic, target and dispatches on which are present. */
export const erlangBOperationInputSchema = z
  .strictObject({
    servers: serversField.optional(),
    traffic: trafficField.optional(),
    target: targetField.optional(),
  })
  .superRefine((v, ctx) => {
    const given = (["servers", "traffic", "target"] as const).filter((key) => v[key] !== undefined);
    if (given.length !== 2) {
      ctx.addIssue({
        code: "custom",
        path: [given.length > 2 ? "target" : "input"],
        message: "give exactly two of servers, traffic, target: {servers, traffic} → blocking; {servers, target} → largest traffic; {traffic, target} → smallest servers",
      });
    }
  })
  .describe("Erlang B: {servers, traffic} → blocking; {servers, target} → largest traffic; {traffic, target} → smallest integer servers");
export type ErlangBOperationInput = z.infer<typeof erlangBOperationInputSchema>;

function evaluateErlangB(raw: unknown): Record<string, unknown> {
  const v = parseInput(erlangBOperationInputSchema, raw);
  if (v.target === undefined) return { ...erlangBSummary({ servers: v.servers!, traffic: v.traffic! }) };
  if (v.traffic === undefined) return { ...maxTrafficForBlocking({ servers: v.servers!, target: v.target }) };
  if (v.traffic <= 0) throw inputError("traffic", "must be > 0 to size a group");
  return { ...minServersForBlocking({ traffic: v.traffic, target: v.target }) };
}

export interface AnalyticOperation {
  summary: string;
  input: z.ZodType;
  evaluate(input: unknown): Record<string, unknown>;
}

function operation<S extends z.ZodType>(summary: string, input: S, run: (value: z.input<S>) => object): AnalyticOperation {
  return { summary, input, evaluate: (value) => ({ ...run(parseInput(input, value) as z.input<S>) }) };
}

/** Every analytic operation of the API and CLI, keyed by its kebab-case name. */
export const analyticOperations = {
  "erlang-b": {
    summary: "Erlang B loss system: blocking, or largest traffic / smallest group for a target blocking",
    input: erlangBOperationInputSchema,
    evaluate: evaluateErlangB,
  },
  "erlang-c": operation("Erlang C delay system: probability of waiting, mean wait, P(W <= t)", erlangCInputSchema, erlangC),
  "finite-queue": operation("M/M/N/N+Q: loss with a finite waiting room", finiteQueueInputSchema, finiteQueue),
  engset: operation("Engset finite-source loss: time, call and traffic congestion", engsetInputSchema, engset),
  "engset-idle-rate": operation("Engset inverse: idle-source call rate from offered traffic per source", engsetIdleRateInputSchema, engsetIdleRateForOfferedTraffic),
  "overflow-moments": operation("Riordan mean, variance and peakedness of overflow traffic", overflowMomentsInputSchema, overflowMoments),
  "equivalent-random": operation("Wilkinson equivalent random: A*, N* and blocking of an (M, V) stream", equivalentRandomInputSchema, equivalentRandom),
  hayward: operation("Hayward approximation for peaked or smooth traffic", haywardInputSchema, haywardBlocking),
  "extended-erlang-b": operation("extended Erlang B with repeated attempts (recall factor)", extendedErlangBInputSchema, extendedErlangB),
  "renewal-loss": operation("GI/M/N/N with renewal arrivals (Palm–Takács): call and time congestion", renewalLossInputSchema, renewalLossSystem),
  "mmpp-loss": operation("Markov-modulated Poisson arrivals on N servers: exact call and time congestion", mmppLossInputSchema, mmppLossSystem),
  "batch-loss": operation("batch Poisson arrivals (geometric batches): exact call and time congestion", batchLossInputSchema, batchPoissonLossSystem),
  "overflow-loss": operation("exact overflow network beside equivalent random and Hayward", overflowLossInputSchema, overflowLossSystem),
  "multi-rate": operation("multi-rate loss link, Kaufman–Roberts recursion: per-class blocking", kaufmanRobertsInputSchema, kaufmanRoberts),
} satisfies Record<string, AnalyticOperation>;

export type AnalyticOperationName = keyof typeof analyticOperations;
export const analyticOperationNames = Object.keys(analyticOperations) as AnalyticOperationName[];
