"use client";

// One upload: its progress while the worker characterises it, then what was measured (busy hour, peakedness,
// holding-time fits) with the four charts, and "Make scenario" from the busy hour or the whole day.
import { useState } from "react";
import Link from "next/link";
import type { Data, Layout } from "plotly.js";
import { chartColours, Plot } from "@/components/charts/plot";
import { QueryView } from "@/components/lab/states";
import { ProgressBar } from "@/components/runs/status";
import { Badge, Button, Callout, Card, CardBody, CardHeader, CardTitle, Field, FormError, LinkButton, Select, Stat, StatGroup, Table, TBody, TD, TH, THead, TR } from "@/components/ui";
import { errorMessage } from "@/lib/client/api";
import { formatDateTime, formatNumber } from "@/lib/client/format";
import { useMakeUploadScenario, useUpload } from "@/lib/client/queries/uploads";
import { FAMILY_NAMES, formatBytes, type Characterisation } from "@/lib/measurement";
import type { UploadDetail, UploadStatus } from "@/lib/measurement/uploads";

const statusTone: Record<UploadStatus, "neutral" | "info" | "success" | "danger"> = { stored: "neutral", characterising: "info", ready: "success", failed: "danger" };

export function UploadStatusBadge({ status }: { status: UploadStatus }) {
  return (
    <Badge tone={statusTone[status]} data-testid="upload-status">
      {status}
    </Badge>
  );
}

const MINUTE = 60_000;
const clock = (minute: number) => `${String(Math.floor(minute / 60) % 24).padStart(2, "0")}:${String(minute % 60).padStart(2, "0")}`;
/** Local wall-clock time as Plotly reads it (no zone: the file's own clock). */
const local = (instant: number, offsetMinutes: number) => new Date(instant + offsetMinutes * MINUTE).toISOString().slice(0, 19).replace("T", " ");

function TrafficOverTime({ c }: { c: Characterisation }) {
  const x = c.series.start.map((t) => local(t, c.period.offsetMinutes));
  const perHour = 60 / c.intervalMinutes;
  const data: Data[] = [
    { type: "bar", name: "arrivals per hour", x, y: c.series.arrivals.map((a) => a * perHour), marker: { color: chartColours.band.replace("0.15", "0.45") } },
    ...(c.series.offeredTraffic
      ? [{ type: "scatter" as const, mode: "lines" as const, name: "offered traffic (erlangs)", x, y: c.series.offeredTraffic, yaxis: "y2", line: { color: chartColours.simulated, width: 1.5 } }]
      : []),
  ];
  const start = c.busyHour.startMinute;
  const shapes: Layout["shapes"] = c.busyHour.days.map((d) => ({
    type: "rect",
    xref: "x",
    yref: "paper",
    x0: `${d.day} ${clock(start)}:00`,
    x1: `${d.day} ${clock(start + 60)}:00`,
    y0: 0,
    y1: 1,
    fillcolor: "rgba(180, 83, 9, 0.18)",
    line: { width: 0 },
  }));
  return (
    <Plot
      testId="chart-traffic"
      title="Arrivals and offered traffic over time"
      summary={`${c.period.days} days in ${c.intervalMinutes}-minute intervals; the busy hour ${c.busyHour.label} is shaded on each day.`}
      data={data}
      xTitle="local time"
      yTitle="arrivals per hour"
      layout={{ shapes, barmode: "overlay", yaxis2: { title: { text: "erlangs" }, overlaying: "y", side: "right", rangemode: "tozero" } }}
      height={360}
    />
  );
}

function HoldingHistogram({ c }: { c: Characterisation }) {
  const h = c.holding!;
  const { edges, density } = h.charts.histogram;
  const centres = density.map((_, i) => (edges[i] + edges[i + 1]) / 2);
  const data: Data[] = [
    { type: "bar", name: "measured", x: centres, y: density, width: edges[1] - edges[0], marker: { color: "rgba(29, 79, 122, 0.35)" } },
    ...FAMILY_NAMES.filter((f) => h.charts.densities[f]).map((f, i) => ({
      type: "scatter" as const,
      mode: "lines" as const,
      name: f === h.fits[0].family ? `${f} (best)` : f,
      x: h.charts.densities.x,
      y: h.charts.densities[f]!,
      line: { color: chartColours.references[i], width: f === h.fits[0].family ? 2.5 : 1.2 },
    })),
  ];
  return (
    <Plot
      testId="chart-holding"
      title="Holding times with the fitted densities"
      summary={`Histogram of ${h.n} answered calls' holding times with the maximum-likelihood densities; the best fit by the Kolmogorov–Smirnov distance is ${h.fits[0].family}.`}
      data={data}
      xTitle="holding time (s)"
      yTitle="density per second"
    />
  );
}

