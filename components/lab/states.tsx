"use client";

// Loading, error and empty states shared by the lab's pages: the box keeps its size while data loads, and an API
// error shows the server's own message.
import type { ReactNode } from "react";
import { Button, FormError, Skeleton, SkeletonText } from "@/components/ui";
import { errorMessage } from "@/lib/client/api";

export function LoadingBlock({ label, height = "h-48" }: { label: string; height?: string }) {
  return (
    <div aria-busy="true" aria-label={label} role="status" className="flex flex-col gap-3">
      <span className="sr-only">{label}</span>
      <Skeleton className={`${height} w-full`} />
      <SkeletonText lines={2} />
    </div>
  );
}

export function ErrorBlock({ error, title = "Could not load this", retry }: { error: unknown; title?: string; retry?: () => void }) {
  return (
    <div className="flex flex-col items-start gap-2">
      <FormError title={title}>{errorMessage(error)}</FormError>
      {retry && (
        <Button variant="secondary" size="sm" onClick={retry}>
          Try again
        </Button>
      )}
    </div>
  );
}

/** Renders `children(data)` once a query has data; a skeleton before, the server's message on failure. */
export function QueryView<T>({ query, label, height, children }: { query: { data: T | undefined; error: unknown; isError: boolean; refetch: () => unknown }; label: string; height?: string; children: (data: T) => ReactNode }) {
  if (query.isError && query.data === undefined) return <ErrorBlock error={query.error} retry={() => void query.refetch()} />;
  if (query.data === undefined) return <LoadingBlock label={label} height={height} />;
  return <>{children(query.data)}</>;
}
