// The scenario editor's model: defaults per arrival process and per law, the labels, units and help of every
// parameter, and how form values become a scenario. Pure (no React), so it is unit-tested on its own.
import { z } from "zod";
import { lawMean, scenarioErrorMap, scenarioFieldErrors, scenarioSchema, type Arrivals, type BatchSizeLaw, type Law, type ScenarioInput } from "../simulation";

export const scenarioMetaSchema = z.object({
  name: z.string().trim().min(1, "required").max(120, "must be at most 120 characters"),
  description: z.string().max(2_000, "must be at most 2000 characters"),
  note: z.string().max(500, "must be at most 500 characters"),
});

/** What the editor holds: the scenario as typed plus its name and the note for the new revision. */
export const scenarioFormSchema = scenarioMetaSchema.extend({ scenario: scenarioSchema });
export type ScenarioFormValues = z.input<typeof scenarioFormSchema>;

/** Parse options that give the form the API's wording (lib/simulation/scenario.ts `scenarioErrorMap`). */
export const scenarioParseOptions = { error: scenarioErrorMap } as const;

/** Form paths (`scenario.servers`) -> message for a scenario as typed; empty when it validates. */
export function scenarioFormErrors(scenario: unknown): Record<string, string> {
  const parsed = scenarioSchema.safeParse(scenario, scenarioParseOptions);
  if (parsed.success) return {};
  return Object.fromEntries(Object.entries(scenarioFieldErrors(parsed.error.issues)).map(([k, v]) => [`scenario.${k}`, v]));
}

/** An API error's field keys, placed on the editor's fields (scenario paths come back relative to the scenario). */
export function apiFieldsToForm(fields: Record<string, string>): Record<string, string> {
  const out: Record<string, string> = {};
  for (const [raw, message] of Object.entries(fields)) {
    const key = raw.replace(/\[(\d+)\]/g, ".$1");
    const formKey = key in scenarioMetaSchema.shape || key.startsWith("scenario.") || key === "scenario" ? key : `scenario.${key}`;
    out[formKey] = message;
  }
  return out;
}

export const defaultScenario: ScenarioInput = {
  servers: 30,
  waitingPositions: 0,
  arrivals: { process: "poisson", rate: 24 },
  holding: { law: "exponential", mean: 1 },
  run: { seed: 1, replications: 10, callsPerReplication: 100_000, warmupCalls: 10_000, confidence: 0.95 },
};

type Process = Arrivals["process"];

/** Each process with its label, help and a default that offers about the same mean load (24 E at mean holding 1). */
export const arrivalProcesses: Record<Process, { label: string; help: string; make: () => Arrivals }> = {
  poisson: { label: "Poisson", help: "Calls arrive independently at a constant mean rate (the Erlang B assumption).", make: () => ({ process: "poisson", rate: 24 }) },
  "on-off": {
    label: "Bursty on-off",
    help: "The source alternates between bursts at the on-rate and silences; exponential on and off periods.",
    make: () => ({ process: "on-off", onRate: 48, meanOn: 1, meanOff: 1 }),
  },
  mmpp: {
    label: "Markov-modulated (MMPP)",
    help: "The arrival rate follows a hidden phase that changes at the given rates: phase i moves to phase j at rate q(i, j).",
    make: () => ({ process: "mmpp", rates: [36, 12], switching: [[0, 0.5], [0.5, 0]] }),
  },
  renewal: {
    label: "Renewal (any interarrival law)",
    help: "Independent, identically distributed gaps between calls, drawn from the law you choose.",
    make: () => ({ process: "renewal", interarrival: { law: "hyperexponential", mean: 1 / 24, scv: 4 } }),
  },
  batch: {
    label: "Batches",
    help: "Groups of calls arrive together (Poisson batch instants); congestion is counted per call.",
    make: () => ({ process: "batch", rate: 8, batchSize: { law: "geometric", mean: 3 }, admission: "partial" }),
  },
  overflow: {
    label: "Overflow from primary groups",
    help: "Poisson traffic offered to primary groups; what they refuse overflows to the group under study. Servers 0 offers a stream directly.",
    make: () => ({ process: "overflow", primaries: [{ traffic: 30, servers: 24 }, { traffic: 20, servers: 15 }] }),
  },
  "finite-source": {
    label: "Finite sources",
    help: "A limited population; each idle source calls at the idle rate, busy ones do not (the Engset assumption).",
    make: () => ({ process: "finite-source", sources: 40, idleRate: 1.5 }),
  },
  "time-varying": {
    label: "Time-varying profile",
    help: "A repeating, piecewise-constant rate profile (for example a busy hour between quieter periods).",
    make: () => ({ process: "time-varying", profile: [{ duration: 1, rate: 12 }, { duration: 1, rate: 36 }] }),
  },
};
export const processOrder = Object.keys(arrivalProcesses) as Process[];

