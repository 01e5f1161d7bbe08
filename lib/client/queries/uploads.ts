"use client";

import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { apiFetch, ApiError, workspacePath, type ApiErrorBody } from "../api";
import { livePollMs } from "./keys";
import { isUploadFinished, type MakeUploadScenario, type UploadDetail, type UploadScenarioMade, type UploadStatus, type UploadSummary } from "@/lib/measurement/uploads";
import type { ColumnMappingInput } from "@/lib/measurement";

export const uploadKeys = {
  all: (ws: string) => ["ws", ws, "uploads"] as const,
  one: (ws: string, id: string) => ["ws", ws, "uploads", "one", id] as const,
};

const live = (status: UploadStatus | undefined) => status !== undefined && !isUploadFinished(status);

/** The workspace's uploads; polls while any is still being characterised. */
export function useUploads(ws: string) {
  return useQuery({
    queryKey: uploadKeys.all(ws),
    queryFn: ({ signal }) => apiFetch<{ items: UploadSummary[] }>(workspacePath(ws, "/uploads"), { signal }),
    refetchInterval: (q) => (q.state.data?.items.some((u) => live(u.status)) ? livePollMs * 2 : false),
  });
}

/** One upload with its characterisation; polls every second until it is ready or failed. */
export function useUpload(ws: string, id: string) {
  return useQuery({
    queryKey: uploadKeys.one(ws, id),
    queryFn: ({ signal }) => apiFetch<UploadDetail>(workspacePath(ws, `/uploads/${id}`), { signal }),
    refetchInterval: (q) => (live(q.state.data?.status) ? livePollMs : false),
  });
}

/** POST the file as multipart (apiFetch speaks JSON only); refusals come back as ApiError with the line. */
export function useCreateUpload(ws: string) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: async ({ file, mapping }: { file: File; mapping: ColumnMappingInput }) => {
      const form = new FormData();
      form.set("file", file);
      form.set("mapping", JSON.stringify(mapping));
      let response: Response;
      try {
        response = await fetch(`/api/v1${workspacePath(ws, "/uploads")}`, { method: "POST", body: form, credentials: "same-origin", headers: { accept: "application/json" } });
      } catch {
        throw new ApiError({ status: 0, code: "network", message: "The server could not be reached; check your connection and try again." });
      }
      const body = (await response.json().catch(() => undefined)) as { id: string; status: UploadStatus } | { error: ApiErrorBody } | undefined;
      if (!response.ok) {
        if (body && "error" in body) throw new ApiError(body.error);
        throw new ApiError({ status: response.status, code: "http", message: `The server answered ${response.status} ${response.statusText}.` });
      }
      return body as { id: string; status: UploadStatus };
    },
    onSuccess: () => client.invalidateQueries({ queryKey: uploadKeys.all(ws) }),
  });
}

export function useMakeUploadScenario(ws: string, id: string) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (body: MakeUploadScenario) => apiFetch<UploadScenarioMade>(workspacePath(ws, `/uploads/${id}/scenario`), { method: "POST", body }),
    onSuccess: () => client.invalidateQueries({ queryKey: ["ws", ws, "scenarios"] }),
  });
}
