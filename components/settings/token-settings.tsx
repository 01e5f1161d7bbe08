"use client";

import { useState } from "react";
import { Button, Card, CardBody, CardDescription, CardHeader, CardTitle, ConfirmDialog, Field, FormError, Input, Table, TBody, TD, TH, THead, TR, toast } from "@/components/ui";
import { QueryView } from "@/components/lab/states";
import { ApiError, errorMessage } from "@/lib/client/api";
import { formatDateTime } from "@/lib/client/format";
import { useCreateToken, useRevokeToken, useTokens, type CreatedToken } from "@/lib/client/queries/settings";

export function TokenSettings({ workspace }: { workspace: string }) {
  const tokens = useTokens(workspace);
  const create = useCreateToken(workspace);
  const revoke = useRevokeToken(workspace);
  const [name, setName] = useState("");
  const [fieldError, setFieldError] = useState<string | undefined>();
  const [formError, setFormError] = useState<string | null>(null);
  const [created, setCreated] = useState<CreatedToken | null>(null);
  const [revoking, setRevoking] = useState<{ id: string; name: string } | null>(null);
  const onCreate = async (e: React.FormEvent) => {
    e.preventDefault();
    setFieldError(undefined);
    setFormError(null);
    try {
      setCreated(await create.mutateAsync(name));
      setName("");
    } catch (error) {
      if (error instanceof ApiError && error.fields.name) setFieldError(error.fields.name);
      else setFormError(errorMessage(error));
    }
  };
  return (
    <Card>
      <CardHeader>
        <CardTitle as="h2">API tokens</CardTitle>
        <CardDescription>
          For scripts and notebooks: send <code>Authorization: Bearer &lt;token&gt;</code>. A token acts with your current role in this workspace only.
        </CardDescription>
      </CardHeader>
      <CardBody className="flex flex-col gap-4">
        <form onSubmit={onCreate} className="flex flex-wrap items-end gap-3" aria-label="Create an API token" noValidate>
          <Field label="Token name" hint="What uses it, e.g. the nightly sweep script." error={fieldError} className="w-72">
            <Input value={name} onChange={(e) => setName(e.target.value)} />
          </Field>
          <Button type="submit" pending={create.isPending}>
            Create token
          </Button>
        </form>
        {formError && <FormError>{formError}</FormError>}
        {created && (
          <div role="status" className="flex flex-col gap-2 rounded-md border border-spill-300 bg-spill-50 p-3 text-sm">
            <p className="font-medium text-basin-950">Copy the token &ldquo;{created.name}&rdquo; now: it is shown only once.</p>
            <div className="flex flex-wrap items-center gap-2">
              <code className="break-all rounded bg-white px-2 py-1 font-mono text-xs" data-testid="new-token">
                {created.token}
              </code>
              <Button
                size="sm"
                variant="secondary"
                onClick={async () => {
                  try {
                    await navigator.clipboard.writeText(created.token);
                    toast.success("Token copied.");
                  } catch {
                    toast.error("The browser did not allow copying; select the token and copy it yourself.");
                  }
                }}
              >
                Copy
              </Button>
              <Button size="sm" variant="ghost" onClick={() => setCreated(null)}>
                Done
              </Button>
            </div>
          </div>
        )}
        <QueryView query={tokens} label="Loading tokens" height="h-20">
          {(rows) =>
            rows.length === 0 ? (
              <p className="text-sm text-basin-700">You have no tokens in this workspace.</p>
            ) : (
              <Table>
                <caption className="sr-only">Your API tokens in this workspace</caption>
                <THead>
                  <TR>
                    <TH>Name</TH>
                    <TH>Created</TH>
                    <TH>Last used</TH>
                    <TH>State</TH>
                    <TH>
                      <span className="sr-only">Actions</span>
                    </TH>
                  </TR>
                </THead>
                <TBody>
                  {rows.map((t) => (
                    <TR key={t.id}>
                      <TD>{t.name}</TD>
                      <TD>{formatDateTime(t.createdAt)}</TD>
                      <TD>{t.lastUsedAt ? formatDateTime(t.lastUsedAt) : "Never"}</TD>
                      <TD>{t.revokedAt ? `Revoked ${formatDateTime(t.revokedAt)}` : "Active"}</TD>
                      <TD>
                        {!t.revokedAt && (
                          <Button size="sm" variant="danger" onClick={() => setRevoking({ id: t.id, name: t.name })}>
                            Revoke
                          </Button>
                        )}
                      </TD>
                    </TR>
                  ))}
                </TBody>
              </Table>
            )
          }
        </QueryView>
        <ConfirmDialog
          open={!!revoking}
          onClose={() => setRevoking(null)}
          title={`Revoke "${revoking?.name}"?`}
          message="Anything using this token gets 401 from now on. This cannot be undone; create a new token instead."
          confirmLabel="Revoke"
          danger
          pending={revoke.isPending}
          onConfirm={async () => {
            try {
              await revoke.mutateAsync(revoking!.id);
              toast.success("Token revoked.");
            } catch (error) {
              toast.error(errorMessage(error));
            }
            setRevoking(null);
          }}
        />
      </CardBody>
    </Card>
  );
}
