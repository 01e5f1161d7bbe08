import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { getDatabase } from "@/db/client";
import { listWorkspaceMail } from "@/db/queries/mail";
import { guardPage, requireWorkspaceAccess } from "@/lib/auth/guard";
import { mailboxEnabled } from "@/lib/mail/mailbox";
import { Callout, Card, CardBody, EmptyState, PageHeader } from "@/components/ui";

export const metadata: Metadata = { title: "Mailbox" };

const timeFormat = new Intl.DateTimeFormat("en-GB", { dateStyle: "medium", timeStyle: "medium", timeZone: "UTC" });

function linkify(text: string) {
  return text.split(/(https?:\/\/\S+)/g).map((part, i) =>
    /^https?:\/\//.test(part) ? (
      <a key={i} href={part} className="break-all text-basin-700 underline">
        {part}
      </a>
    ) : (
      part
    ),
  );
}

export default async function MailboxPage({ params }: { params: Promise<{ workspace: string }> }) {
  const { workspace: slug } = await params;
  const access = await guardPage(() => requireWorkspaceAccess(slug, "mailbox.read"), `/w/${slug}/mailbox`);
  if (!mailboxEnabled()) notFound();
  const messages = await listWorkspaceMail(getDatabase(), access.workspace.id);
  return (
    <div className="flex flex-col gap-6">
      <PageHeader title="Mailbox" description={`Mail this Spillway instance sent about ${access.workspace.name} while the local receiver stood in for SMTP: invitations and notices to its members. Sign-in links are never shown here.`} />
      <Callout tone="info" title="Development only">
        This page exists only while outgoing mail is captured locally; with a real SMTP_URL it is switched off.
      </Callout>
      {messages.length === 0 ? (
        <EmptyState title="No mail yet" />
      ) : (
        <ul className="flex flex-col gap-4" aria-label="Captured mail">
          {messages.map((m) => (
            <li key={m.id}>
              <Card>
                <CardBody>
                  <p className="text-sm font-semibold text-basin-950">{m.subject}</p>
                  <p className="text-xs text-basin-600">
                    to {m.envelopeTo.join(", ")} · {timeFormat.format(m.receivedAt)}
                  </p>
                  <pre className="mt-3 font-sans text-sm whitespace-pre-wrap text-basin-900">{linkify(m.textBody)}</pre>
                </CardBody>
              </Card>
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
