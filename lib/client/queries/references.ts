"use client";

import { keepPreviousData, useQuery } from "@tanstack/react-query";
import { useEffect, useState } from "react";
import { ApiError, apiFetch, workspacePath } from "../api";
import { queryKeys } from "./keys";
import type { ReferencesResponse } from "@/lib/jobs/api-types";

/** `value`, once it has stopped changing for `ms`. */
export function useDebounced<T>(value: T, ms: number): T {
  const [settled, setSettled] = useState(value);
  useEffect(() => {
    const timer = setTimeout(() => setSettled(value), ms);
    return () => clearTimeout(timer);
  }, [value, ms]);
  return settled;
}

/**
 * The analytic references for the scenario being edited, computed on the server. Debounced; a request whose inputs
 * changed meanwhile is aborted (TanStack Query passes the signal and cancels queries nobody observes any more).
 * `scenario` is null while the form does not validate.
 */
export function useReferences(ws: string, scenario: unknown | null, debounceMs = 400) {
  const settled = useDebounced(scenario === null ? null : JSON.stringify(scenario), debounceMs);
  return useQuery({
    queryKey: queryKeys.references(ws, settled),
    queryFn: ({ signal }) => apiFetch<ReferencesResponse>(workspacePath(ws, "/references"), { method: "POST", body: { scenario: JSON.parse(settled!) }, signal }),
    enabled: settled !== null,
    placeholderData: keepPreviousData,
    staleTime: Infinity,
    // 429: the previous (abandoned) evaluation still runs on the server; it ends within the time budget.
    retry: (count, error) => error instanceof ApiError && error.status === 429 && count < 3,
    retryDelay: 1_000,
  });
}
