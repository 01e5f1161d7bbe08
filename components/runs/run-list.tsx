"use client";

import { useState } from "react";
import { Button, Field, Select } from "@/components/ui";
import { QueryView } from "@/components/lab/states";
import { useRuns } from "@/lib/client/queries/runs";
import { RunTable } from "./run-table";

const statusFilters = [
  { value: "", label: "All" },
  { value: "queued,running", label: "In progress" },
  { value: "succeeded", label: "Finished" },
  { value: "failed", label: "Failed" },
  { value: "cancelled", label: "Cancelled" },
];

/** Every run of the workspace, newest first, a server page at a time. */
export function RunList({ workspace }: { workspace: string }) {
  const [status, setStatus] = useState("");
  const [cursors, setCursors] = useState<string[]>([]);
  const query = useRuns(workspace, { status: status || undefined, limit: 25, cursor: cursors[cursors.length - 1] });
  return (
    <div className="flex flex-col gap-3">
      <Field label="Status" className="w-52">
        <Select
          value={status}
          onChange={(e) => {
            setStatus(e.target.value);
            setCursors([]);
          }}
        >
          {statusFilters.map((f) => (
            <option key={f.value} value={f.value}>
              {f.label}
            </option>
          ))}
        </Select>
      </Field>
      <QueryView query={query} label="Loading runs" height="h-64">
        {(page) => (
          <>
            <RunTable workspace={workspace} runs={page.items} empty="No runs match." caption="Runs" />
            <nav aria-label="Pages" className="flex items-center gap-2 text-sm">
              <Button variant="secondary" size="sm" disabled={!cursors.length} onClick={() => setCursors((c) => c.slice(0, -1))}>
                Newer
              </Button>
              <span className="text-basin-700">{page.total} runs</span>
              <Button variant="secondary" size="sm" disabled={!page.nextCursor} onClick={() => setCursors((c) => [...c, page.nextCursor!])}>
                Older
              </Button>
            </nav>
          </>
        )}
      </QueryView>
    </div>
  );
}
