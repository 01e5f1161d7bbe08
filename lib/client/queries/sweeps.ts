"use client";

import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { apiFetch, workspacePath } from "../api";
import { isLive, livePollMs, queryKeys } from "./keys";
import type { JobAccepted, SweepListResponse, SweepResponse } from "@/lib/jobs/api-types";

export function useSweeps(ws: string) {
  return useQuery({
    queryKey: queryKeys.sweeps(ws),
    queryFn: ({ signal }) => apiFetch<SweepListResponse>(workspacePath(ws, "/sweeps"), { signal }),
    refetchInterval: (q) => (q.state.data?.items.some((s) => isLive(s.status)) ? livePollMs * 2 : false),
  });
}

export function useSweep(ws: string, id: string) {
  return useQuery({
    queryKey: queryKeys.sweep(ws, id),
    queryFn: ({ signal }) => apiFetch<SweepResponse>(workspacePath(ws, `/sweeps/${id}`), { signal }),
    refetchInterval: (q) => (isLive(q.state.data?.status) ? livePollMs * 2 : false),
  });
}

export function useSubmitSweep(ws: string) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (body: Record<string, unknown>) => apiFetch<JobAccepted>(workspacePath(ws, "/sweeps"), { method: "POST", body }),
    onSuccess: () => client.invalidateQueries({ queryKey: queryKeys.allSweeps(ws) }),
  });
}

export function useCancelSweep(ws: string, id: string) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: () => apiFetch<unknown>(workspacePath(ws, `/sweeps/${id}/cancel`), { method: "POST" }),
    onSuccess: () => client.invalidateQueries({ queryKey: queryKeys.allSweeps(ws) }),
  });
}
