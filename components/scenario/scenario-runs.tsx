"use client";

import { Card, CardBody, CardHeader, CardTitle } from "@/components/ui";
import { RunTable } from "@/components/runs/run-table";
import { QueryView } from "@/components/lab/states";
import { useRuns } from "@/lib/client/queries/runs";

export function ScenarioRuns({ workspace, scenarioId }: { workspace: string; scenarioId: string }) {
  const query = useRuns(workspace, { scenarioId, limit: 25 });
  return (
    <Card>
      <CardHeader>
        <CardTitle as="h2">Runs of this scenario</CardTitle>
      </CardHeader>
      <CardBody>
        <QueryView query={query} label="Loading runs">
          {(page) => <RunTable workspace={workspace} runs={page.items} empty="No runs of this scenario yet." />}
        </QueryView>
      </CardBody>
    </Card>
  );
}
