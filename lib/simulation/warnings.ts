import { z } from "zod";
import type { PartialAggregate } from "./aggregate";
import type { SimulationResult } from "./result";
import type { Scenario } from "./scenario";

/**
 * Reasons not to trust a figure, attached to every result (empty when all is well) and shown by
 * the CLI, the API and the run page. Rules live in one registry: each looks at the scenario, the
 * folded aggregate and the built result, and returns zero or more warnings.
 */
export const warningSchema = z.object({
  code: z.string(),
  message: z.string(),
  /** The result field the warning is about (e.g. "callCongestion"), when it is about one. */
  measure: z.string().optional(),
});
export type Warning = z.infer<typeof warningSchema>;

export interface WarningRule {
  code: string;
  check(scenario: Scenario, aggregate: PartialAggregate, result: Omit<SimulationResult, "warnings">): Warning[];
}

export const warningRules: WarningRule[] = [
  {
    // A probability estimated at exactly zero has a zero-width interval that means nothing; the
    // rule of three (Hanley & Lippman-Hand, JAMA 249, 1983) bounds it from the calls observed.
    code: "no-blocking-observed",
    check(_scenario, _aggregate, result) {
      if (result.calls <= 0 || result.callCongestion.estimate > 0) return [];
      const upper = -Math.log(1 - result.confidence) / result.calls;
      return [
        {
          code: "no-blocking-observed",
          measure: "callCongestion",
          message: `No call was blocked in ${result.calls} measured calls, so the interval [0, 0] carries no information; at ${Math.round(result.confidence * 100)} % confidence the call congestion is below ${Number(upper.toPrecision(3))}.`,
        },
      ];
    },
  },
];

export function warningsFor(scenario: Scenario, aggregate: PartialAggregate, result: Omit<SimulationResult, "warnings">): Warning[] {
  return warningRules.flatMap((rule) => rule.check(scenario, aggregate, result));
}
