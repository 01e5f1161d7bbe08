// What a sweep, grid or dimensioning search asks for (the zod schema the API validates with), and
// the point scenarios it expands to. Common random numbers: every point keeps the base seed.
import { z } from "zod";
import { formatPath, parseScenario, ScenarioError, type Scenario } from "../simulation/index";
import { checkParameterValue, sweepParameterNames, sweepParameters, SweepParameterError, type SweepParameterName } from "./parameters";
import { formulaServers, sizingFormulaNames } from "./sizing";

/** Values along one axis; the workspace quota (points per sweep) is usually stricter. */
export const MAX_AXIS_VALUES = 121;
/** Probes of one dimensioning search, at most. */
export const MAX_PROBES = 60;

const parameterName = z.enum(sweepParameterNames, { error: `must be one of ${sweepParameterNames.map((n) => `"${n}"`).join(", ")}` });
const axisValues = z
  .array(z.number().finite("must be a finite number"))
  .min(1, "needs at least 1 value")
  .max(MAX_AXIS_VALUES, `at most ${MAX_AXIS_VALUES} values`);
const targetBlocking = z.number().gt(0, "must be > 0").lt(1, "must be < 1");
const measure = z.enum(["callCongestion", "timeCongestion"]).default("callCongestion");

const axis = z
  .strictObject({ parameter: parameterName, values: axisValues })
  .superRefine((v, ctx) => checkAxis(v.parameter, v.values, ctx, ["values"]));

function checkAxis(parameter: SweepParameterName, values: number[], ctx: z.RefinementCtx, path: (string | number)[]) {
  values.forEach((value, i) => {
    const problem = checkParameterValue(parameter, value);
    if (problem) ctx.addIssue({ code: "custom", path: [...path, i], message: `${parameter} ${problem}` });
  });
  if (new Set(values).size !== values.length) ctx.addIssue({ code: "custom", path, message: "values must be distinct" });
}

export const sweepDefinitionSchema = z.preprocess(
  // A body with a parameter and values but no kind is a one-parameter sweep (the API's short form).
  (v) => (v && typeof v === "object" && !Array.isArray(v) && !("kind" in v) ? { kind: "sweep", ...v } : v),
  z.discriminatedUnion("kind", [
    z
      .strictObject({ kind: z.literal("sweep"), parameter: parameterName, values: axisValues })
      .superRefine((v, ctx) => checkAxis(v.parameter, v.values, ctx, ["values"])),
    z
      .strictObject({
        kind: z.literal("grid"),
        /** Columns and rows of the map, e.g. offered traffic x peakedness. */
        x: axis,
        y: axis,
        /** Target grade of service: the formula sizes each cell's group for it. */
        targetBlocking,
        formula: z.enum(sizingFormulaNames).default("erlang-b"),
        measure,
      })
      .superRefine((v, ctx) => {
        if (v.x.parameter === v.y.parameter) ctx.addIssue({ code: "custom", path: ["y", "parameter"], message: "must differ from x.parameter" });
        for (const key of ["x", "y"] as const)
          if (v[key].parameter === "servers") ctx.addIssue({ code: "custom", path: [key, "parameter"], message: "servers cannot be an axis: the formula sizes each cell's group" });
      }),
    z.strictObject({
      kind: z.literal("dimensioning"),
      targetBlocking,
      formula: z.enum(sizingFormulaNames).default("erlang-b"),
      measure,
      /** Confidence of the upper bound that must meet the target; default the scenario's run.confidence. */
      confidence: z.number().gt(0.5, "must be > 0.5").lt(1, "must be < 1").optional(),
      maxProbes: z.number().int("must be an integer").min(2, "must be >= 2").max(MAX_PROBES, `must be <= ${MAX_PROBES}`).default(30),
    }),
  ]),
);
export type SweepDefinition = z.output<typeof sweepDefinitionSchema>;
export type SweepDefinitionInput = z.input<typeof sweepDefinitionSchema>;
export type SweepKind = SweepDefinition["kind"];

