"use client";

import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { apiFetch, workspacePath } from "../api";
import { isLive, livePollMs, queryKeys, type RunFilter } from "./keys";
import type { JobAccepted, RunListResponse, RunResponse } from "@/lib/jobs/api-types";
import type { ScenarioInput } from "@/lib/simulation";

function query(filter: RunFilter): string {
  const params = new URLSearchParams();
  for (const [k, v] of Object.entries(filter)) if (v !== undefined && v !== "") params.set(k, String(v));
  const s = params.toString();
  return s ? `?${s}` : "";
}

/** A page of runs; polls while any listed run is still queued or running. */
export function useRuns(ws: string, filter: RunFilter = {}) {
  return useQuery({
    queryKey: queryKeys.runs(ws, filter),
    queryFn: ({ signal }) => apiFetch<RunListResponse>(workspacePath(ws, `/runs${query(filter)}`), { signal }),
    refetchInterval: (q) => (q.state.data?.items.some((r) => isLive(r.status)) ? livePollMs * 2 : false),
  });
}

/** One run; polls every second while it is queued or running. */
export function useRun(ws: string, id: string, options: { enabled?: boolean } = {}) {
  return useQuery({
    enabled: options.enabled ?? true,
    queryKey: queryKeys.run(ws, id),
    queryFn: ({ signal }) => apiFetch<RunResponse>(workspacePath(ws, `/runs/${id}`), { signal }),
    refetchInterval: (q) => (isLive(q.state.data?.status) ? livePollMs : false),
  });
}

export type SubmitRunInput = { scenarioId: string; revision?: number } | { scenario: ScenarioInput };

export function useSubmitRun(ws: string) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (body: SubmitRunInput) => apiFetch<JobAccepted>(workspacePath(ws, "/runs"), { method: "POST", body }),
    onSuccess: () => client.invalidateQueries({ queryKey: queryKeys.allRuns(ws) }),
  });
}

export function useCancelRun(ws: string, id: string) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: () => apiFetch<unknown>(workspacePath(ws, `/runs/${id}/cancel`), { method: "POST" }),
    onSuccess: () => client.invalidateQueries({ queryKey: queryKeys.allRuns(ws) }),
  });
}
