// The printable report of one run: scenario in words, verdict, the simulated figures beside every reference, method
// notes, charts, warnings, cautions and the review. Rendered on the server from the run as the API shows it.
import { Callout, Card, CardBody } from "@/components/ui";
import { ConvergenceChart, OccupancyChart, ReplicationChart, SegmentChart } from "@/components/runs/run-charts";
import { SegmentTable } from "@/components/runs/segment-table";
import { ResultTable } from "@/components/runs/result-table";
import { VerdictBadge } from "@/components/runs/verdict";
import type { ReviewEntry } from "@/components/review/review-panel";
import { formatPercent } from "@/lib/client/format";
import { sizesSafetyCapacity } from "@/lib/client/safety";
import { DEFAULT_TARGET_GOS, verdictFor } from "@/lib/client/verdict";
import type { RunResponse } from "@/lib/jobs/api-types";
import type { SimulationResult } from "@/lib/simulation";
import { Cautions, EngineWarnings, MethodNotes, ReportHeader, ReportSection, ReviewSummary, WordList } from "./report-parts";
import { simulationNotes } from "./run-notes";
import { scenarioWords, storedScenario } from "./scenario-words";

export interface RunReportProps {
  workspace: string;
  run: RunResponse;
  comments: ReviewEntry[];
  safetyCritical: boolean;
  /** Target grade of service the verdict judges against (?gos= in the address, as on the run page). */
  target: number;
}

export const runReportTitle = (run: Pick<RunResponse, "name" | "scenarioName" | "id">) => run.name || run.scenarioName || `Run ${run.id.slice(0, 8)}`;

export function RunReport({ workspace, run, comments, safetyCritical, target }: RunReportProps) {
  const scenario = storedScenario(run.scenario);
  const result = run.result;
  const safety = safetyCritical || sizesSafetyCapacity(run.name, run.scenarioName);
  return (
    <article className="flex flex-col gap-6 print:gap-4" aria-label="Run report">
      <ReportHeader
        kind="Run"
        title={runReportTitle(run)}
        workspace={workspace}
        subject="runs"
        id={run.id}
        status={run.status}
        partial={run.partial}
        reviewStatus={run.reviewStatus}
        submittedBy={run.submittedBy}
        createdAt={run.createdAt}
        finishedAt={run.finishedAt}
        scenario={{ id: run.scenarioId, name: run.scenarioName, revision: run.revision }}
        exportable={!!result}
      />
      {!result ? (
        <Callout tone={run.status === "failed" ? "danger" : "info"} title={run.status === "failed" ? "The run failed" : "No result yet"}>
          {run.status === "failed" ? (run.error ?? "No reason was recorded.") : `This run is ${run.status}; the report fills in once it has a result.`}
        </Callout>
      ) : (
        <RunResultReport result={result} partial={run.partial} servers={scenario.servers} target={target} safety={safety} />
      )}
      <ReportSection title="Scenario" description={run.revision ? `Revision ${run.revision} of the stored scenario, exactly as simulated.` : "Exactly as simulated."}>
        <WordList label="Scenario" lines={scenarioWords(scenario)} />
      </ReportSection>
      {result && <RunMethods result={result} />}
      {result && <RunCharts result={result} servers={scenario.servers} />}
      <ReportSection title="Review" testId="report-review">
        <ReviewSummary status={run.reviewStatus} comments={comments} />
      </ReportSection>
    </article>
  );
}

function RunResultReport({ result, partial, servers, target, safety }: { result: SimulationResult; partial: boolean; servers: number; target: number; safety: boolean }) {
  const verdict = verdictFor({ servers, callCongestion: result.callCongestion, confidence: result.confidence, references: result.references, target });
  return (
    <>
      <ReportSection title="Verdict" actions={<VerdictBadge kind={verdict.kind} />}>
        <p className="text-base text-basin-950" data-testid="verdict">
          {verdict.sentence}
        </p>
        <p className="text-basin-700">
          Judged against a target grade of service of {formatPercent(target)} call congestion
          {target === DEFAULT_TARGET_GOS ? " (the workspace default)" : ""}. The run page lets you change the target.
        </p>
        {partial && (
          <Callout tone="warning" title="Partial result">
            The run was cancelled; these figures cover the {result.replications} replications that finished before.
          </Callout>
        )}
      </ReportSection>
      <ReportSection title="Warnings and cautions" testId="report-cautions">
        <EngineWarnings warnings={result.warnings.map((w) => ({ key: w.code + (w.measure ?? ""), message: w.message }))} />
        <Cautions safety={safety} />
      </ReportSection>
      <ReportSection title="Simulated against the formulas" description={`Estimates with ${formatPercent(result.confidence)} confidence intervals beside each analytic reference that gives the same measure.`}>
        <div className="break-inside-avoid">
          <ResultTable result={result} />
        </div>
      </ReportSection>
      {result.segments?.length ? (
        <ReportSection
          title="Blocking per profile segment"
          description={`Call congestion in each segment of the load cycle with its ${formatPercent(result.confidence)} confidence interval, beside the per-segment analytic values.`}
          testId="report-segments"
        >
          <div className="break-inside-avoid">
            <SegmentChart result={result} />
          </div>
          <SegmentTable result={result} />
        </ReportSection>
      ) : null}
    </>
  );
}

function RunMethods({ result }: { result: SimulationResult }) {
  return (
    <ReportSection title="Method notes and assumptions">
      <WordList label="How the simulated figures were made" lines={simulationNotes(result)} />
      <MethodNotes references={result.references} />
    </ReportSection>
  );
}

function RunCharts({ result, servers }: { result: SimulationResult; servers: number }) {
  return (
    <ReportSection title="Charts" description="Each chart's figures are in the table above and in the downloads.">
      <div className="grid gap-6 lg:grid-cols-2 print:grid-cols-1">
        <Card className="break-inside-avoid print:border-0 print:shadow-none">
          <CardBody>
            <ReplicationChart result={result} />
          </CardBody>
        </Card>
        <Card className="break-inside-avoid print:border-0 print:shadow-none">
          <CardBody>
            <ConvergenceChart result={result} />
          </CardBody>
        </Card>
      </div>
      {servers > 0 && result.occupancy.length === servers + 1 && (
        <Card className="break-inside-avoid print:border-0 print:shadow-none">
          <CardBody>
            <OccupancyChart result={result} servers={servers} />
          </CardBody>
        </Card>
      )}
    </ReportSection>
  );
}
