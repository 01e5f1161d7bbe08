"use client";

import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { apiFetch, workspacePath } from "../api";
import { queryKeys } from "./keys";
import type { ScenarioListResponse, ScenarioResponse, ScenarioRevisionResponse, ScenarioRevisionSummary } from "@/lib/jobs/api-types";
import type { ScenarioInput } from "@/lib/simulation";

/** Every scenario of the workspace (all pages), for the table that sorts, filters and pages in the browser. */
export function useScenarios(ws: string) {
  return useQuery({
    queryKey: queryKeys.scenarios(ws),
    queryFn: async ({ signal }) => {
      const items: ScenarioListResponse["items"] = [];
      let cursor: string | null = null;
      do {
        const page: ScenarioListResponse = await apiFetch<ScenarioListResponse>(
          workspacePath(ws, `/scenarios?limit=100${cursor ? `&cursor=${encodeURIComponent(cursor)}` : ""}`),
          { signal },
        );
        items.push(...page.items);
        cursor = page.nextCursor;
      } while (cursor && items.length < 2_000);
      return items;
    },
  });
}

export function useScenario(ws: string, id: string | undefined) {
  return useQuery({
    queryKey: queryKeys.scenario(ws, id ?? ""),
    queryFn: ({ signal }) => apiFetch<ScenarioResponse>(workspacePath(ws, `/scenarios/${id}`), { signal }),
    enabled: !!id,
  });
}

export function useScenarioRevisions(ws: string, id: string) {
  return useQuery({
    queryKey: queryKeys.revisions(ws, id),
    queryFn: ({ signal }) => apiFetch<{ revisions: ScenarioRevisionSummary[] } | ScenarioRevisionSummary[]>(workspacePath(ws, `/scenarios/${id}/revisions`), { signal }),
    select: (data) => (Array.isArray(data) ? data : data.revisions),
  });
}

/** One revision with its document (revisions never change, so it is never refetched). */
export function useScenarioRevision(ws: string, id: string, revision: number | undefined) {
  return useQuery({
    queryKey: [...queryKeys.revisions(ws, id), revision],
    queryFn: ({ signal }) => apiFetch<ScenarioRevisionResponse>(workspacePath(ws, `/scenarios/${id}/revisions/${revision}`), { signal }),
    enabled: revision !== undefined,
    staleTime: Infinity,
  });
}

export interface SaveScenarioInput {
  id?: string;
  name: string;
  description: string;
  note?: string;
  scenario: ScenarioInput;
}

/** POST a new scenario, or PATCH an existing one (which makes a new revision). */
export function useSaveScenario(ws: string) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: ({ id, ...body }: SaveScenarioInput) =>
      id
        ? apiFetch<ScenarioResponse>(workspacePath(ws, `/scenarios/${id}`), { method: "PATCH", body })
        : apiFetch<ScenarioResponse>(workspacePath(ws, "/scenarios"), { method: "POST", body }),
    onSuccess: (saved) => {
      client.invalidateQueries({ queryKey: queryKeys.scenarios(ws) });
      client.setQueryData(queryKeys.scenario(ws, saved.id), saved);
    },
  });
}
