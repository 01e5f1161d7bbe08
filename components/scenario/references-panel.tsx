"use client";

import { Badge, Card, CardBody, CardDescription, CardHeader, CardTitle, Spinner } from "@/components/ui";
import { errorMessage } from "@/lib/client/api";
import { formatErlangs, formatMeasure, formatPercent } from "@/lib/client/format";
import { useReferences } from "@/lib/client/queries/references";
import { DEFAULT_TARGET_GOS } from "@/lib/client/verdict";
import { minServersForBlocking } from "@/lib/teletraffic";
import type { Reference } from "@/lib/simulation";

const shownMeasures: { key: keyof Reference; label: string }[] = [
  { key: "callCongestion", label: "Call congestion" },
  { key: "timeCongestion", label: "Time congestion" },
  { key: "attemptCongestion", label: "Attempt congestion" },
  { key: "lossProbability", label: "Loss" },
  { key: "waitingProbability", label: "Waiting" },
  { key: "meanWait", label: "Mean wait" },
  { key: "carriedTraffic", label: "Carried traffic" },
];

export function ReferenceCard({ reference, index }: { reference: Reference; index: number }) {
  return (
    <li className="rounded-md border border-basin-200 bg-white p-3" data-testid="reference">
      <div className="flex flex-wrap items-center gap-2">
        <h3 className="text-sm font-semibold text-basin-950">{reference.method}</h3>
        {reference.unavailable ? (
          <Badge tone="neutral">not evaluated</Badge>
        ) : reference.exact ? (
          <Badge tone="success">exact for these inputs</Badge>
        ) : (
          <Badge tone="warning">{index === 0 ? "same mean load only" : "approximation"}</Badge>
        )}
      </div>
      <p className="mt-1 text-xs text-basin-700">Assumes: {reference.assumptions}</p>
      {reference.unavailable ? (
        <p className="mt-2 text-xs text-basin-700">{reference.unavailable}</p>
      ) : (
        <dl className="mt-2 grid grid-cols-2 gap-x-3 gap-y-1 text-sm">
          {shownMeasures
            .filter((m) => typeof reference[m.key] === "number")
            .map((m) => (
              <div key={m.key} className="contents">
                <dt className="text-basin-700">{m.label}</dt>
                <dd className="text-right tabular-nums text-basin-950">{formatMeasure(m.key, reference[m.key] as number)}</dd>
              </div>
            ))}
        </dl>
      )}
    </li>
  );
}

/** The formula's answer for the scenario as typed, before anything is simulated. */
export function ReferencesPanel({ workspace, scenario, servers }: { workspace: string; scenario: unknown | null; servers: number | undefined }) {
  const query = useReferences(workspace, scenario);
  const data = query.data;
  const erlangB = data?.references[0];
  const traffic = erlangB?.carriedTraffic !== undefined && erlangB.callCongestion !== undefined ? erlangB.carriedTraffic / (1 - erlangB.callCongestion) : undefined;
  let sizing: number | null = null;
  try {
    sizing = traffic ? minServersForBlocking({ traffic, target: DEFAULT_TARGET_GOS }).servers : null;
  } catch {
    sizing = null;
  }
  const busy = query.isFetching;
  return (
    <Card className="lg:sticky lg:top-4" aria-labelledby="references-title">
      <CardHeader actions={busy ? <Spinner label="Updating the references" /> : undefined}>
        <CardTitle as="h2">
          <span id="references-title">What the formulas say</span>
        </CardTitle>
        <CardDescription>Analytic references for the inputs as typed, computed on the server. Nothing is simulated yet.</CardDescription>
      </CardHeader>
      <CardBody className="flex min-h-64 flex-col gap-3" aria-busy={busy} aria-live="polite" data-testid="references-panel">
        {scenario === null ? (
          <p className="text-sm text-basin-700">Fix the highlighted fields to see the references.</p>
        ) : query.isError ? (
          <p role="alert" className="text-sm text-red-700">
            {errorMessage(query.error)}
          </p>
        ) : !data ? (
          <p className="text-sm text-basin-700">Working out the references …</p>
        ) : (
          <>
            <p className="text-sm text-basin-900" data-testid="offered-traffic">
              Mean offered traffic <strong className="tabular-nums">{formatErlangs(data.offeredTraffic)}</strong>
              {traffic !== undefined && Math.abs(traffic - data.offeredTraffic) > 1e-6 * data.offeredTraffic ? (
                <> to the primary groups; <strong className="tabular-nums">{formatErlangs(traffic)}</strong> of it reaches</>
              ) : (
                " on"
              )}{" "}
              the <strong className="tabular-nums">{servers ?? "–"}</strong> circuits.
              {sizing !== null && traffic !== undefined && (
                <>
                  {" "}
                  Erlang B sizes {formatErlangs(traffic)} at <strong className="tabular-nums">{sizing}</strong> circuits for {formatPercent(DEFAULT_TARGET_GOS)} blocking.
                </>
              )}
            </p>
            <ol className="flex flex-col gap-2" aria-label="Analytic references">
              {data.references.map((r, i) => (
                <ReferenceCard key={`${r.method}-${i}`} reference={r} index={i} />
              ))}
            </ol>
          </>
        )}
      </CardBody>
    </Card>
  );
}
