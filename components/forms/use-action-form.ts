"use client";

import { zodResolver } from "@hookform/resolvers/zod";
import { useState, useTransition } from "react";
import { useForm, type DefaultValues, type FieldValues, type Path, type UseFormReturn } from "react-hook-form";
import type { z } from "zod";
import type { ActionResult } from "@/lib/schemas/validation";

/**
 * react-hook-form validated by the concept's zod schema on the client, submitted to a server action that
 * validates again; the action's field messages land on the same fields.
 */
export function useActionForm<Values extends FieldValues, Result extends ActionResult<unknown>>(options: {
  schema: z.ZodType<unknown, Values>;
  defaultValues: DefaultValues<Values>;
  action: (values: Values) => Promise<Result | undefined>;
  onSuccess?: (result: Extract<Result, { ok: true }>, form: UseFormReturn<Values>) => void;
}) {
  const [message, setMessage] = useState<string | null>(null);
  const [pending, startTransition] = useTransition();
  // zod schemas type as input → output; the form holds the input side.
  const form = useForm<Values>({ resolver: zodResolver(options.schema as never) as never, defaultValues: options.defaultValues });
  const onSubmit = form.handleSubmit((values) =>
    startTransition(async () => {
      setMessage(null);
      const result = await options.action(values);
      if (!result) return;
      if (result.ok) {
        options.onSuccess?.(result as Extract<Result, { ok: true }>, form);
        return;
      }
      for (const [field, text] of Object.entries(result.fields ?? {})) form.setError(field as Path<Values>, { message: text });
      setMessage(result.message);
    }),
  );
  return { form, onSubmit, message, pending, errors: form.formState.errors };
}
