import { cn } from "./cn";

export interface SkeletonProps {
  /** Size it with Tailwind classes, e.g. "h-4 w-32". */
  className?: string;
}

/** Decorative loading shape; pair the loading region with aria-busy or a Spinner label for screen readers. */
export function Skeleton({ className }: SkeletonProps) {
  return <div aria-hidden="true" className={cn("h-4 animate-pulse rounded-md bg-basin-100 motion-reduce:animate-none", className)} />;
}

export function SkeletonText({ lines = 3, className }: { lines?: number; className?: string }) {
  return (
    <div aria-hidden="true" className={cn("flex flex-col gap-2", className)}>
      {Array.from({ length: lines }, (_, i) => (
        // The last line is shorter so the block reads as a paragraph.
        <Skeleton key={i} className={i === lines - 1 && lines > 1 ? "w-2/3" : "w-full"} />
      ))}
    </div>
  );
}
