"use client";

import { useState, useTransition } from "react";
import { Button, ConfirmDialog, toast } from "@/components/ui";
import type { ActionResult } from "@/lib/schemas/validation";

/** A ghost button that asks first, then runs a server action and reports its result as a toast. */
export function ConfirmActionButton(props: {
  label: string;
  title: string;
  message: string;
  confirmLabel: string;
  successMessage: string;
  run: () => Promise<ActionResult>;
}) {
  const [open, setOpen] = useState(false);
  const [pending, startTransition] = useTransition();
  return (
    <>
      <Button variant="ghost" size="sm" onClick={() => setOpen(true)}>
        {props.label}
      </Button>
      <ConfirmDialog
        open={open}
        onClose={() => setOpen(false)}
        title={props.title}
        message={props.message}
        confirmLabel={props.confirmLabel}
        danger
        pending={pending}
        onConfirm={() =>
          startTransition(async () => {
            const result = await props.run();
            if (result.ok) toast.success(result.message ?? props.successMessage);
            else toast.error(result.message);
            setOpen(false);
          })
        }
      />
    </>
  );
}
