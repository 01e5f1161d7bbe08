"use client";

import { keepPreviousData, useQuery } from "@tanstack/react-query";
import { parseScenario, planRunLengthInSlices } from "@/lib/simulation";
import { queryKeys } from "./keys";
import { useDebounced } from "./references";

/** A macrotask break between pilot slices, so typing and painting go on while the pilot runs. */
const pause = () => new Promise<void>((resolve) => setTimeout(resolve, 0));

/**
 * About how many calls and seconds the requested precision needs, for the scenario being edited (run-length.ts).
 * Computed in the browser (a closed form for the Erlang model, else a pilot of a few hundred thousand calls in
 * slices): the web server never simulates. Debounced; a plan whose inputs changed meanwhile is abandoned
 * (TanStack Query aborts the signal of a query nobody observes). `scenario` is null while the form does not validate.
 */
export function useRunLengthPlan(scenario: unknown | null, relativeHalfWidth: number | undefined, debounceMs = 600) {
  const ready = scenario !== null && typeof relativeHalfWidth === "number" && relativeHalfWidth > 0 && relativeHalfWidth < 1;
  const settled = useDebounced(ready ? JSON.stringify([scenario, relativeHalfWidth]) : null, debounceMs);
  return useQuery({
    queryKey: queryKeys.runLengthPlan(settled),
    queryFn: ({ signal }) => {
      const [input, r] = JSON.parse(settled!) as [unknown, number];
      return planRunLengthInSlices(parseScenario(input), { relativeHalfWidth: r }, { pause, signal });
    },
    enabled: settled !== null,
    placeholderData: keepPreviousData,
    staleTime: Infinity,
    retry: false,
  });
}
