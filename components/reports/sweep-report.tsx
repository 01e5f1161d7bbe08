// The printable report of a sweep, sizing map or dimensioning search: base scenario and what was varied in words,
// the verdict over the points, the curve or map with its table, each point's figures beside the references,
// method notes, the engine's warnings, cautions and the review.
import { Callout } from "@/components/ui";
import { ResultTable } from "@/components/runs/result-table";
import { VerdictBadge } from "@/components/runs/verdict";
import type { ReviewEntry } from "@/components/review/review-panel";
import { PointRunsTable, SweepResult } from "@/components/sweeps/sweep-view";
import { parameterLabel, sweepKindLabels } from "@/components/sweeps/sweep-text";
import { formatNumber, formatPercent } from "@/lib/client/format";
import { sizesSafetyCapacity } from "@/lib/client/safety";
import { verdictFor, type Verdict, type VerdictKind } from "@/lib/client/verdict";
import type { JobStatus, SweepResponse } from "@/lib/jobs/api-types";
import type { Reference, SimulationResult } from "@/lib/simulation";
import type { GridMap, SweepDefinition } from "@/lib/sweeps";
import { Cautions, EngineWarnings, MethodNotes, ReportHeader, ReportSection, ReviewSummary, WordList } from "./report-parts";
import { scenarioWords, storedScenario, sweepDefinitionWords } from "./scenario-words";

/** One point's run with its result (per-replication arrays left out, as the sweep query reads them). */
export interface ReportPoint {
  runId: string;
  point: number;
  values: Record<string, number>;
  status: JobStatus;
  result: SimulationResult | null;
}

export interface SweepReportProps {
  workspace: string;
  sweep: SweepResponse;
  points: ReportPoint[];
  comments: ReviewEntry[];
  safetyCritical: boolean;
  /** Target of a one-parameter sweep's verdicts (?gos=); grids and searches carry their own. */
  target: number;
}

/** Points shown one by one beside their references; longer sweeps point to the downloads instead. */
export const MAX_DETAILED_POINTS = 12;

export const sweepReportTitle = (s: Pick<SweepResponse, "name" | "kind" | "scenarioName" | "id">) =>
  s.name || `${sweepKindLabels[s.kind]} of ${s.scenarioName ?? `sweep ${s.id.slice(0, 8)}`}`;

const pointLabel = (p: ReportPoint) =>
  `Point ${p.point + 1}: ${Object.entries(p.values)
    .map(([name, value]) => `${parameterLabel(name)} ${formatNumber(value)}`)
    .join(", ")}`;

/** Each method once, with the assumptions it states at the first point that reports it. */
function uniqueReferences(points: ReportPoint[]): Reference[] {
  const seen = new Map<string, Reference>();
  for (const p of points) for (const r of p.result?.references ?? []) if (!seen.has(r.method)) seen.set(r.method, r);
  return [...seen.values()];
}

const kindWords: Record<VerdictKind, string> = { holds: "holds", breaks: "breaks", undecided: "is too close to call" };

/** A one-parameter sweep: the base group judged at every point against the target. */
function curveVerdict(sweep: SweepResponse, points: ReportPoint[], target: number): { sentence: string; perPoint: Map<string, Verdict> } | null {
  const base = (sweep.scenario as { servers?: number }).servers ?? 0;
  const perPoint = new Map<string, Verdict>();
  for (const p of points) {
    const servers = p.values.servers ?? base;
    if (!p.result || !servers) continue;
    perPoint.set(p.runId, verdictFor({ servers, callCongestion: p.result.callCongestion, confidence: p.result.confidence, references: p.result.references, target }));
  }
  if (!perPoint.size) return null;
  const definition = sweep.definition as Extract<SweepDefinition, { kind: "sweep" }>;
  const label = parameterLabel(definition.parameter).toLowerCase();
  const groups = (["holds", "breaks", "undecided"] as const)
    .map((kind) => ({ kind, values: points.filter((p) => perPoint.get(p.runId)?.kind === kind).map((p) => formatNumber(p.values[definition.parameter])) }))
    .filter((g) => g.values.length);
  const group = definition.parameter === "servers" ? "the group" : `the ${base} circuits of the base scenario`;
  return {
    sentence: `At a ${formatPercent(target)} call congestion target, ${group} ${groups.map((g) => `${kindWords[g.kind]} at ${label} ${g.values.join(", ")}`).join("; ")} (${perPoint.size} of ${points.length} points finished).`,
    perPoint,
  };
}

function gridVerdict(map: GridMap): string {
  const total = map.x.values.length * map.y.values.length;
  return `${map.formula}'s group meets the ${formatPercent(map.targetBlocking)} target under the simulated traffic in ${map.counts.holds} of ${total} cells, misses it in ${map.counts.breaks}, and ${map.counts.inconclusive} ${map.counts.inconclusive === 1 ? "is" : "are"} too close to call.`;
}

