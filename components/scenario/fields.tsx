"use client";

// Form controls of the scenario editor: every control is a labelled Field whose error is the schema's message
// for that exact path, in the API's wording.
import { Controller, get, useFormContext, useWatch } from "react-hook-form";
import { Field, Input, Select } from "@/components/ui";
import {
  batchSizeSpecs,
  formatNumberList,
  lawForm,
  lawOrder,
  lawSpecs,
  numberOrUndefined,
  parseNumberList,
  safeLawMean,
  type ParamSpec,
  type ScenarioFormValues,
} from "@/lib/client/scenario-form";
import type { BatchSizeLaw, Law } from "@/lib/simulation";

/** The message at `path` or anywhere below it (list entries report at `path.3`). */
export function useFieldError(path: string): string | undefined {
  const { formState } = useFormContext<ScenarioFormValues>();
  const stack: unknown[] = [get(formState.errors, path)];
  while (stack.length) {
    const node = stack.shift() as Record<string, unknown> | undefined;
    if (!node || typeof node !== "object") continue;
    if (typeof node.message === "string") return node.message;
    for (const [key, inner] of Object.entries(node)) if (key !== "ref" && key !== "type") stack.push(inner);
  }
  return undefined;
}

/** The message on `path` itself (not on its entries): list-level and cross-field rules. */
export function useOwnError(path: string): string | undefined {
  const { formState } = useFormContext<ScenarioFormValues>();
  const at = get(formState.errors, path) as { message?: unknown; root?: { message?: unknown } } | undefined;
  const message = at?.message ?? at?.root?.message;
  return typeof message === "string" ? message : undefined;
}

const unitSuffix = (unit?: string) => (unit ? <span className="font-normal text-basin-600"> ({unit})</span> : null);

export function NumberField({ name, label, unit, hint, required = true, step = "any", className }: { name: string; label: string; unit?: string; hint?: string; required?: boolean; step?: string; className?: string }) {
  const { register } = useFormContext();
  const error = useFieldError(name);
  return (
    <Field label={<>{label}{unitSuffix(unit)}</>} hint={hint} error={error} required={required} className={className}>
      <Input type="number" inputMode="decimal" step={step} {...register(name, { setValueAs: numberOrUndefined })} />
    </Field>
  );
}

export function NumberListField({ name, label, unit, hint }: { name: string; label: string; unit?: string; hint?: string }) {
  const { control } = useFormContext();
  const error = useFieldError(name);
  return (
    <Controller
      control={control}
      name={name}
      render={({ field }) => (
        <Field label={<>{label}{unitSuffix(unit)}</>} hint={hint} error={error} required>
          <ListInput value={field.value} onChange={field.onChange} onBlur={field.onBlur} name={field.name} />
        </Field>
      )}
    />
  );
}

/** Keeps the text the user typed while the numbers behind it follow. */
function ListInput({ value, onChange, onBlur, name, ...aria }: { value: unknown; onChange: (v: number[]) => void; onBlur: () => void; name: string }) {
  return <Input {...aria} name={name} defaultValue={formatNumberList(value)} onChange={(e) => onChange(parseNumberList(e.target.value))} onBlur={onBlur} />;
}

function paramField(prefix: string, p: ParamSpec) {
  const name = `${prefix}.${p.key}`;
  if (p.kind.startsWith("list-")) return <NumberListField key={name} name={name} label={p.label} unit={p.unit} hint={p.help} />;
  return <NumberField key={name} name={name} label={p.label} unit={p.unit} hint={p.help} step={p.kind === "count" ? "1" : "any"} />;
}

/** A law for holding times, interarrival times, retry delays or patience: choose the law, then its parameters. */
export function LawFields({ prefix, legend, help }: { prefix: string; legend: string; help?: string }) {
  const { setValue, getValues } = useFormContext();
  const law = useWatch({ name: prefix }) as (Law & Record<string, unknown>) | undefined;
  const ownError = useOwnError(prefix);
  if (!law) return null;
  const spec = lawSpecs[law.law];
  const form = lawForm(law);
  const selectId = `${prefix.replace(/\W/g, "-")}-law`;
  const change = (next: Law) => setValue(prefix, next, { shouldValidate: true, shouldDirty: true });
  return (
    <fieldset className="flex flex-col gap-3 rounded-md border border-basin-200 p-3">
      <legend className="px-1 text-sm font-semibold text-basin-900">{legend}</legend>
      {help && <p className="text-xs text-basin-600">{help}</p>}
      <div className="grid gap-3 sm:grid-cols-2">
        <Field label="Law" hint={spec.help} id={selectId}>
          <Select value={law.law} onChange={(e) => change(lawSpecs[e.target.value as Law["law"]].forms[0].make(safeLawMean(getValues(prefix), 1)))}>
            {lawOrder.map((l) => (
              <option key={l} value={l}>
                {lawSpecs[l].label}
              </option>
            ))}
          </Select>
        </Field>
        {spec.forms.length > 1 && (
          <Field label="Given as">
            <Select value={form.id} onChange={(e) => change(spec.forms.find((f) => f.id === e.target.value)!.make(safeLawMean(getValues(prefix), 1)))}>
              {spec.forms.map((f) => (
                <option key={f.id} value={f.id}>
                  {f.label}
                </option>
              ))}
            </Select>
          </Field>
        )}
        {form.params.map((p) => paramField(prefix, p))}
      </div>
      {ownError && (
        <p role="alert" className="text-sm text-red-700">
          {ownError}
        </p>
      )}
    </fieldset>
  );
}

export function BatchSizeFields({ prefix }: { prefix: string }) {
  const { setValue } = useFormContext();
  const size = useWatch({ name: prefix }) as BatchSizeLaw | undefined;
  if (!size) return null;
  const spec = batchSizeSpecs[size.law];
  return (
    <fieldset className="flex flex-col gap-3 rounded-md border border-basin-200 p-3">
      <legend className="px-1 text-sm font-semibold text-basin-900">Batch size</legend>
      <div className="grid gap-3 sm:grid-cols-2">
        <Field label="Law of the batch size">
          <Select value={size.law} onChange={(e) => setValue(prefix, batchSizeSpecs[e.target.value as BatchSizeLaw["law"]].make(), { shouldValidate: true, shouldDirty: true })}>
            {Object.entries(batchSizeSpecs).map(([key, s]) => (
              <option key={key} value={key}>
                {s.label}
              </option>
            ))}
          </Select>
        </Field>
        {spec.params.map((p) => paramField(prefix, p))}
      </div>
    </fieldset>
  );
}

/** An on/off switch for an optional block (retrials, patience, precision stop). */
export function OptionalBlock({ label, hint, checked, onChange, children }: { label: string; hint: string; checked: boolean; onChange: (on: boolean) => void; children: React.ReactNode }) {
  return (
    <div className="flex flex-col gap-3">
      <label className="flex items-start gap-2 text-sm">
        <input type="checkbox" className="mt-1 h-4 w-4 accent-basin-700" checked={checked} onChange={(e) => onChange(e.target.checked)} />
        <span>
          <span className="font-medium text-basin-900">{label}</span>
          <span className="block text-xs text-basin-600">{hint}</span>
        </span>
      </label>
      {checked && <div className="pl-6">{children}</div>}
    </div>
  );
}
