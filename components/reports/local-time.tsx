"use client";

// A time in the reader's own locale and time zone. The server cannot know either, so it renders the UTC time and
// the browser swaps in the local one right after hydration (useSyncExternalStore: no mismatch warning).
import { useSyncExternalStore } from "react";
import { formatDateTime } from "@/lib/client/format";

const subscribe = () => () => {};

const utc = (iso: string) => {
  const d = new Date(iso);
  return Number.isNaN(d.getTime()) ? "–" : `${d.toISOString().slice(0, 16).replace("T", " ")} UTC`;
};

export function LocalTime({ iso }: { iso: string | null | undefined }) {
  const inBrowser = useSyncExternalStore(
    subscribe,
    () => true,
    () => false,
  );
  if (!iso) return <>–</>;
  return <time dateTime={iso}>{inBrowser ? formatDateTime(iso) : utc(iso)}</time>;
}
