import type { ComponentProps, ReactNode } from "react";
import { cn } from "./cn";

export function Card({ className, ...rest }: ComponentProps<"section">) {
  return <section {...rest} className={cn("rounded-lg border border-basin-200 bg-white shadow-xs", className)} />;
}

export interface CardHeaderProps extends ComponentProps<"div"> {
  /** Buttons or links aligned to the right of the title. */
  actions?: ReactNode;
}

export function CardHeader({ className, actions, children, ...rest }: CardHeaderProps) {
  return (
    <div
      {...rest}
      className={cn("flex flex-wrap items-start justify-between gap-3 border-b border-basin-100 px-5 py-4", className)}
    >
      <div className="min-w-0 flex-1">{children}</div>
      {actions && <div className="flex shrink-0 items-center gap-2">{actions}</div>}
    </div>
  );
}

export interface CardTitleProps extends ComponentProps<"h2"> {
  /** Heading level to fit the page outline; looks the same either way. */
  as?: "h2" | "h3" | "h4";
}

export function CardTitle({ as: Tag = "h2", className, ...rest }: CardTitleProps) {
  return <Tag {...rest} className={cn("text-base font-semibold text-basin-950", className)} />;
}

export function CardDescription({ className, ...rest }: ComponentProps<"p">) {
  return <p {...rest} className={cn("mt-1 text-sm text-basin-700", className)} />;
}

export function CardBody({ className, ...rest }: ComponentProps<"div">) {
  return <div {...rest} className={cn("px-5 py-4 text-sm", className)} />;
}

export function CardFooter({ className, ...rest }: ComponentProps<"div">) {
  return (
    <div
      {...rest}
      className={cn("flex flex-wrap justify-end gap-2 border-t border-basin-100 bg-basin-50/60 px-5 py-3", className)}
    />
  );
}