export type ParamKind = "time" | "rate" | "ratio" | "count" | "list-time" | "list-probability" | "list-count";

export interface ParamSpec {
  key: string;
  label: string;
  unit?: string;
  kind: ParamKind;
  help?: string;
}

type LawName = Law["law"];

export interface LawSpec {
  label: string;
  help: string;
  /** Alternative parameter sets; the first is the one new laws start with. */
  forms: { id: string; label: string; params: ParamSpec[]; make: (mean: number) => Law }[];
}

const meanParam: ParamSpec = { key: "mean", label: "Mean", unit: "time units", kind: "time" };
const cvParam: ParamSpec = { key: "cv", label: "Coefficient of variation", kind: "ratio", help: "Standard deviation / mean (1 for the exponential)." };

export const lawSpecs: Record<LawName, LawSpec> = {
  exponential: { label: "Exponential", help: "Memoryless; coefficient of variation 1.", forms: [{ id: "mean", label: "Mean", params: [meanParam], make: (m) => ({ law: "exponential", mean: m }) }] },
  deterministic: {
    label: "Constant",
    help: "Every time is the same.",
    forms: [{ id: "value", label: "Value", params: [{ key: "value", label: "Value", unit: "time units", kind: "time" }], make: (m) => ({ law: "deterministic", value: m }) }],
  },
  erlang: {
    label: "Erlang-k",
    help: "Sum of k exponential stages; less variable than the exponential (cv = 1/√k).",
    forms: [{ id: "k", label: "Stages and mean", params: [{ key: "k", label: "Stages k", kind: "count" }, meanParam], make: (m) => ({ law: "erlang", k: 2, mean: m }) }],
  },
  hyperexponential: {
    label: "Hyperexponential",
    help: "A mix of exponentials; more variable than the exponential (squared cv ≥ 1).",
    forms: [
      {
        id: "balanced",
        label: "Mean and squared cv (balanced means)",
        params: [meanParam, { key: "scv", label: "Squared coefficient of variation", kind: "ratio", help: "Variance / mean²; at least 1." }],
        make: (m) => ({ law: "hyperexponential", mean: m, scv: 4 }),
      },
      {
        id: "branches",
        label: "Branch probabilities and means",
        params: [
          { key: "probabilities", label: "Branch probabilities", kind: "list-probability", help: "Comma-separated; they must sum to 1." },
          { key: "means", label: "Branch means", unit: "time units", kind: "list-time", help: "One per probability." },
        ],
        make: (m) => ({ law: "hyperexponential", probabilities: [0.9, 0.1], means: [m / 2, 5.5 * m] }),
      },
    ],
  },
  lognormal: { label: "Lognormal", help: "Right-skewed; set by its mean and coefficient of variation.", forms: [{ id: "mean-cv", label: "Mean and cv", params: [meanParam, cvParam], make: (m) => ({ law: "lognormal", mean: m, cv: 1.5 }) }] },
  gamma: { label: "Gamma", help: "Set by its mean and coefficient of variation.", forms: [{ id: "mean-cv", label: "Mean and cv", params: [meanParam, cvParam], make: (m) => ({ law: "gamma", mean: m, cv: 0.5 }) }] },
  weibull: {
    label: "Weibull",
    help: "Set by mean and cv, or by shape and scale.",
    forms: [
      { id: "mean-cv", label: "Mean and cv", params: [meanParam, cvParam], make: (m) => ({ law: "weibull", mean: m, cv: 1.5 }) },
      {
        id: "shape-scale",
        label: "Shape and scale",
        params: [
          { key: "shape", label: "Shape", kind: "ratio" },
          { key: "scale", label: "Scale", unit: "time units", kind: "time" },
        ],
        make: (m) => ({ law: "weibull", shape: 1.5, scale: m }),
      },
    ],
  },
  pareto: {
    label: "Pareto",
    help: "Heavy-tailed; the variance is infinite for shape ≤ 2, so intervals need many replications.",
    forms: [{ id: "mean-shape", label: "Mean and shape", params: [meanParam, { key: "shape", label: "Shape", kind: "ratio", help: "Greater than 1." }], make: (m) => ({ law: "pareto", mean: m, shape: 2.5 }) }],
  },
  uniform: {
    label: "Uniform",
    help: "Equally likely anywhere between min and max.",
    forms: [
      {
        id: "range",
        label: "Range",
        params: [
          { key: "min", label: "Min", unit: "time units", kind: "time" },
          { key: "max", label: "Max", unit: "time units", kind: "time" },
        ],
        make: (m) => ({ law: "uniform", min: 0, max: 2 * m }),
      },
    ],
  },
  empirical: {
    label: "Measured samples",
    help: "Resampled with replacement from the values you give (for example measured holding times).",
    forms: [{ id: "samples", label: "Samples", params: [{ key: "samples", label: "Samples", unit: "time units", kind: "list-time", help: "Comma- or space-separated." }], make: (m) => ({ law: "empirical", samples: [m / 2, m, 1.5 * m] }) }],
  },
};
export const lawOrder = Object.keys(lawSpecs) as LawName[];