/** Invalid sweep definition or a point that cannot be built; `field` names where (form path). */
export class SweepDefinitionError extends Error {
  readonly kind = "input" as const;
  constructor(
    message: string,
    readonly field: string,
  ) {
    super(message);
    this.name = "SweepDefinitionError";
  }
}

/** Validates a definition; throws SweepDefinitionError naming the first failing field. */
export function parseSweepDefinition(json: unknown): SweepDefinition {
  const result = sweepDefinitionSchema.safeParse(json);
  if (result.success) return result.data;
  const issue = result.error.issues[0];
  const path = [...issue.path];
  if (issue.code === "invalid_union" && issue.discriminator && path[path.length - 1] !== issue.discriminator) path.push(issue.discriminator);
  throw new SweepDefinitionError(`${formatPath(path)}: ${issue.message}`, path.map(String).join(".") || "definition");
}

export interface SweepPoint {
  /** Position in the sweep (row-major for grids: point = row x columns + column). */
  point: number;
  /** The swept values of this point (grids add the formula's servers). */
  values: Record<string, number>;
  scenario: Scenario;
}

/** Applies parameter values to the base scenario and validates the result; errors name the point. */
export function scenarioAt(base: Scenario, assignments: [SweepParameterName, number][], where: string): Scenario {
  let s = base;
  try {
    for (const [name, value] of assignments) s = sweepParameters[name].apply(s, value);
    return parseScenario(s);
  } catch (error) {
    const what = assignments.map(([n, v]) => `${n} = ${v}`).join(", ");
    if (error instanceof SweepParameterError) throw new SweepDefinitionError(`${where} (${what}): ${error.message}`, where);
    if (error instanceof ScenarioError) throw new SweepDefinitionError(`${where} (${what}) gives an invalid scenario: ${error.message}`, where);
    throw error;
  }
}

/**
 * The point runs a sweep or grid starts with (a dimensioning search starts with one probe at the
 * formula's N and plans the others as results come in: see sizing.ts `nextProbe`). Every point
 * keeps the base seed: common random numbers, so neighbouring points differ by the parameter,
 * not by the noise.
 */
export function expandSweep(base: Scenario, definition: SweepDefinition): SweepPoint[] {
  switch (definition.kind) {
    case "sweep":
      return definition.values.map((value, point) => ({
        point,
        values: { [definition.parameter]: value },
        scenario: scenarioAt(base, [[definition.parameter, value]], `values.${point}`),
      }));
    case "grid": {
      const { x, y } = definition;
      const points: SweepPoint[] = [];
      y.values.forEach((yv, row) =>
        x.values.forEach((xv, column) => {
          const where = `cell (x.values.${column}, y.values.${row})`;
          const cell = scenarioAt(base, [[x.parameter, xv], [y.parameter, yv]], where);
          const servers = formulaServers(definition.formula, cell, definition.targetBlocking);
          points.push({ point: row * x.values.length + column, values: { [x.parameter]: xv, [y.parameter]: yv, servers }, scenario: scenarioAt(cell, [["servers", servers]], where) });
        }),
      );
      return points;
    }
    case "dimensioning": {
      const servers = formulaServers(definition.formula, base, definition.targetBlocking);
      return [probePoint(base, definition, 0, servers)];
    }
  }
}

/** A dimensioning probe: the base scenario on `servers` servers, at the search's confidence. */
export function probePoint(base: Scenario, definition: Extract<SweepDefinition, { kind: "dimensioning" }>, point: number, servers: number): SweepPoint {
  const s = scenarioAt(base, [["servers", servers]], `probe ${point}`);
  const scenario = definition.confidence === undefined ? s : parseScenario({ ...s, run: { ...s.run, confidence: definition.confidence } });
  return { point, values: { servers }, scenario };
}

/** Points a definition plans up front (a dimensioning search: at most its maxProbes), for quotas. */
export function plannedPoints(definition: SweepDefinition): number {
  switch (definition.kind) {
    case "sweep":
      return definition.values.length;
    case "grid":
      return definition.x.values.length * definition.y.values.length;
    case "dimensioning":
      return definition.maxProbes;
  }
}