function QQPlot({ c }: { c: Characterisation }) {
  const h = c.holding!;
  const best = h.fits[0].family;
  const qq = h.charts.qq[best];
  if (!qq) return null;
  const top = Math.max(...qq.sample, ...qq.fitted);
  const data: Data[] = [
    { type: "scatter", mode: "markers", name: "quantiles", x: qq.fitted, y: qq.sample, marker: { color: chartColours.simulated, size: 5 } },
    { type: "scatter", mode: "lines", name: "equal", x: [0, top], y: [0, top], line: { color: chartColours.target, dash: "dash", width: 1 } },
  ];
  return <Plot testId="chart-qq" title={`Q–Q plot of the ${best} fit`} summary={`Measured holding-time quantiles against the fitted ${best} law's; points on the dashed line mean a close fit.`} data={data} xTitle={`${best} quantile (s)`} yTitle="measured quantile (s)" />;
}

function SimultaneousCalls({ c }: { c: Characterisation }) {
  const data: Data[] = c.busy.simultaneous.map((d, i) => ({
    type: "scatter" as const,
    mode: "lines" as const,
    name: d.day,
    x: d.times.map((t) => t / 60),
    y: d.counts,
    line: { shape: "hv" as const, width: 1, color: i === 0 ? chartColours.simulated : undefined },
  }));
  return (
    <Plot
      testId="chart-simultaneous"
      title={`Calls in progress over the busy hour (${c.busyHour.label})`}
      summary={`Answered calls in progress through each day's busy hour; their time-weighted variance over mean is the measured peakedness ${c.busy.peakedness ? formatNumber(c.busy.peakedness.value, 3) : "(not measured)"}.`}
      data={data}
      xTitle="minutes into the busy hour"
      yTitle="calls in progress"
    />
  );
}

function FitsTable({ c }: { c: Characterisation }) {
  const h = c.holding!;
  const p = (v: number | null) => (v === null ? "—" : v < 0.005 ? "< 0.005" : formatNumber(v, 2));
  return (
    <div className="overflow-x-auto">
      <Table>
        <THead>
          <TR>
            <TH>rank</TH>
            <TH>law</TH>
            <TH>parameters (maximum likelihood)</TH>
            <TH>mean (s)</TH>
            <TH>cv</TH>
            <TH>KS D</TH>
            <TH>KS p</TH>
            <TH>AD A²</TH>
            <TH>AD p</TH>
            <TH>AIC</TH>
          </TR>
        </THead>
        <TBody>
          {h.fits.map((f, i) => (
            <TR key={f.family} data-testid={`fit-${f.family}`}>
              <TD>{i + 1}</TD>
              <TD>{f.family}</TD>
              <TD>
                {Object.entries(f.parameters)
                  .map(([k, v]) => `${k} = ${formatNumber(v, 4)}`)
                  .join(", ")}
              </TD>
              <TD>{formatNumber(f.mean, 4)}</TD>
              <TD>{formatNumber(f.cv, 3)}</TD>
              <TD>{formatNumber(f.ks, 3)}</TD>
              <TD>{p(f.ksPValue)}</TD>
              <TD>{formatNumber(f.ad, 3)}</TD>
              <TD>{p(f.adPValue)}</TD>
              <TD>{formatNumber(f.aic, 6)}</TD>
            </TR>
          ))}
        </TBody>
      </Table>
      <p className="mt-2 text-xs text-basin-700">
        {h.n} holding times{h.zeros ? ` (${h.zeros} of zero left out)` : ""}, ranked by the Kolmogorov–Smirnov distance. p-values: {h.pValueMethod}.
      </p>
    </div>
  );
}

