"use client";

import { zodResolver } from "@hookform/resolvers/zod";
import { useRouter } from "next/navigation";
import { useMemo, useRef, useState } from "react";
import { FormProvider, useForm, useWatch, type Path } from "react-hook-form";
import { Button, Card, CardBody, CardHeader, CardTitle, Field, FormError, Input, Textarea, toast } from "@/components/ui";
import { ApiError, errorMessage } from "@/lib/client/api";
import { useSubmitRun } from "@/lib/client/queries/runs";
import { useSaveScenario } from "@/lib/client/queries/scenarios";
import {
  apiFieldsToForm,
  defaultScenario,
  readScenarioFile,
  scenarioFormSchema,
  scenarioParseOptions,
  type ScenarioFormValues,
} from "@/lib/client/scenario-form";
import { scenarioSchema, type ScenarioInput } from "@/lib/simulation";
import { ArrivalFields } from "./arrival-fields";
import { LawFields, NumberField, OptionalBlock } from "./fields";
import { ReferencesPanel } from "./references-panel";
import { RunFields } from "./run-fields";

export interface ScenarioEditorProps {
  workspace: string;
  scenarioId?: string;
  initial?: { name: string; description: string; scenario: ScenarioInput; revision?: number };
  canEdit: boolean;
  canRun: boolean;
}

function downloadJson(name: string, value: unknown) {
  const blob = new Blob([JSON.stringify(value, null, 2) + "\n"], { type: "application/json" });
  const url = URL.createObjectURL(blob);
  const a = document.createElement("a");
  a.href = url;
  a.download = `${name.replace(/[^\w.-]+/g, "-").toLowerCase() || "scenario"}.json`;
  a.click();
  URL.revokeObjectURL(url);
}

/** Drops keys whose value is undefined, as JSON would. */
const asJson = <T,>(v: T): T => JSON.parse(JSON.stringify(v)) as T;

export function ScenarioEditor(props: ScenarioEditorProps) {
  const [generation, setGeneration] = useState(0);
  const [initial, setInitial] = useState(props.initial);
  // A new generation remounts the form (import), so every control starts from the imported values.
  return (
    <EditorForm
      key={generation}
      {...props}
      initial={initial}
      onImport={(scenario) => {
        setInitial((old) => ({ name: old?.name ?? "", description: old?.description ?? "", revision: old?.revision, scenario }));
        setGeneration((g) => g + 1);
      }}
    />
  );
}

