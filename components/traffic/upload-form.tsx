"use client";

// Upload in two steps: choose a file (its header and first rows are read in the browser, nothing is sent), then map
// its columns and send it. The server checks the whole file again and answers with the line of any problem.
import { useState } from "react";
import { useRouter } from "next/navigation";
import { Button, Callout, Card, CardBody, CardHeader, CardTitle, Field, FormError, Input, Select, Table, TBody, TD, TH, THead, TR } from "@/components/ui";
import { errorMessage } from "@/lib/client/api";
import { useCreateUpload } from "@/lib/client/queries/uploads";
import { formatBytes, MAX_FILE_BYTES, previewCsv, TIMESTAMP_FORMAT, type ColumnMappingInput, type CsvPreview } from "@/lib/measurement";

/** The file as chunks, read only as far as the preview needs. */
async function* fileChunks(file: File): AsyncGenerator<Uint8Array> {
  const reader = file.stream().getReader();
  try {
    for (;;) {
      const { done, value } = await reader.read();
      if (done) return;
      yield value;
    }
  } finally {
    await reader.cancel().catch(() => {});
  }
}

const none = "";
/** public/demo/measured-call-records.csv as the browser fetches it. */
const DEMO_CSV_URL = "/demo/measured-call-records.csv";

export function UploadForm({ workspace }: { workspace: string }) {
  const router = useRouter();
  const create = useCreateUpload(workspace);
  const [file, setFile] = useState<File | null>(null);
  const [preview, setPreview] = useState<CsvPreview | null>(null);
  const [previewError, setPreviewError] = useState<string | null>(null);
  const [mapping, setMapping] = useState<Record<string, string | number | undefined>>({ kind: "call-records" });

  async function choose(chosen: File | null) {
    setFile(chosen);
    setPreview(null);
    setPreviewError(null);
    create.reset();
    if (!chosen) return;
    if (chosen.size > MAX_FILE_BYTES) {
      setPreviewError(`The file is ${formatBytes(chosen.size)}; the limit is ${formatBytes(MAX_FILE_BYTES)}.`);
      return;
    }
    try {
      const p = await previewCsv(fileChunks(chosen));
      setPreview(p);
      setMapping({ durationUnit: "seconds", timeZone: "Z", intervalMinutes: 15, ...(p.guess ?? { kind: "call-records" }) } as Record<string, string | number | undefined>);
    } catch (error) {
      setPreviewError(errorMessage(error));
    }
  }

  const set = (field: string, value: string | number | undefined) => setMapping((m) => ({ ...m, [field]: value === none ? undefined : value }));
  const kind = mapping.kind as "call-records" | "interval-counts";
  const columnSelect = (field: string, label: string, optional: boolean, hint?: string) => (
    <Field label={label} hint={hint} required={!optional} error={create.error instanceof Error ? (create.error as { fields?: Record<string, string> }).fields?.[field] : undefined}>
      <Select value={(mapping[field] as string | undefined) ?? none} onChange={(e) => set(field, e.target.value)} data-testid={`map-${field}`}>
        <option value={none}>{optional ? "— none —" : "— choose a column —"}</option>
        {preview?.header.map((h) => (
          <option key={h} value={h}>
            {h}
          </option>
        ))}
      </Select>
    </Field>
  );

  function send() {
    if (!file) return;
    const m = Object.fromEntries(Object.entries(mapping).filter(([, v]) => v !== undefined && v !== "")) as Record<string, unknown>;
    const fields = kind === "call-records" ? ["kind", "start", "duration", "durationUnit", "outcome", "group", "timeZone"] : ["kind", "intervalStart", "attempts", "carried", "intervalMinutes", "meanHoldingSeconds", "timeZone"];
    const body = Object.fromEntries(fields.filter((f) => m[f] !== undefined).map((f) => [f, m[f]])) as ColumnMappingInput;
    create.mutate({ file, mapping: body }, { onSuccess: (upload) => router.push(`/w/${workspace}/traffic/${upload.id}`) });
  }

  return (
    <div className="flex flex-col gap-6">
      <Card>
        <CardHeader>
          <CardTitle>1. Choose a file</CardTitle>
        </CardHeader>
        <CardBody className="flex flex-col gap-3 text-sm">
          <p>
            A CSV with a header line, UTF-8: either <strong>call records</strong> (start timestamp, holding time, optionally the outcome — answered, blocked or abandoned — and the route or group) or{" "}
            <strong>interval counts</strong> (interval start, attempts, optionally carried calls). Timestamps are written <code>{TIMESTAMP_FORMAT}</code>, sorted by time. Largest file:{" "}
            <strong>{formatBytes(MAX_FILE_BYTES)}</strong>.
          </p>
          <p>
            No file at hand? <a className="font-medium text-basin-700 underline" href={DEMO_CSV_URL} download data-testid="demo-download">Download the demo call records</a> (ten invented days on two routes) and upload them here.
          </p>
          <Field label="CSV file">
            <Input type="file" accept=".csv,text/csv,text/plain" onChange={(e) => void choose(e.target.files?.[0] ?? null)} data-testid="upload-file" />
          </Field>
          {previewError && <FormError title="This file cannot be read">{previewError}</FormError>}
        </CardBody>
      </Card>

      {preview && (
        <Card>
          <CardHeader>
            <CardTitle>2. Map the columns</CardTitle>
          </CardHeader>
          <CardBody className="flex flex-col gap-4">
            <div className="overflow-x-auto">
              <Table>
                <THead>
                  <TR>
                    <TH>line</TH>
                    {preview.header.map((h) => (
                      <TH key={h}>{h}</TH>
                    ))}
                  </TR>
                </THead>
                <TBody>
                  {preview.rows.map((r, i) => (
                    <TR key={preview.lines[i]}>
                      <TD>{preview.lines[i]}</TD>
                      {r.map((cell, j) => (
                        <TD key={j}>{cell}</TD>
                      ))}
                    </TR>
                  ))}
                </TBody>
              </Table>
            </div>
            {!preview.guess && <Callout tone="warning">The column names did not suggest a mapping; choose each column below.</Callout>}
            <div className="grid gap-4 sm:grid-cols-2">
              <Field label="What the file holds">
                <Select value={kind} onChange={(e) => set("kind", e.target.value)} data-testid="map-kind">
                  <option value="call-records">call records (one line per call attempt)</option>
                  <option value="interval-counts">interval counts (one line per interval)</option>
                </Select>
              </Field>
              <Field label="UTC offset of timestamps written without one" hint={'"Z" or e.g. "+01:00"'}>
                <Input value={(mapping.timeZone as string) ?? "Z"} onChange={(e) => set("timeZone", e.target.value)} />
              </Field>
              {kind === "call-records" ? (
                <>
                  {columnSelect("start", "Start timestamp", false)}
                  {columnSelect("duration", "Holding time", false)}
                  <Field label="Holding time unit">
                    <Select value={(mapping.durationUnit as string) ?? "seconds"} onChange={(e) => set("durationUnit", e.target.value)} data-testid="map-durationUnit">
                      <option value="seconds">seconds</option>
                      <option value="minutes">minutes</option>
                      <option value="milliseconds">milliseconds</option>
                    </Select>
                  </Field>
                  {columnSelect("outcome", "Outcome (answered / blocked / abandoned)", true)}
                  {columnSelect("group", "Route or group", true)}
                </>
              ) : (
                <>
                  {columnSelect("intervalStart", "Interval start", false)}
                  {columnSelect("attempts", "Attempts", false)}
                  {columnSelect("carried", "Carried calls", true)}
                  <Field label="Interval length (minutes)">
                    <Select value={String(mapping.intervalMinutes ?? 15)} onChange={(e) => set("intervalMinutes", Number(e.target.value))}>
                      {[5, 10, 15, 20, 30, 60].map((m) => (
                        <option key={m} value={m}>
                          {m}
                        </option>
                      ))}
                    </Select>
                  </Field>
                  <Field label="Mean holding time (seconds)" hint="needed to turn attempts into offered traffic and to make a scenario">
                    <Input type="number" min={0} step="any" value={(mapping.meanHoldingSeconds as number | undefined) ?? ""} onChange={(e) => set("meanHoldingSeconds", e.target.value === "" ? undefined : Number(e.target.value))} />
                  </Field>
                </>
              )}
            </div>
            {create.isError && (
              <div data-testid="upload-error">
                <FormError title="The file was not stored">{errorMessage(create.error)}</FormError>
              </div>
            )}
            <div>
              <Button onClick={send} pending={create.isPending} data-testid="upload-submit">
                Upload and characterise
              </Button>
            </div>
          </CardBody>
        </Card>
      )}
    </div>
  );
}
