"use client";

import { LinkButton, PageHeader } from "@/components/ui";
import { QueryView } from "@/components/lab/states";
import { useScenario } from "@/lib/client/queries/scenarios";
import { ScenarioEditor } from "./scenario-editor";
import { ScenarioRuns } from "./scenario-runs";

export function ScenarioPage({ workspace, scenarioId, canEdit, canRun }: { workspace: string; scenarioId: string; canEdit: boolean; canRun: boolean }) {
  const query = useScenario(workspace, scenarioId);
  return (
    <div className="flex flex-col gap-6">
      <PageHeader
        eyebrow="Scenario"
        title={query.data?.name ?? "Scenario"}
        description={query.data ? `Revision ${query.data.latestRevision}${query.data.description ? ` · ${query.data.description}` : ""}` : "Loading …"}
        actions={
          <LinkButton variant="secondary" href={`/w/${workspace}/scenarios/${scenarioId}/revisions`}>
            Revision history
          </LinkButton>
        }
      />
      {!canEdit && <p className="text-sm text-basin-700">Your role can read this scenario but not change or run it.</p>}
      <QueryView query={query} label="Loading the scenario" height="h-96">
        {(s) => (
          <ScenarioEditor
            key={s.latestRevision}
            workspace={workspace}
            scenarioId={s.id}
            initial={{ name: s.name, description: s.description, scenario: s.scenario, revision: s.latestRevision }}
            canEdit={canEdit}
            canRun={canRun}
          />
        )}
      </QueryView>
      <ScenarioRuns workspace={workspace} scenarioId={scenarioId} />
    </div>
  );
}
