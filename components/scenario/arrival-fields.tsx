"use client";

import { useFieldArray, useFormContext, useWatch } from "react-hook-form";
import { Button, Field, Select } from "@/components/ui";
import { arrivalProcesses, processOrder, type ScenarioFormValues } from "@/lib/client/scenario-form";
import type { Arrivals } from "@/lib/simulation";
import { BatchSizeFields, LawFields, NumberField, useFieldError, useOwnError } from "./fields";

const base = "scenario.arrivals";

export function ArrivalFields() {
  const { setValue } = useFormContext<ScenarioFormValues>();
  const arrivals = useWatch<ScenarioFormValues, "scenario.arrivals">({ name: base });
  const process = arrivals?.process ?? "poisson";
  return (
    <div className="flex flex-col gap-4">
      <Field label="Arrival process" hint={arrivalProcesses[process].help}>
        <Select
          value={process}
          data-testid="arrival-process"
          onChange={(e) => setValue(base, arrivalProcesses[e.target.value as Arrivals["process"]].make(), { shouldValidate: true, shouldDirty: true })}
        >
          {processOrder.map((p) => (
            <option key={p} value={p}>
              {arrivalProcesses[p].label}
            </option>
          ))}
        </Select>
      </Field>
      <ProcessParameters key={process} process={process} />
    </div>
  );
}

function ProcessParameters({ process }: { process: Arrivals["process"] }) {
  switch (process) {
    case "poisson":
      return (
        <div className="grid gap-3 sm:grid-cols-2">
          <NumberField name={`${base}.rate`} label="Call rate" unit="calls per time unit" hint="Offered traffic in erlangs = call rate × mean holding time." />
        </div>
      );
    case "on-off":
      return (
        <div className="grid gap-3 sm:grid-cols-3">
          <NumberField name={`${base}.onRate`} label="Rate during a burst" unit="calls per time unit" />
          <NumberField name={`${base}.meanOn`} label="Mean burst length" unit="time units" />
          <NumberField name={`${base}.meanOff`} label="Mean silence" unit="time units" hint="Mean rate = burst rate × on / (on + off)." />
        </div>
      );
    case "mmpp":
      return <MmppFields />;
    case "renewal":
      return <LawFields prefix={`${base}.interarrival`} legend="Time between calls" help="Its mean sets the call rate (1 / mean)." />;
    case "batch":
      return (
        <div className="flex flex-col gap-3">
          <div className="grid gap-3 sm:grid-cols-2">
            <NumberField name={`${base}.rate`} label="Batch rate" unit="batches per time unit" />
            <AdmissionField />
          </div>
          <BatchSizeFields prefix={`${base}.batchSize`} />
        </div>
      );
    case "overflow":
      return <PrimaryFields />;
    case "finite-source":
      return (
        <div className="grid gap-3 sm:grid-cols-2">
          <NumberField name={`${base}.sources`} label="Sources" unit="count" step="1" hint="The population that can call." />
          <NumberField name={`${base}.idleRate`} label="Call rate of an idle source" unit="calls per time unit" />
        </div>
      );
    case "time-varying":
      return <ProfileFields />;
  }
}

function AdmissionField() {
  const { register } = useFormContext();
  return (
    <Field label="When a batch does not fit" hint="Partial: as many calls as fit are carried. All or nothing: the whole batch is refused.">
      <Select {...register(`${base}.admission`)}>
        <option value="partial">Carry what fits</option>
        <option value="all-or-nothing">Refuse the whole batch</option>
      </Select>
    </Field>
  );
}