export function SweepReport({ workspace, sweep, points, comments, safetyCritical, target }: SweepReportProps) {
  const scenario = storedScenario(sweep.scenario);
  const definition = sweep.definition as SweepDefinition;
  const safety = safetyCritical || sizesSafetyCapacity(sweep.name, sweep.scenarioName);
  const finished = points.filter((p) => p.result);
  const curve = sweep.kind === "sweep" ? curveVerdict(sweep, points, target) : null;
  const warnings = finished.flatMap((p) => p.result!.warnings.map((w) => ({ key: `${p.runId}-${w.code}-${w.measure ?? ""}`, where: pointLabel(p), message: w.message })));
  return (
    <article className="flex flex-col gap-6 print:gap-4" aria-label="Sweep report">
      <ReportHeader
        kind="Sweep"
        title={sweepReportTitle(sweep)}
        workspace={workspace}
        subject="sweeps"
        id={sweep.id}
        status={sweep.status}
        reviewStatus={sweep.reviewStatus}
        submittedBy={sweep.submittedBy}
        createdAt={sweep.createdAt}
        finishedAt={sweep.finishedAt}
        scenario={{ id: sweep.scenarioId, name: sweep.scenarioName, revision: sweep.revision }}
        exportable={sweep.status !== "queued"}
      />
      {sweep.status === "failed" && (
        <Callout tone="danger" title="The sweep failed">
          {sweep.error ?? "No reason was recorded."}
        </Callout>
      )}
      {(sweep.status === "queued" || sweep.status === "running") && (
        <Callout tone="info" title="Still running">
          {sweep.progress.pointsDone} of {sweep.progress.pointsPlanned} points have finished; the report covers those.
        </Callout>
      )}
      {sweep.status === "cancelled" && (
        <Callout tone="warning" title="Cancelled">
          The sweep was cancelled; the figures cover the points that finished before.
        </Callout>
      )}
      {(curve || sweep.result?.kind === "grid") && (
        <ReportSection title="Verdict" testId="report-verdict">
          <p className="text-base text-basin-950" data-testid="verdict">
            {curve ? curve.sentence : gridVerdict(sweep.result as GridMap)}
          </p>
        </ReportSection>
      )}
      <ReportSection title="Warnings and cautions" testId="report-cautions">
        <EngineWarnings warnings={warnings} />
        <Cautions safety={safety} />
      </ReportSection>
      <ReportSection title="Base scenario" description={sweep.revision ? `Revision ${sweep.revision} of the stored scenario; every point starts from it.` : "Every point starts from it."}>
        <WordList label="Base scenario" lines={scenarioWords(scenario)} />
      </ReportSection>
      <ReportSection title="What was varied" description="One background run per point, all with the base seed (common random numbers), so neighbouring points differ by the parameter, not by the noise.">
        <WordList label="What was varied" lines={sweepDefinitionWords(definition)} />
      </ReportSection>
      <SweepResult workspace={workspace} sweep={sweep} />
      <ReportSection title={sweep.kind === "dimensioning" ? "Probes" : "Point runs"}>
        <div className="break-inside-avoid">
          <PointRunsTable workspace={workspace} sweep={sweep} />
        </div>
      </ReportSection>
      <ReportSection
        title="Each point against the formulas"
        description={
          finished.length > MAX_DETAILED_POINTS
            ? undefined
            : "Simulated call congestion, time congestion and carried traffic with their intervals beside each reference, per point."
        }
      >
        {finished.length === 0 ? (
          <p className="text-basin-700">No point has finished yet.</p>
        ) : finished.length > MAX_DETAILED_POINTS ? (
          <p className="text-basin-800">
            {finished.length} points finished; every point&apos;s figures beside its references are in the CSV and JSON downloads.
          </p>
        ) : (
          finished.map((p) => {
            const verdict = curve?.perPoint.get(p.runId);
            return (
              <section key={p.runId} aria-label={pointLabel(p)} className="flex flex-col gap-2 break-inside-avoid" data-testid="report-point">
                <h3 className="flex flex-wrap items-center gap-2 font-semibold text-basin-950">
                  {pointLabel(p)}
                  {verdict && <VerdictBadge kind={verdict.kind} />}
                </h3>
                {verdict && <p className="text-basin-900">{verdict.sentence}</p>}
                <ResultTable result={p.result!} />
              </section>
            );
          })
        )}
      </ReportSection>
      <ReportSection title="Method notes and assumptions">
        <p className="text-basin-900">Each point is one run of the base scenario with the point&apos;s values applied; the run settings are those of the base scenario above.</p>
        <MethodNotes references={uniqueReferences(finished)} />
      </ReportSection>
      <ReportSection title="Review" testId="report-review">
        <ReviewSummary status={sweep.reviewStatus} comments={comments} />
      </ReportSection>
    </article>
  );
}
