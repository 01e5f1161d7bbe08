import type { ReactNode } from "react";
import { cn } from "./cn";

export interface EmptyStateProps {
  title: ReactNode;
  description?: ReactNode;
  /** Usually one Button or LinkButton that creates the first item. */
  action?: ReactNode;
  /** Decorative; hidden from assistive tech. */
  icon?: ReactNode;
  className?: string;
}

export function EmptyState({ title, description, action, icon, className }: EmptyStateProps) {
  return (
    <div
      className={cn(
        "flex flex-col items-center rounded-lg border border-dashed border-basin-300 bg-white px-6 py-10 text-center",
        className,
      )}
    >
      <div className="mb-3 text-basin-400" aria-hidden="true">
        {icon ?? (
          <svg className="size-10" viewBox="0 0 40 40" fill="none">
            {/* An empty basin: the product's mark for "nothing here yet". */}
            <path d="M6 16h28l-3 14a4 4 0 0 1-4 3H13a4 4 0 0 1-4-3L6 16Z" stroke="currentColor" strokeWidth="2" strokeLinejoin="round" />
            <path d="M14 10c2-2 4-2 6 0s4 2 6 0" stroke="currentColor" strokeWidth="2" strokeLinecap="round" />
          </svg>
        )}
      </div>
      <p className="text-base font-semibold text-basin-900">{title}</p>
      {description && <div className="mt-1 max-w-md text-sm text-basin-700">{description}</div>}
      {action && <div className="mt-5 flex flex-wrap justify-center gap-2">{action}</div>}
    </div>
  );
}