function MmppFields() {
  const { setValue, getValues } = useFormContext();
  const rates = (useWatch({ name: `${base}.rates` }) as number[] | undefined) ?? [];
  const k = rates.length;
  const switchingError = useFieldError(`${base}.switching`);
  const ratesError = useOwnError(`${base}.rates`);
  const resize = (next: number) => {
    const old = getValues(base) as { rates: number[]; switching: number[][] };
    const r = Array.from({ length: next }, (_, i) => old.rates[i] ?? old.rates[old.rates.length - 1] ?? 1);
    const q = Array.from({ length: next }, (_, i) => Array.from({ length: next }, (_, j) => (i === j ? 0 : (old.switching[i]?.[j] ?? 0.5))));
    setValue(base, { process: "mmpp", rates: r, switching: q }, { shouldValidate: true, shouldDirty: true });
  };
  return (
    <div className="flex flex-col gap-3">
      <Field label="Phases" hint="2 to 16 phases; each has its own call rate.">
        <Select value={String(k)} onChange={(e) => resize(Number(e.target.value))}>
          {Array.from({ length: 15 }, (_, i) => i + 2).map((n) => (
            <option key={n} value={n}>
              {n}
            </option>
          ))}
        </Select>
      </Field>
      <div className="grid gap-3 sm:grid-cols-4">
        {rates.map((_, i) => (
          <NumberField key={i} name={`${base}.rates.${i}`} label={`Rate in phase ${i + 1}`} unit="calls per time unit" />
        ))}
      </div>
      {ratesError && <p role="alert" className="text-sm text-red-700">{ratesError}</p>}
      <fieldset className="rounded-md border border-basin-200 p-3">
        <legend className="px-1 text-sm font-semibold text-basin-900">Phase changes (per time unit)</legend>
        <p className="mb-2 text-xs text-basin-600">Row: the phase left; column: the phase entered. The diagonal is not used.</p>
        <div className="overflow-x-auto">
          <table className="text-sm">
            <thead>
              <tr>
                <th scope="col" className="px-1 text-left font-medium text-basin-700">
                  from \ to
                </th>
                {rates.map((_, j) => (
                  <th key={j} scope="col" className="px-1 font-medium text-basin-700">
                    {j + 1}
                  </th>
                ))}
              </tr>
            </thead>
            <tbody>
              {rates.map((_, i) => (
                <tr key={i}>
                  <th scope="row" className="px-1 text-left font-medium text-basin-700">
                    {i + 1}
                  </th>
                  {rates.map((__, j) => (
                    <td key={j} className="p-1">
                      <MatrixCell i={i} j={j} />
                    </td>
                  ))}
                </tr>
              ))}
            </tbody>
          </table>
        </div>
        {switchingError && (
          <p role="alert" className="mt-2 text-sm text-red-700">
            {switchingError}
          </p>
        )}
      </fieldset>
    </div>
  );
}

function MatrixCell({ i, j }: { i: number; j: number }) {
  const { register } = useFormContext();
  const name = `${base}.switching.${i}.${j}`;
  const invalid = !!useFieldError(name);
  return (
    <input
      type="number"
      step="any"
      aria-label={`Rate from phase ${i + 1} to phase ${j + 1}`}
      aria-invalid={invalid || undefined}
      disabled={i === j}
      className="w-20 rounded border border-basin-300 px-2 py-1 text-right tabular-nums disabled:bg-basin-100 aria-[invalid=true]:border-red-600"
      {...register(name, { setValueAs: (v) => (v === "" ? undefined : Number(v)) })}
    />
  );
}

function PrimaryFields() {
  const { control } = useFormContext();
  const { fields, append, remove } = useFieldArray({ control, name: `${base}.primaries` });
  const listError = useOwnError(`${base}.primaries`);
  return (
    <fieldset className="flex flex-col gap-3 rounded-md border border-basin-200 p-3">
      <legend className="px-1 text-sm font-semibold text-basin-900">Primary groups</legend>
      <p className="text-xs text-basin-600">Each primary group is offered Poisson traffic with this scenario&apos;s holding law; its refused calls overflow here.</p>
      {fields.map((f, i) => (
        <div key={f.id} className="grid items-end gap-3 sm:grid-cols-[1fr_1fr_auto]">
          <NumberField name={`${base}.primaries.${i}.traffic`} label={`Group ${i + 1}: offered traffic`} unit="E" />
          <NumberField name={`${base}.primaries.${i}.servers`} label={`Group ${i + 1}: circuits`} step="1" />
          <Button variant="ghost" size="sm" onClick={() => remove(i)} disabled={fields.length <= 1} aria-label={`Remove primary group ${i + 1}`}>
            Remove
          </Button>
        </div>
      ))}
      <div>
        <Button variant="secondary" size="sm" onClick={() => append({ traffic: 10, servers: 10 })} disabled={fields.length >= 32}>
          Add a primary group
        </Button>
      </div>
      {listError && <p role="alert" className="text-sm text-red-700">{listError}</p>}
    </fieldset>
  );
}

function ProfileFields() {
  const { control } = useFormContext();
  const { fields, append, remove } = useFieldArray({ control, name: `${base}.profile` });
  const listError = useOwnError(`${base}.profile`);
  return (
    <fieldset className="flex flex-col gap-3 rounded-md border border-basin-200 p-3">
      <legend className="px-1 text-sm font-semibold text-basin-900">Rate profile (repeats)</legend>
      {fields.map((f, i) => (
        <div key={f.id} className="grid items-end gap-3 sm:grid-cols-[1fr_1fr_auto]">
          <NumberField name={`${base}.profile.${i}.duration`} label={`Period ${i + 1}: length`} unit="time units" />
          <NumberField name={`${base}.profile.${i}.rate`} label={`Period ${i + 1}: call rate`} unit="calls per time unit" />
          <Button variant="ghost" size="sm" onClick={() => remove(i)} disabled={fields.length <= 1} aria-label={`Remove period ${i + 1}`}>
            Remove
          </Button>
        </div>
      ))}
      <div>
        <Button variant="secondary" size="sm" onClick={() => append({ duration: 1, rate: 24 })}>
          Add a period
        </Button>
      </div>
      {listError && <p role="alert" className="text-sm text-red-700">{listError}</p>}
    </fieldset>
  );
}
