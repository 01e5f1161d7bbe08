"use client";

import { useFormContext, useWatch } from "react-hook-form";
import { Field, Select, Spinner } from "@/components/ui";
import { errorMessage } from "@/lib/client/api";
import { useRunLengthPlan } from "@/lib/client/queries/run-length";
import type { ScenarioFormValues } from "@/lib/client/scenario-form";
import { NumberField, OptionalBlock } from "./fields";

const run = "scenario.run";

type Length = "calls" | "horizon";
type Warmup = "none" | "calls" | "time" | "auto";

/** "About N calls, about T s" for the requested precision, before the run (run-length.ts). */
function RunLengthEstimate({ scenario, relativeHalfWidth }: { scenario: unknown | null; relativeHalfWidth: number | undefined }) {
  const query = useRunLengthPlan(scenario, relativeHalfWidth);
  const plan = query.data;
  if (scenario === null) return <p className="text-sm text-basin-700">Fix the scenario's fields to see how long this precision takes.</p>;
  if (query.isError) return <p className="text-sm text-basin-700">No estimate: {errorMessage(query.error)}</p>;
  if (!plan) return <p className="flex items-center gap-2 text-sm text-basin-700"><Spinner /> Estimating the run length…</p>;
  const seconds = plan.seconds < 1 ? "under a second" : `about ${Math.ceil(plan.seconds)} s`;
  return (
    <div className="text-sm text-basin-800" data-testid="run-length-plan" aria-live="polite">
      <p>
        {plan.lowerBound ? "At least" : "About"} {plan.calls.toLocaleString("en")} calls ({plan.callsPerReplication.toLocaleString("en")} per replication × {plan.replications}), {seconds} on one core{query.isFetching ? " (updating…)" : ""}.
      </p>
      <p className="text-xs text-basin-600">
        Call congestion about {Number(plan.callCongestion.toPrecision(3))}; from the {plan.method}.{plan.lengthened ? ` Replications lengthened: ${plan.lengthened}.` : ""}
      </p>
    </div>
  );
}

export function RunFields({ scenario = null }: { scenario?: unknown | null }) {
  const { setValue } = useFormContext<ScenarioFormValues>();
  const values = useWatch<ScenarioFormValues, "scenario.run">({ name: run }) ?? {};
  const length: Length = values.horizon !== undefined ? "horizon" : "calls";
  const warmup: Warmup = values.warmup === "auto" ? "auto" : values.warmupTime !== undefined ? "time" : values.warmupCalls !== undefined ? "calls" : "none";
  const opts = { shouldValidate: true, shouldDirty: true } as const;
  const setLength = (next: Length) => {
    setValue(`${run}.callsPerReplication`, next === "calls" ? 100_000 : undefined, opts);
    setValue(`${run}.horizon`, next === "horizon" ? 5_000 : undefined, opts);
  };
  const setWarmup = (next: Warmup) => {
    setValue(`${run}.warmupCalls`, next === "calls" ? 10_000 : undefined, opts);
    setValue(`${run}.warmupTime`, next === "time" ? 100 : undefined, opts);
    setValue(`${run}.warmup`, next === "auto" ? "auto" : undefined, opts);
  };
  return (
    <div className="flex flex-col gap-4">
      <div className="grid gap-3 sm:grid-cols-3">
        <NumberField name={`${run}.replications`} label="Replications" step="1" hint="Independent repetitions; the interval comes from their spread (at least 2)." />
        <NumberField name={`${run}.seed`} label="Seed" step="1" hint="The same seed gives the same numbers, on any number of workers." />
        <NumberField name={`${run}.confidence`} label="Confidence level" hint="For example 0.95 for 95 % intervals." />
      </div>
      <div className="grid gap-3 sm:grid-cols-2">
        <Field label="Length of a replication">
          <Select value={length} onChange={(e) => setLength(e.target.value as Length)}>
            <option value="calls">A number of calls</option>
            <option value="horizon">A span of simulated time</option>
          </Select>
        </Field>
        {length === "calls" ? (
          <NumberField key="calls" name={`${run}.callsPerReplication`} label="Calls per replication" step="1" hint="Fresh calls measured in each replication, after the warm-up." />
        ) : (
          <NumberField key="horizon" name={`${run}.horizon`} label="Simulated time per replication" unit="time units" />
        )}
        <Field label="Warm-up" hint="What is discarded at the start of each replication so the empty start does not bias the figures.">
          <Select value={warmup} onChange={(e) => setWarmup(e.target.value as Warmup)}>
            <option value="none">None</option>
            <option value="calls">A number of calls</option>
            <option value="time">A span of time</option>
            <option value="auto">Chosen from the data (MSER-5)</option>
          </Select>
        </Field>
        {warmup === "calls" && <NumberField key="wc" name={`${run}.warmupCalls`} label="Warm-up calls" step="1" />}
        {warmup === "time" && <NumberField key="wt" name={`${run}.warmupTime`} label="Warm-up time" unit="time units" />}
      </div>
      <OptionalBlock
        label="Stop at a target precision"
        hint="Add replications until the call congestion's interval is narrow enough, within a call budget."
        checked={values.precision !== undefined}
        onChange={(on) => setValue(`${run}.precision`, on ? { relativeHalfWidth: 0.05, maxCalls: 20_000_000 } : undefined, opts)}
      >
        <div className="grid gap-3 sm:grid-cols-2">
          <NumberField name={`${run}.precision.relativeHalfWidth`} label="Relative half-width" hint="0.05 = the interval is ±5 % of the estimate." />
          <NumberField name={`${run}.precision.maxCalls`} label="Call budget" unit="calls" step="1" />
        </div>
        <RunLengthEstimate scenario={scenario} relativeHalfWidth={values.precision?.relativeHalfWidth} />
      </OptionalBlock>
      <NumberField
        name={`${run}.chunkReplications`}
        label="Replications per chunk"
        required={false}
        step="1"
        hint="Optional. Background work is split into chunks of this many replications; empty chooses about a million calls a chunk."
      />
    </div>
  );
}