/** Which parameter set a law value uses (the first whose keys it has). */
export function lawForm(law: Partial<Law> & { law: LawName }) {
  const spec = lawSpecs[law.law];
  return spec.forms.find((f) => f.params.every((p) => p.key in law)) ?? spec.forms[0];
}

/** The mean of a law as typed, or `fallback` when it cannot be computed yet. */
export function safeLawMean(law: unknown, fallback: number): number {
  try {
    const m = lawMean(law as Law);
    return Number.isFinite(m) && m > 0 ? m : fallback;
  } catch {
    return fallback;
  }
}

export const batchSizeSpecs: Record<BatchSizeLaw["law"], { label: string; params: ParamSpec[]; make: () => BatchSizeLaw }> = {
  geometric: { label: "Geometric", params: [{ key: "mean", label: "Mean batch size", unit: "calls", kind: "ratio" }], make: () => ({ law: "geometric", mean: 3 }) },
  fixed: { label: "Fixed", params: [{ key: "value", label: "Batch size", unit: "calls", kind: "count" }], make: () => ({ law: "fixed", value: 3 }) },
  uniform: {
    label: "Uniform",
    params: [
      { key: "min", label: "Smallest batch", unit: "calls", kind: "count" },
      { key: "max", label: "Largest batch", unit: "calls", kind: "count" },
    ],
    make: () => ({ law: "uniform", min: 1, max: 5 }),
  },
  empirical: {
    label: "Given sizes",
    params: [
      { key: "values", label: "Sizes", unit: "calls", kind: "list-count" },
      { key: "probabilities", label: "Probabilities", kind: "list-probability", help: "One per size; they must sum to 1." },
    ],
    make: () => ({ law: "empirical", values: [1, 2, 4], probabilities: [0.5, 0.3, 0.2] }),
  },
};

/** "1, 2.5 3" -> [1, 2.5, 3]; unreadable entries become NaN so the schema names them. */
export function parseNumberList(text: string): number[] {
  const parts = text.split(/[\s,;]+/).filter(Boolean);
  return parts.map((p) => (/^[-+]?(\d+\.?\d*|\.\d+)(e[-+]?\d+)?$/i.test(p) ? Number(p) : Number.NaN));
}

export const formatNumberList = (values: unknown): string => (Array.isArray(values) ? values.join(", ") : "");

/** "" -> undefined (the schema then says "required"); anything else -> a number (NaN when unreadable). */
export const numberOrUndefined = (value: unknown): number | undefined => {
  if (value === "" || value === null || value === undefined) return undefined;
  if (typeof value === "number") return value;
  const n = Number(value);
  return Number.isFinite(n) ? n : undefined;
};

/** Reads a scenario file's text for import; errors name the line or field. */
export function readScenarioFile(text: string): { ok: true; scenario: ScenarioInput } | { ok: false; message: string; fields?: Record<string, string> } {
  let json: unknown;
  try {
    json = JSON.parse(text);
  } catch (error) {
    return { ok: false, message: `The file is not valid JSON: ${(error as Error).message}` };
  }
  if (!json || typeof json !== "object" || Array.isArray(json)) return { ok: false, message: "The file must hold one scenario object." };
  const fields = scenarioFormErrors(json);
  const count = Object.keys(fields).length;
  if (count) {
    const [first, message] = Object.entries(fields)[0];
    return { ok: false, message: `${first.replace(/^scenario\./, "")}: ${message}${count > 1 ? ` (and ${count - 1} more)` : ""}`, fields };
  }
  return { ok: true, scenario: json as ScenarioInput };
}
