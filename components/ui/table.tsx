import type { ComponentProps } from "react";
import { cn } from "./cn";

export interface TableProps extends ComponentProps<"table"> {
  /** Classes for the bordered, horizontally scrolling wrapper. */
  containerClassName?: string;
}

export function Table({ className, containerClassName, ...rest }: TableProps) {
  return (
    <div className={cn("overflow-x-auto rounded-lg border border-basin-200 bg-white", containerClassName)}>
      <table {...rest} className={cn("w-full border-collapse text-left text-sm text-basin-950", className)} />
    </div>
  );
}

export function TableCaption({ className, ...rest }: ComponentProps<"caption">) {
  return <caption {...rest} className={cn("caption-top px-3 py-2 text-left text-sm text-basin-700", className)} />;
}

export function THead({ className, ...rest }: ComponentProps<"thead">) {
  return <thead {...rest} className={cn("border-b border-basin-200 bg-basin-50", className)} />;
}

export function TBody({ className, ...rest }: ComponentProps<"tbody">) {
  return <tbody {...rest} className={cn("divide-y divide-basin-100", className)} />;
}

export function TR({ className, ...rest }: ComponentProps<"tr">) {
  return <tr {...rest} className={cn("[tbody_&]:hover:bg-basin-50/60", className)} />;
}

export interface CellAlignProps {
  /** Right-aligns with tabular figures so columns of numbers line up. */
  numeric?: boolean;
}

export function TH({ className, numeric, scope = "col", ...rest }: ComponentProps<"th"> & CellAlignProps) {
  return (
    <th
      {...rest}
      scope={scope}
      className={cn(
        "px-3 py-2 align-bottom text-sm font-semibold text-basin-800",
        numeric && "text-right tabular-nums",
        className,
      )}
    />
  );
}

export function TD({ className, numeric, ...rest }: ComponentProps<"td"> & CellAlignProps) {
  return (
    <td
      {...rest}
      className={cn("px-3 py-2 align-top text-sm", numeric && "text-right tabular-nums", className)}
    />
  );
}

// DataTable holds sort state, so it lives in its own client module; re-exported here for one import path.
export { DataTable, type DataTableProps, type DataTableColumnMeta } from "./data-table";
