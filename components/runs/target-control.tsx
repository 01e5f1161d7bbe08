"use client";

import { usePathname, useRouter, useSearchParams } from "next/navigation";
import { useState } from "react";
import { Field, Input, LinkButton } from "@/components/ui";
import { DEFAULT_TARGET_GOS, parseTarget } from "@/lib/client/verdict";

/** The target grade of service (blocking) the verdict judges against; kept in the address as ?gos=0.01. */
export function useTarget(): number {
  return parseTarget(useSearchParams().get("gos"));
}

/**
 * A report address carrying the page's target, so the report judges against the same grade of service. The default
 * stays out of the address, as TargetControl keeps it (the report reads a missing ?gos= as the default).
 */
export function withTarget(href: string, target: number): string {
  return target === DEFAULT_TARGET_GOS ? href : `${href}${href.includes("?") ? "&" : "?"}gos=${encodeURIComponent(String(target))}`;
}

/** The "Printable report" button of the run and sweep pages, with the target read from the page's address. */
export function ReportLinkButton({ href }: { href: string }) {
  const target = useTarget();
  return (
    <LinkButton variant="secondary" href={withTarget(href, target)}>
      Printable report
    </LinkButton>
  );
}

export function TargetControl() {
  const target = useTarget();
  const router = useRouter();
  const pathname = usePathname();
  const params = useSearchParams();
  const [text, setText] = useState(String(Number((target * 100).toPrecision(6))));
  const [error, setError] = useState<string | undefined>();
  const apply = (value: string) => {
    setText(value);
    const pct = Number(value);
    if (!value.trim() || !Number.isFinite(pct) || pct <= 0 || pct >= 100) {
      setError("must be a percentage between 0 and 100");
      return;
    }
    setError(undefined);
    const next = new URLSearchParams(params.toString());
    if (pct / 100 === DEFAULT_TARGET_GOS) next.delete("gos");
    else next.set("gos", String(pct / 100));
    router.replace(`${pathname}${next.size ? `?${next}` : ""}`, { scroll: false });
  };
  return (
    <Field label="Target grade of service (blocking, %)" hint={`Workspace default ${DEFAULT_TARGET_GOS * 100} % (common practice for circuit groups).`} error={error} className="max-w-64">
      <Input type="number" step="any" inputMode="decimal" value={text} onChange={(e) => apply(e.target.value)} />
    </Field>
  );
}
