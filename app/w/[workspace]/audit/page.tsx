import type { Metadata } from "next";
import { getDatabase } from "@/db/client";
import { listAuditEvents } from "@/db/queries/audit";
import { guardPage, requireWorkspaceAccess } from "@/lib/auth/guard";
import { EmptyState, PageHeader, Table, TBody, TD, TH, THead, TR } from "@/components/ui";

export const metadata: Metadata = { title: "Audit log" };

const timeFormat = new Intl.DateTimeFormat("en-GB", { dateStyle: "medium", timeStyle: "medium", timeZone: "UTC" });

export default async function AuditPage({ params }: { params: Promise<{ workspace: string }> }) {
  const { workspace: slug } = await params;
  const access = await guardPage(() => requireWorkspaceAccess(slug, "audit.read"), `/w/${slug}/audit`);
  const events = await listAuditEvents(getDatabase(), access.workspace.id);
  return (
    <div className="flex flex-col gap-6">
      <PageHeader title="Audit log" description="Who changed what in this workspace (times in UTC)." />
      {events.length === 0 ? (
        <EmptyState title="Nothing recorded yet" />
      ) : (
        <Table>
          <THead>
            <TR>
              <TH>When</TH>
              <TH>Who</TH>
              <TH>What</TH>
              <TH>Details</TH>
            </TR>
          </THead>
          <TBody>
            {events.map((e) => (
              <TR key={e.id}>
                <TD>{timeFormat.format(e.createdAt)}</TD>
                <TD>{e.actorEmail ?? "—"}</TD>
                <TD>{e.action}</TD>
                <TD className="font-mono text-xs">{JSON.stringify(e.detail)}</TD>
              </TR>
            ))}
          </TBody>
        </Table>
      )}
    </div>
  );
}
