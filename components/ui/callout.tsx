import type { ReactNode } from "react";
import { cn } from "./cn";

export type CalloutTone = "info" | "warning" | "danger";

const tones: Record<CalloutTone, { box: string; icon: string }> = {
  info: { box: "border-basin-200 bg-basin-50 text-basin-900", icon: "text-basin-600" },
  warning: { box: "border-spill-200 bg-spill-50 text-spill-900", icon: "text-spill-600" },
  danger: { box: "border-red-200 bg-red-50 text-red-900", icon: "text-red-700" },
};

export interface CalloutProps {
  tone?: CalloutTone;
  title?: ReactNode;
  children?: ReactNode;
  className?: string;
}

/**
 * Static guidance that belongs to the page (not a live alert), e.g. the caution shown when sizing
 * emergency lines or hospital beds, where a model's blocking figure must not be the only check.
 */
export function Callout({ tone = "info", title, children, className }: CalloutProps) {
  const t = tones[tone];
  return (
    <div role="note" className={cn("flex gap-3 rounded-lg border px-4 py-3 text-sm", t.box, className)}>
      <CalloutIcon tone={tone} className={cn("mt-0.5 size-5 shrink-0", t.icon)} />
      <div className="min-w-0 flex-1">
        {title && <p className="font-semibold">{title}</p>}
        {children && <div className={cn("leading-relaxed", title ? "mt-1" : undefined)}>{children}</div>}
      </div>
    </div>
  );
}

function CalloutIcon({ tone, className }: { tone: CalloutTone; className: string }) {
  if (tone === "info") {
    return (
      <svg className={className} viewBox="0 0 20 20" fill="none" aria-hidden="true">
        <circle cx="10" cy="10" r="7.5" stroke="currentColor" strokeWidth="1.5" />
        <path d="M10 9v5M10 6.5v.01" stroke="currentColor" strokeWidth="1.75" strokeLinecap="round" />
      </svg>
    );
  }
  return (
    <svg className={className} viewBox="0 0 20 20" fill="none" aria-hidden="true">
      <path
        d="M8.7 3.3a1.5 1.5 0 0 1 2.6 0l6 10.6A1.5 1.5 0 0 1 16 16H4a1.5 1.5 0 0 1-1.3-2.1l6-10.6Z"
        stroke="currentColor"
        strokeWidth="1.5"
        strokeLinejoin="round"
      />
      <path d="M10 8v3.5M10 13.5v.01" stroke="currentColor" strokeWidth="1.75" strokeLinecap="round" />
    </svg>
  );
}
