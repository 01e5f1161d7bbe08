import type { ReactNode } from "react";
import { cn } from "./cn";

export interface StatProps {
  label: ReactNode;
  /** Already formatted, e.g. "0.85 %" or "42 circuits". */
  value: ReactNode;
  hint?: ReactNode;
  /** "warning" draws attention, e.g. blocking above the target grade of service. */
  tone?: "default" | "warning" | "danger";
  className?: string;
}

const valueTone = {
  default: "text-basin-950",
  warning: "text-spill-700",
  danger: "text-red-700",
} as const;

// Each Stat is its own <dl>, so it is valid markup alone or in a row of siblings.
export function Stat({ label, value, hint, tone = "default", className }: StatProps) {
  return (
    <dl className={cn("min-w-0 rounded-lg border border-basin-200 bg-white px-4 py-3", className)}>
      <dt className="text-xs font-medium uppercase tracking-wide text-basin-600">{label}</dt>
      <dd className={cn("mt-1 text-2xl font-semibold tabular-nums", valueTone[tone])}>{value}</dd>
      {hint && <dd className="mt-0.5 text-xs text-basin-600">{hint}</dd>}
    </dl>
  );
}

export function StatGroup({ className, children }: { className?: string; children: ReactNode }) {
  return <div className={cn("grid grid-cols-[repeat(auto-fit,minmax(10rem,1fr))] gap-3", className)}>{children}</div>;
}
