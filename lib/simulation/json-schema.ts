import { z } from "zod";
import { batchSizeSchema, lawSchema, scenarioSchema } from "./scenario";

/**
 * JSON Schema (draft 2020-12) of a scenario file as it is written (input side: fields with
 * defaults are optional). Cross-field rules (matrix shapes, sums to 1, ...) are zod-only and are
 * listed in the description; the committed scenario.schema.json must equal this text.
 */
export function scenarioJsonSchema(): Record<string, unknown> {
  // A local registry: the time law is used four times and goes to $defs once, by name.
  const metadata = z.registry<{ id: string; description?: string }>();
  metadata.add(lawSchema, { id: "law", description: "a law of a positive time: holding, interarrival, retry delay or patience" });
  metadata.add(batchSizeSchema, { id: "batchSize", description: "a law of the number of calls in a batch (1, 2, ...)" });
  const schema = z.toJSONSchema(scenarioSchema, { io: "input", unrepresentable: "any", metadata }) as Record<string, unknown>;
  return {
    ...schema,
    title: "Spillway scenario",
    description:
      "A loss or finite-waiting system to simulate. Rates and means share one time unit; offered traffic (erlangs) = rate x mean holding time. " +
      "Further rules checked on upload: mmpp switching is k x k for k rates and irreducible; probabilities sum to 1; " +
      "hyperexponential takes {mean, scv} or {probabilities, means}; weibull takes {mean, cv} or {shape, scale}; uniform max > min; " +
      "run takes exactly one of callsPerReplication or horizon and at most one of warmupCalls, warmupTime, warmup; patience needs waitingPositions > 0.",
  };
}

export function scenarioJsonSchemaText(): string {
  return `${JSON.stringify(scenarioJsonSchema(), null, 2)}\n`;
}
