"use client";

// Starting a sweep, a sizing map (two-parameter grid) or a dimensioning search on a stored scenario. The definition
// is checked in the browser with lib/sweeps' own schema (so the words match the API's), then posted; the API's
// field messages land beside the same fields.
import { useRouter } from "next/navigation";
import { useMemo, useState, type FormEvent } from "react";
import { Button, Card, CardBody, CardDescription, CardHeader, CardTitle, Field, FormError, Input, Select, toast } from "@/components/ui";
import { ApiError, errorMessage } from "@/lib/client/api";
import { formatNumber } from "@/lib/client/format";
import { useScenario, useScenarios } from "@/lib/client/queries/scenarios";
import { useSubmitSweep } from "@/lib/client/queries/sweeps";
import { fieldErrors } from "@/lib/schemas/validation";
import { parseScenario } from "@/lib/simulation";
import { sizingFormulaNames, sizingFormulas, sweepDefinitionSchema, sweepParameterNames, sweepParameters, type SweepParameterName } from "@/lib/sweeps";
import type { SweepKind } from "@/lib/jobs/api-types";
import { measureWords, parseValueList, sweepKindLabels } from "./sweep-text";

const kindHelp: Record<SweepKind, string> = {
  sweep: "One parameter over a list of values: simulated blocking against the formulas, point by point.",
  grid: "Two parameters crossed: each cell gets the group the formula installs for the target, and the simulation says whether it holds.",
  dimensioning: "The smallest group that meets the target on its upper confidence bound, found by simulation, beside the formula's group.",
};

type Measure = "callCongestion" | "timeCongestion";

interface AxisState {
  parameter: SweepParameterName;
  values: string;
}

/** Collapses `values.3` style paths onto the list field that holds them, naming the value. */
function toFormFields(fields: Record<string, string>): Record<string, string> {
  const out: Record<string, string> = {};
  for (const [path, message] of Object.entries(fields)) {
    const m = /^(.*?values)\.(\d+)$/.exec(path);
    const key = m ? m[1] : path;
    out[key] ??= m ? `Value ${Number(m[2]) + 1}: ${message}` : message;
  }
  return out;
}

