import { Callout } from "@/components/ui";

/** On a queued or running run's page when no worker is alive: the API's `workerNotice`, and what to do about it. */
export function WorkerNotice({ notice }: { notice: string | null | undefined }) {
  if (!notice) return null;
  return (
    <Callout tone="warning" title="No worker is picking this run up">
      <span data-testid="worker-notice">
        {notice} The run keeps its place and nothing is lost; whoever looks after this Spillway can start a worker (<code>npm run worker</code>).
      </span>
    </Callout>
  );
}
