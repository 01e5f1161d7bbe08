"use client";

import { Card, CardBody, CardDescription, CardHeader, CardTitle, toast } from "@/components/ui";
import { QueryView } from "@/components/lab/states";
import { errorMessage } from "@/lib/client/api";
import { usePreferences, useSavePreferences } from "@/lib/client/queries/settings";

export function MailSettings() {
  const prefs = usePreferences();
  const save = useSavePreferences();
  return (
    <Card>
      <CardHeader>
        <CardTitle as="h2">E-mail</CardTitle>
        <CardDescription>Notices go to the person who submitted the work. This setting applies in every workspace.</CardDescription>
      </CardHeader>
      <CardBody>
        <QueryView query={prefs} label="Loading your e-mail settings" height="h-10">
          {(p) => (
            <label className="flex items-start gap-2 text-sm">
              <input
                type="checkbox"
                className="mt-1 h-4 w-4 accent-basin-700"
                checked={p.notifyByEmail}
                disabled={save.isPending}
                onChange={async (e) => {
                  try {
                    await save.mutateAsync({ notifyByEmail: e.target.checked });
                    toast.success(e.target.checked ? "You will get e-mail notices." : "E-mail notices are off.");
                  } catch (error) {
                    toast.error(errorMessage(error));
                  }
                }}
              />
              <span>
                <span className="font-medium text-basin-900">E-mail me when my runs and sweeps finish or fail, when someone else cancels them, and when a reviewer decides on them</span>
              </span>
            </label>
          )}
        </QueryView>
      </CardBody>
    </Card>
  );
}