export function SweepForm({ workspace, initialScenarioId, initialKind }: { workspace: string; initialScenarioId?: string; initialKind?: SweepKind }) {
  const router = useRouter();
  const scenarios = useScenarios(workspace);
  const [scenarioId, setScenarioId] = useState(initialScenarioId ?? "");
  const scenario = useScenario(workspace, scenarioId || undefined);
  const [revision, setRevision] = useState("");
  const [name, setName] = useState("");
  const [kind, setKind] = useState<SweepKind>(initialKind ?? "sweep");
  const [one, setOne] = useState<AxisState>({ parameter: "offeredTraffic", values: "" });
  const [x, setX] = useState<AxisState>({ parameter: "offeredTraffic", values: "" });
  const [y, setY] = useState<AxisState>({ parameter: "peakedness", values: "" });
  const [targetPercent, setTargetPercent] = useState("1");
  const [measure, setMeasure] = useState<Measure>("callCongestion");
  const [formula, setFormula] = useState<string>(sizingFormulaNames[0]);
  const [confidencePercent, setConfidencePercent] = useState("");
  const [maxProbes, setMaxProbes] = useState("30");
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [formError, setFormError] = useState<string | null>(null);
  const submit = useSubmitSweep(workspace);

  // Where the chosen scenario stands on each parameter (or why a parameter does not apply to it).
  const baseValues = useMemo(() => {
    const doc = scenario.data?.scenario;
    if (!doc) return null;
    let parsed;
    try {
      parsed = parseScenario(doc);
    } catch {
      return null;
    }
    const out = {} as Record<SweepParameterName, { value?: number; refusal?: string }>;
    for (const p of sweepParameterNames) {
      try {
        out[p] = { value: sweepParameters[p].read(parsed) };
      } catch (error) {
        out[p] = { refusal: (error as Error).message };
      }
    }
    return out;
  }, [scenario.data]);

  function build(): { body: Record<string, unknown> } | { fields: Record<string, string> } {
    const fields: Record<string, string> = {};
    const list = (key: string, text: string) => {
      const parsed = parseValueList(text);
      if ("error" in parsed) {
        fields[key] = parsed.error;
        return [];
      }
      return parsed.values;
    };
    const percent = (key: string, text: string, optional = false) => {
      if (optional && text.trim() === "") return undefined;
      const v = Number(text);
      if (text.trim() === "" || !Number.isFinite(v)) {
        fields[key] = "Enter a percentage, e.g. 1 for 1 %.";
        return undefined;
      }
      return v / 100;
    };
    if (!scenarioId) fields.scenarioId = "Choose the scenario to start from.";
    let definition: Record<string, unknown>;
    if (kind === "sweep") definition = { kind, parameter: one.parameter, values: list("values", one.values) };
    else if (kind === "grid")
      definition = {
        kind,
        x: { parameter: x.parameter, values: list("x.values", x.values) },
        y: { parameter: y.parameter, values: list("y.values", y.values) },
        targetBlocking: percent("targetBlocking", targetPercent),
        formula,
        measure,
      };
    else
      definition = {
        kind,
        targetBlocking: percent("targetBlocking", targetPercent),
        formula,
        measure,
        ...(confidencePercent.trim() ? { confidence: percent("confidence", confidencePercent, true) } : {}),
        maxProbes: Number(maxProbes),
      };
    if (Object.keys(fields).length) return { fields };
    const checked = sweepDefinitionSchema.safeParse(definition);
    if (!checked.success) return { fields: toFormFields(fieldErrors(checked.error)) };
    const rev = revision.trim() ? Number(revision) : undefined;
    return { body: { scenarioId, ...(rev !== undefined ? { revision: rev } : {}), name: name.trim(), ...definition } };
  }

  async function onSubmit(event: FormEvent) {
    event.preventDefault();
    setFormError(null);
    const built = build();
    if ("fields" in built) {
      setErrors(built.fields);
      setFormError("Some fields need attention.");
      return;
    }
    setErrors({});
    try {
      const accepted = await submit.mutateAsync(built.body);
      toast.success(`${sweepKindLabels[kind]} queued.`);
      router.push(`/w/${workspace}/sweeps/${accepted.id}`);
    } catch (error) {
      if (error instanceof ApiError && Object.keys(error.fields).length) setErrors(toFormFields(error.fields));
      setFormError(errorMessage(error));
    }
  }

  const parameterOptions = (exclude: SweepParameterName[] = []) =>
    sweepParameterNames
      .filter((p) => !exclude.includes(p))
      .map((p) => (
        <option key={p} value={p}>
          {sweepParameters[p].label}
          {sweepParameters[p].unit && sweepParameters[p].unit !== "time units" ? ` (${sweepParameters[p].unit})` : ""}
        </option>
      ));

  const parameterHint = (p: SweepParameterName) => {
    const base = baseValues?.[p];
    const now = base ? (base.refusal ? ` Not usable with this scenario: ${base.refusal}` : ` This scenario: ${formatNumber(base.value)}.`) : "";
    return `${sweepParameters[p].mapping}${now}`;
  };

  const axisFields = (label: string, key: string, state: AxisState, set: (s: AxisState) => void, exclude: SweepParameterName[]) => (
    <fieldset className="grid gap-4 rounded-lg border border-basin-200 p-4 md:grid-cols-2">
      <legend className="px-1 text-sm font-semibold text-basin-900">{label}</legend>
      <Field label="Parameter" hint={parameterHint(state.parameter)} error={errors[`${key}.parameter`] ?? (key === "" ? errors.parameter : undefined)}>
        <Select name={`${key || "sweep"}-parameter`} value={state.parameter} onChange={(e) => set({ ...state, parameter: e.target.value as SweepParameterName })}>
          {parameterOptions(exclude)}
        </Select>
      </Field>
      <Field label="Values" required hint="A list (10, 12, 15) or a stepped range from:to:step (10:20:2)." error={errors[key ? `${key}.values` : "values"]}>
        <Input name={`${key || "sweep"}-values`} value={state.values} onChange={(e) => set({ ...state, values: e.target.value })} placeholder="e.g. 10:20:2" autoComplete="off" />
      </Field>
    </fieldset>
  );

  const targetFields = (
    <div className="grid gap-4 md:grid-cols-3">
      <Field label="Target grade of service (%)" required hint="Blocking the group must not exceed, e.g. 1 for 1 %." error={errors.targetBlocking}>
        <Input name="target" inputMode="decimal" value={targetPercent} onChange={(e) => setTargetPercent(e.target.value)} />
      </Field>
      <Field label="Measured as" error={errors.measure}>
        <Select name="measure" value={measure} onChange={(e) => setMeasure(e.target.value as Measure)}>
          {(Object.keys(measureWords) as Measure[]).map((m) => (
            <option key={m} value={m}>
              {measureWords[m][0].toUpperCase() + measureWords[m].slice(1)}
            </option>
          ))}
        </Select>
      </Field>
      <Field label="Formula that sizes the group" error={errors.formula}>
        <Select name="formula" value={formula} onChange={(e) => setFormula(e.target.value)}>
          {sizingFormulaNames.map((f) => (
            <option key={f} value={f}>
              {sizingFormulas[f].label}
            </option>
          ))}
        </Select>
      </Field>
    </div>
  );

  return (
    <form onSubmit={onSubmit} aria-label="Start a sweep" noValidate className="flex flex-col gap-6">
      <Card>
        <CardHeader>
          <CardTitle as="h2">Base scenario</CardTitle>
          <CardDescription>Every point starts from this scenario and keeps its seed, so neighbouring points differ by the parameter, not by the noise.</CardDescription>
        </CardHeader>
        <CardBody className="grid gap-4 md:grid-cols-3">
          <Field label="Scenario" required error={errors.scenarioId} hint={scenarios.isError ? errorMessage(scenarios.error) : scenarios.isPending ? "Loading scenarios …" : undefined}>
            <Select name="scenarioId" value={scenarioId} onChange={(e) => setScenarioId(e.target.value)}>
              <option value="">Choose a scenario</option>
              {(scenarios.data ?? []).map((s) => (
                <option key={s.id} value={s.id}>
                  {s.name} (rev. {s.latestRevision})
                </option>
              ))}
            </Select>
          </Field>
          <Field label="Revision" hint="Leave empty for the newest." error={errors.revision}>
            <Input name="revision" inputMode="numeric" value={revision} onChange={(e) => setRevision(e.target.value)} />
          </Field>
          <Field label="Name" hint="Optional; shown in lists and reports." error={errors.name}>
            <Input name="name" value={name} onChange={(e) => setName(e.target.value)} maxLength={200} />
          </Field>
        </CardBody>
      </Card>
      <Card>
        <CardHeader>
          <CardTitle as="h2">What to run</CardTitle>
        </CardHeader>
        <CardBody className="flex flex-col gap-5">
          <fieldset className="flex flex-col gap-2">
            <legend className="mb-1 text-sm font-medium text-basin-900">Kind</legend>
            {(Object.keys(sweepKindLabels) as SweepKind[]).map((k) => (
              <label key={k} className="flex items-start gap-2 text-sm">
                <input type="radio" name="kind" value={k} checked={kind === k} onChange={() => setKind(k)} className="mt-1" />
                <span>
                  <span className="font-medium text-basin-950">{sweepKindLabels[k]}</span>
                  <span className="block text-basin-700">{kindHelp[k]}</span>
                </span>
              </label>
            ))}
          </fieldset>
          {kind === "sweep" && axisFields("Swept parameter", "", one, setOne, [])}
          {kind === "grid" && (
            <>
              {axisFields("Columns (x)", "x", x, setX, ["servers"])}
              {axisFields("Rows (y)", "y", y, setY, ["servers"])}
              {targetFields}
            </>
          )}
          {kind === "dimensioning" && (
            <>
              {targetFields}
              <div className="grid gap-4 md:grid-cols-3">
                <Field label="Confidence of the bound (%)" hint="Empty: the scenario's own run confidence." error={errors.confidence}>
                  <Input name="confidence" inputMode="decimal" value={confidencePercent} onChange={(e) => setConfidencePercent(e.target.value)} placeholder="e.g. 95" />
                </Field>
                <Field label="Most probes" hint="Group sizes the search may simulate (2 to 60)." error={errors.maxProbes}>
                  <Input name="maxProbes" inputMode="numeric" value={maxProbes} onChange={(e) => setMaxProbes(e.target.value)} />
                </Field>
              </div>
            </>
          )}
          <FormError title="Not started">{formError}</FormError>
          <div>
            <Button type="submit" pending={submit.isPending}>
              Start {sweepKindLabels[kind].toLowerCase()}
            </Button>
          </div>
        </CardBody>
      </Card>
    </form>
  );
}
