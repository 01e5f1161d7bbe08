"use client";

import { useFormContext, useWatch } from "react-hook-form";
import { Field, Select } from "@/components/ui";
import type { ScenarioFormValues } from "@/lib/client/scenario-form";
import { NumberField, OptionalBlock } from "./fields";

const run = "scenario.run";

type Length = "calls" | "horizon";
type Warmup = "none" | "calls" | "time" | "auto";

export function RunFields() {
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
