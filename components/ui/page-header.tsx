import type { ReactNode } from "react";
import { cn } from "./cn";

export interface PageHeaderProps {
  title: ReactNode;
  description?: ReactNode;
  /** Primary page actions, right-aligned on wide screens and wrapped below on narrow ones. */
  actions?: ReactNode;
  /** Small line above the title, e.g. a breadcrumb or workspace name. */
  eyebrow?: ReactNode;
  className?: string;
}

export function PageHeader({ title, description, actions, eyebrow, className }: PageHeaderProps) {
  return (
    <header className={cn("mb-6 flex flex-wrap items-end justify-between gap-4 border-b border-basin-200 pb-4", className)}>
      <div className="min-w-0 flex-1">
        {eyebrow && <div className="mb-1 text-xs font-medium uppercase tracking-wide text-basin-600">{eyebrow}</div>}
        <h1 className="text-2xl font-semibold tracking-tight text-basin-950">{title}</h1>
        {description && <div className="mt-1 max-w-3xl text-sm text-basin-700">{description}</div>}
      </div>
      {actions && <div className="flex shrink-0 flex-wrap items-center gap-2">{actions}</div>}
    </header>
  );
}