function MakeScenario({ workspace, upload, canCreate }: { workspace: string; upload: UploadDetail; canCreate: boolean }) {
  const make = useMakeUploadScenario(workspace, upload.id);
  const [source, setSource] = useState<"busy-hour" | "daily-profile">("busy-hour");
  const [holding, setHolding] = useState("best");
  const c = upload.characterisation!;
  if (!canCreate) return <p className="text-sm text-basin-700">Engineers and admins can make a scenario from this measurement.</p>;
  const made = make.data;
  return (
    <div className="flex flex-col gap-4">
      <div className="grid gap-4 sm:grid-cols-2">
        <Field label="From">
          <Select value={source} onChange={(e) => setSource(e.target.value as typeof source)} data-testid="scenario-source">
            <option value="busy-hour">the busy hour ({c.busyHour.label})</option>
            <option value="daily-profile">the whole day, as a time-varying rate</option>
          </Select>
        </Field>
        {c.holding && (
          <Field label="Holding-time law">
            <Select value={holding} onChange={(e) => setHolding(e.target.value)}>
              <option value="best">best fit ({c.holding.fits[0].family})</option>
              <option value="empirical">empirical (the measured quantiles)</option>
              {FAMILY_NAMES.map((f) => (
                <option key={f} value={f}>
                  {f}
                </option>
              ))}
            </Select>
          </Field>
        )}
      </div>
      <div>
        <Button onClick={() => make.mutate({ source, holding: holding as never })} pending={make.isPending} data-testid="make-scenario">
          Make scenario
        </Button>
      </div>
      {make.isError && <FormError title="No scenario was made">{errorMessage(make.error)}</FormError>}
      {made && (
        <Callout tone="info" title={`Scenario “${made.name}” made`}>
          <ul className="list-disc pl-5 text-sm">
            <li>
              Offered traffic {formatNumber(made.made.offeredTraffic, 4)} erlangs; {made.made.servers.value} servers proposed ({made.made.servers.method}).
            </li>
            <li>
              Arrivals: {made.made.arrivals.model} — {made.made.arrivals.method}.
              {made.made.arrivals.measured.value !== null && (
                <>
                  {" "}
                  Measured {made.made.arrivals.measured.quantity} {formatNumber(made.made.arrivals.measured.value, 3)}, fitted stream {made.made.arrivals.fitted === null ? "—" : formatNumber(made.made.arrivals.fitted, 3)}.
                </>
              )}
            </li>
            <li>Holding: {made.made.holding.law}, mean {formatNumber(made.made.holding.meanMinutes, 4)} min.</li>
            {made.made.notes.map((n) => (
              <li key={n}>{n}</li>
            ))}
          </ul>
          <div className="mt-3 flex flex-wrap gap-2">
            <LinkButton href={`/w/${workspace}/scenarios/${made.scenarioId}`} data-testid="open-scenario">
              Open the scenario to run it
            </LinkButton>
            <LinkButton href={`/w/${workspace}/sweeps/new?scenario=${made.scenarioId}&kind=dimensioning`} variant="secondary" data-testid="search-servers">
              Search the servers needed
            </LinkButton>
          </div>
        </Callout>
      )}
    </div>
  );
}

function Measured({ c }: { c: Characterisation }) {
  const z = c.busy.peakedness;
  const poissonLike = z ? Math.abs(z.value - 1) <= z.poissonTolerance : null;
  return (
    <StatGroup>
      <Stat label="Busy hour" value={c.busyHour.label} hint={`${formatNumber(c.busyHour.meanTraffic, 4)} ${c.busyHour.measure === "attempts" ? "attempts/h" : "erlangs"} on average`} />
      <Stat label="Attempts per hour (busy hour)" value={formatNumber(c.busy.ratePerHour, 4)} />
      <Stat label="Mean holding time" value={c.busy.meanHoldingSeconds === null ? "—" : `${formatNumber(c.busy.meanHoldingSeconds, 4)} s`} />
      <Stat
        label="Peakedness (measured)"
        value={z ? formatNumber(z.value, 3) : "—"}
        hint={z ? `${poissonLike ? "within" : "outside"} the Poisson tolerance ±${formatNumber(z.poissonTolerance, 2)}` : "needs call records"}
        tone={poissonLike === false ? "warning" : "default"}
      />
      <Stat label="Index of dispersion of counts" value={c.busy.dispersion ? formatNumber(c.busy.dispersion.value, 3) : "—"} hint={c.busy.dispersion ? `windows of ${formatNumber(c.busy.dispersion.windowSeconds, 3)} s` : undefined} />
      <Stat label="Interarrival scv" value={c.busy.interarrivalScv === null ? "—" : formatNumber(c.busy.interarrivalScv, 3)} />
    </StatGroup>
  );
}

