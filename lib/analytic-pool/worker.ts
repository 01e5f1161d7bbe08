// Worker-thread entry: evaluates one analytic operation off the web server's event loop. Bundled to plain
// JavaScript by lib/ops/bundle.ts; answers with a tagged result because errors lose their class across threads.
import { analyticOperations, type AnalyticOperationName } from "../teletraffic/operations";
import { offeredTraffic, parseScenario, referencesFor } from "../simulation/index";

/** Evaluations beyond the closed forms: the scenario editor's analytic references (exact chains can take seconds). */
export const scenarioEvaluations = {
  "scenario-references": (input: unknown) => {
    const scenario = parseScenario(input);
    return { offeredTraffic: offeredTraffic(scenario), references: referencesFor(scenario) };
  },
};
export type PoolOperation = AnalyticOperationName | keyof typeof scenarioEvaluations;

export interface EvaluationTask {
  operation: PoolOperation;
  input: unknown;
}

export type EvaluationOutcome =
  | { ok: true; result: Record<string, unknown> }
  | { ok: false; kind: string; message: string; field?: string };

/** The first NaN or infinity anywhere in a result, as a dotted path. */
export function nonFinitePath(value: unknown, path = "result"): string | null {
  if (typeof value === "number") return Number.isFinite(value) ? null : path;
  if (Array.isArray(value)) {
    for (let i = 0; i < value.length; i++) {
      const found = nonFinitePath(value[i], `${path}.${i}`);
      if (found) return found;
    }
  } else if (value && typeof value === "object") {
    for (const [key, inner] of Object.entries(value)) {
      const found = nonFinitePath(inner, `${path}.${key}`);
      if (found) return found;
    }
  }
  return null;
}

const noAnswer = (operation: string, detail: string): EvaluationOutcome => ({
  ok: false,
  kind: "no-answer",
  message: `${operation} cannot give a finite answer for these inputs (${detail}); they are at the edge of what double-precision arithmetic can represent.`,
});

export function evaluateTask({ operation, input }: EvaluationTask): EvaluationOutcome {
  try {
    // Scenario references report an unevaluable method inside the result (`unavailable`), so they skip the check.
    if (operation === "scenario-references") return { ok: true, result: scenarioEvaluations[operation](input) };
    const result = analyticOperations[operation].evaluate(input);
    const bad = nonFinitePath(result);
    return bad ? noAnswer(operation, `${bad} is not finite`) : { ok: true, result };
  } catch (error) {
    const failure = error as { kind?: unknown; field?: unknown; message?: unknown };
    const message = typeof failure.message === "string" ? failure.message : String(error);
    if (failure.kind === "input" || failure.kind === "convergence") {
      return { ok: false, kind: failure.kind, message, field: typeof failure.field === "string" ? failure.field : undefined };
    }
    // Validated input that still breaks the method (an overflow deep inside, an array too long): the case is
    // out of the method's reach, which is a 422 for the caller, not a server fault.
    return noAnswer(operation, message);
  }
}

export default evaluateTask;
