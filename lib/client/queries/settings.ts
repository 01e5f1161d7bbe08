"use client";

import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { apiFetch, workspacePath } from "../api";
import { queryKeys } from "./keys";
import type { Preferences } from "@/lib/jobs/api-types";

export interface ApiTokenRow {
  id: string;
  name: string;
  createdAt: string;
  lastUsedAt: string | null;
  revokedAt: string | null;
}

export interface CreatedToken {
  id: string;
  name: string;
  createdAt: string;
  /** The secret: shown once, never stored in the clear. */
  token: string;
}

export function useTokens(ws: string) {
  return useQuery({
    queryKey: queryKeys.tokens(ws),
    queryFn: ({ signal }) => apiFetch<{ tokens: ApiTokenRow[] }>(workspacePath(ws, "/tokens"), { signal }),
    select: (d) => d.tokens,
  });
}

export function useCreateToken(ws: string) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (name: string) => apiFetch<CreatedToken>(workspacePath(ws, "/tokens"), { method: "POST", body: { name } }),
    onSuccess: () => client.invalidateQueries({ queryKey: queryKeys.tokens(ws) }),
  });
}

export function useRevokeToken(ws: string) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (id: string) => apiFetch<unknown>(workspacePath(ws, `/tokens/${id}`), { method: "DELETE" }),
    onSuccess: () => client.invalidateQueries({ queryKey: queryKeys.tokens(ws) }),
  });
}

const preferencesKey = ["preferences"] as const;

export function usePreferences() {
  return useQuery({ queryKey: preferencesKey, queryFn: ({ signal }) => apiFetch<Preferences>("/preferences", { signal }) });
}

export function useSavePreferences() {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (p: Preferences) => apiFetch<Preferences>("/preferences", { method: "PUT", body: p }),
    onSuccess: (saved) => client.setQueryData(preferencesKey, saved),
  });
}