export function CharacterisationView({ workspace, uploadId, canCreate }: { workspace: string; uploadId: string; canCreate: boolean }) {
  const query = useUpload(workspace, uploadId);
  return (
    <QueryView query={query} label="Loading the upload">
      {(upload) => (
        <div className="flex flex-col gap-6">
          <div className="flex flex-wrap items-center gap-3 text-sm text-basin-800">
            <UploadStatusBadge status={upload.status} />
            <span>
              {upload.kind}, {formatBytes(upload.sizeBytes)}, uploaded {formatDateTime(upload.createdAt)}
              {upload.uploadedBy ? ` by ${upload.uploadedBy.name ?? upload.uploadedBy.email}` : ""}
            </span>
            <a className="font-medium text-basin-700 underline" href={`/api/v1/workspaces/${encodeURIComponent(workspace)}/uploads/${upload.id}/file`} data-testid="download-upload">
              Download the file
            </a>
          </div>
          {(upload.status === "stored" || upload.status === "characterising") && (
            <Card>
              <CardBody className="flex flex-col gap-2">
                <p className="text-sm">The worker is characterising this file: busy hour, peakedness and holding-time fits.</p>
                <ProgressBar fraction={upload.progress} label="Characterisation progress" />
              </CardBody>
            </Card>
          )}
          {upload.status === "failed" && <FormError title="The file could not be characterised">{upload.error}</FormError>}
          {upload.status === "ready" && upload.characterisation && <Ready workspace={workspace} upload={upload} canCreate={canCreate} />}
        </div>
      )}
    </QueryView>
  );
}

function Ready({ workspace, upload, canCreate }: { workspace: string; upload: UploadDetail; canCreate: boolean }) {
  const c = upload.characterisation!;
  return (
    <>
      <Card>
        <CardHeader>
          <CardTitle>What was measured</CardTitle>
        </CardHeader>
        <CardBody className="flex flex-col gap-4" data-testid="characterisation">
          <p className="text-sm text-basin-800">
            {c.period.first} to {c.period.last} ({c.period.days} day{c.period.days === 1 ? "" : "s"}){c.group ? `, route or group ${c.group}` : ""}.{" "}
            <strong>Busy hour</strong>: the {c.busyHour.definition}.
          </p>
          <Measured c={c} />
          {c.notes.length > 0 && (
            <Callout tone="warning" title="Notes">
              <ul className="list-disc pl-5">
                {c.notes.map((n) => (
                  <li key={n}>{n}</li>
                ))}
              </ul>
            </Callout>
          )}
          <p className="text-xs text-basin-700">
            Peakedness is measured directly: the time-weighted variance over mean of the number of answered calls in progress within each day&apos;s busy hour (1 for Poisson arrivals on an infinite group).
          </p>
        </CardBody>
      </Card>
      <Card>
        <CardBody>
          <TrafficOverTime c={c} />
        </CardBody>
      </Card>
      {c.holding && (
        <div className="grid gap-6 lg:grid-cols-2">
          <Card>
            <CardBody>
              <HoldingHistogram c={c} />
            </CardBody>
          </Card>
          <Card>
            <CardBody>
              <QQPlot c={c} />
            </CardBody>
          </Card>
        </div>
      )}
      {c.busy.simultaneous.length > 0 && (
        <Card>
          <CardBody>
            <SimultaneousCalls c={c} />
          </CardBody>
        </Card>
      )}
      {c.holding && (
        <Card>
          <CardHeader>
            <CardTitle>Holding-time fits</CardTitle>
          </CardHeader>
          <CardBody>
            <FitsTable c={c} />
          </CardBody>
        </Card>
      )}
      <Card>
        <CardHeader>
          <CardTitle>Make scenario</CardTitle>
        </CardHeader>
        <CardBody>
          <MakeScenario workspace={workspace} upload={upload} canCreate={canCreate} />
        </CardBody>
      </Card>
      <p className="text-sm">
        <Link className="text-basin-700 underline" href={`/w/${workspace}/traffic`}>
          All uploads
        </Link>
      </p>
    </>
  );
}
