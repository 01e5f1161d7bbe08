"use client";

import Link from "next/link";
import { QueryView } from "@/components/lab/states";
import { EmptyState, Table, TBody, TD, TH, THead, TR } from "@/components/ui";
import { formatDateTime } from "@/lib/client/format";
import { useUploads } from "@/lib/client/queries/uploads";
import { formatBytes } from "@/lib/measurement";
import { UploadStatusBadge } from "./characterisation-view";

export function UploadList({ workspace }: { workspace: string }) {
  const query = useUploads(workspace);
  return (
    <QueryView query={query} label="Loading uploads">
      {({ items }) =>
        items.length === 0 ? (
          <EmptyState title="No measured traffic yet" description="Upload call records or interval counts to find the busy hour, the peakedness and the holding-time law." />
        ) : (
          <Table>
            <THead>
              <TR>
                <TH>file</TH>
                <TH>kind</TH>
                <TH>size</TH>
                <TH>status</TH>
                <TH>uploaded</TH>
                <TH>by</TH>
              </TR>
            </THead>
            <TBody>
              {items.map((u) => (
                <TR key={u.id}>
                  <TD>
                    <Link className="font-medium text-basin-800 underline-offset-2 hover:underline" href={`/w/${workspace}/traffic/${u.id}`}>
                      {u.fileName}
                    </Link>
                  </TD>
                  <TD>{u.kind}</TD>
                  <TD>{formatBytes(u.sizeBytes)}</TD>
                  <TD>
                    <UploadStatusBadge status={u.status} />
                    {u.status === "characterising" ? ` ${Math.round(u.progress * 100)} %` : ""}
                  </TD>
                  <TD>{formatDateTime(u.createdAt)}</TD>
                  <TD>{u.uploadedBy?.name ?? u.uploadedBy?.email ?? "—"}</TD>
                </TR>
              ))}
            </TBody>
          </Table>
        )
      }
    </QueryView>
  );
}