function EditorForm({ workspace, scenarioId, initial, canEdit, canRun, onImport }: ScenarioEditorProps & { onImport: (s: ScenarioInput) => void }) {
  const router = useRouter();
  const form = useForm<ScenarioFormValues>({
    resolver: zodResolver(scenarioFormSchema, scenarioParseOptions),
    mode: "onChange",
    defaultValues: { name: initial?.name ?? "", description: initial?.description ?? "", note: "", scenario: initial?.scenario ?? defaultScenario },
  });
  const save = useSaveScenario(workspace);
  const submitRun = useSubmitRun(workspace);
  const [formError, setFormError] = useState<string | null>(null);
  const [importError, setImportError] = useState<string | null>(null);
  const fileInput = useRef<HTMLInputElement>(null);
  const scenario = useWatch({ control: form.control, name: "scenario" });
  const valid = useMemo(() => {
    const parsed = scenarioSchema.safeParse(asJson(scenario ?? {}));
    return parsed.success ? asJson(scenario) : null;
  }, [scenario]);

  const showApiError = (error: unknown) => {
    if (error instanceof ApiError) for (const [field, message] of Object.entries(apiFieldsToForm(error.fields))) form.setError(field as Path<ScenarioFormValues>, { message });
    setFormError(errorMessage(error));
  };

  const persist = async (values: ScenarioFormValues) => {
    setFormError(null);
    const saved = await save.mutateAsync({ id: scenarioId, name: values.name, description: values.description, note: values.note, scenario: asJson(values.scenario) });
    return saved;
  };

  const onSave = form.handleSubmit(async (values) => {
    try {
      const saved = await persist(values);
      toast.success(`Saved as revision ${saved.latestRevision}.`);
      form.reset({ ...values, note: "" });
      if (!scenarioId) router.replace(`/w/${workspace}/scenarios/${saved.id}`);
    } catch (error) {
      showApiError(error);
    }
  });

  const onRun = form.handleSubmit(async (values) => {
    try {
      const saved = form.formState.isDirty || !scenarioId ? await persist(values) : null;
      const accepted = await submitRun.mutateAsync({ scenarioId: saved?.id ?? scenarioId!, revision: saved?.latestRevision });
      router.push(`/w/${workspace}/runs/${accepted.id}`);
    } catch (error) {
      showApiError(error);
    }
  });

  const onImportFile = async (file: File | undefined) => {
    if (!file) return;
    setImportError(null);
    const read = readScenarioFile(await file.text());
    if (read.ok) {
      onImport(read.scenario);
      toast.success(`Imported ${file.name}.`);
    } else setImportError(`${file.name}: ${read.message}`);
    if (fileInput.current) fileInput.current.value = "";
  };

  const retrials = useWatch({ control: form.control, name: "scenario.retrials" });
  const patience = useWatch({ control: form.control, name: "scenario.patience" });
  const waiting = useWatch({ control: form.control, name: "scenario.waitingPositions" });
  const servers = useWatch({ control: form.control, name: "scenario.servers" });
  const opts = { shouldValidate: true, shouldDirty: true } as const;
  const pending = save.isPending || submitRun.isPending;

  return (
    <FormProvider {...form}>
      <form onSubmit={onSave} noValidate className="grid gap-6 lg:grid-cols-[minmax(0,1fr)_22rem]" aria-label="Scenario">
        <fieldset disabled={!canEdit} className="flex min-w-0 flex-col gap-6">
          <Card>
            <CardHeader>
              <CardTitle as="h2">Name</CardTitle>
            </CardHeader>
            <CardBody className="grid gap-3 sm:grid-cols-2">
              <Field label="Scenario name" error={form.formState.errors.name?.message} required>
                <Input {...form.register("name")} placeholder="e.g. Harbour exchange overflow route" />
              </Field>
              <Field label="Note for this revision" hint="What changed and why; shown in the revision history." error={form.formState.errors.note?.message}>
                <Input {...form.register("note")} />
              </Field>
              <Field label="Description" className="sm:col-span-2" error={form.formState.errors.description?.message}>
                <Textarea rows={2} {...form.register("description")} />
              </Field>
            </CardBody>
          </Card>

          <Card>
            <CardHeader>
              <CardTitle as="h2">Group under study</CardTitle>
            </CardHeader>
            <CardBody className="flex flex-col gap-4">
              <div className="grid gap-3 sm:grid-cols-2">
                <NumberField name="scenario.servers" label="Servers" unit="circuits" step="1" hint="Circuits, trunks, channels, beds or licences that each carry one call." />
                <NumberField name="scenario.waitingPositions" label="Waiting positions" step="1" hint="0 for a pure loss system; otherwise calls wait in order of arrival." />
              </div>
              {Number(waiting) > 0 && (
                <OptionalBlock
                  label="Callers give up while waiting"
                  hint="A waiting call abandons when its patience runs out."
                  checked={patience !== undefined}
                  onChange={(on) => form.setValue("scenario.patience", on ? { law: "exponential", mean: 1 } : undefined, opts)}
                >
                  <LawFields prefix="scenario.patience" legend="Patience" />
                </OptionalBlock>
              )}
            </CardBody>
          </Card>

          <Card>
            <CardHeader>
              <CardTitle as="h2">Arrivals</CardTitle>
            </CardHeader>
            <CardBody>
              <ArrivalFields />
            </CardBody>
          </Card>

          <Card>
            <CardHeader>
              <CardTitle as="h2">Holding times</CardTitle>
            </CardHeader>
            <CardBody>
              <LawFields prefix="scenario.holding" legend="Holding time" help="How long a call holds its circuit. Rates and times share one time unit of your choice." />
            </CardBody>
          </Card>

          <Card>
            <CardHeader>
              <CardTitle as="h2">Repeated attempts</CardTitle>
            </CardHeader>
            <CardBody>
              <OptionalBlock
                label="Refused callers try again"
                hint="A refused attempt is repeated with the given probability after a delay, up to a limit of attempts."
                checked={retrials !== undefined}
                onChange={(on) => form.setValue("scenario.retrials", on ? { persistence: 0.7, delay: { law: "exponential", mean: 0.5 }, maxAttempts: 10 } : undefined, opts)}
              >
                <div className="flex flex-col gap-3">
                  <div className="grid gap-3 sm:grid-cols-2">
                    <NumberField name="scenario.retrials.persistence" label="Persistence" hint="Probability that a refused caller tries again (0 to 1)." />
                    <NumberField name="scenario.retrials.maxAttempts" label="Most attempts per call" step="1" required={false} hint="First attempt included; empty for no limit." />
                  </div>
                  <LawFields prefix="scenario.retrials.delay" legend="Delay before trying again" />
                </div>
              </OptionalBlock>
            </CardBody>
          </Card>

          <Card>
            <CardHeader>
              <CardTitle as="h2">Run settings</CardTitle>
            </CardHeader>
            <CardBody>
              <RunFields scenario={valid} />
            </CardBody>
          </Card>
        </fieldset>

        <div className="flex flex-col gap-4">
          <Card>
            <CardBody className="flex flex-col gap-3">
              {formError && <FormError title="Not saved">{formError}</FormError>}
              {importError && <FormError title="Not imported">{importError}</FormError>}
              {canEdit && (
                <div className="flex flex-wrap gap-2">
                  <Button type="submit" pending={save.isPending && !submitRun.isPending} disabled={pending}>
                    {scenarioId ? "Save a new revision" : "Save scenario"}
                  </Button>
                  {canRun && (
                    <Button variant="secondary" onClick={onRun} pending={submitRun.isPending} disabled={pending}>
                      {form.formState.isDirty || !scenarioId ? "Save and run" : "Run"}
                    </Button>
                  )}
                </div>
              )}
              <div className="flex flex-wrap gap-2">
                <Button variant="ghost" size="sm" onClick={() => downloadJson(form.getValues("name") || "scenario", asJson(form.getValues("scenario")))}>
                  Export JSON
                </Button>
                {canEdit && (
                  <>
                    <Button variant="ghost" size="sm" onClick={() => fileInput.current?.click()}>
                      Import JSON
                    </Button>
                    <input ref={fileInput} type="file" accept="application/json,.json" className="sr-only" aria-label="Scenario file to import" tabIndex={-1} onChange={(e) => onImportFile(e.target.files?.[0])} />
                  </>
                )}
              </div>
              {canEdit && initial?.revision && <p className="text-xs text-basin-600">Editing revision {initial.revision}; saving makes revision {initial.revision + 1}.</p>}
            </CardBody>
          </Card>
          <ReferencesPanel workspace={workspace} scenario={valid} servers={typeof servers === "number" ? servers : undefined} />
        </div>
      </form>
    </FormProvider>
  );
}
