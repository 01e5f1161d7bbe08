import { z } from "zod";

/**
 * Which CSV column holds which field. One schema for the concept, shared by the upload page,
 * the upload route and the worker. Column names are matched to the header after trimming,
 * ignoring case.
 */

/** Largest file accepted (a product limit, common practice, no source): about 400 000 call records. */
export const MAX_FILE_BYTES = 20 * 1024 * 1024;
/** Distinct route or group names kept; more suggests a wrong column. */
export const MAX_GROUPS = 200;
/** Rows shown in the mapping preview. */
export const PREVIEW_ROWS = 10;

export const OUTCOMES = ["answered", "blocked", "abandoned"] as const;
export type Outcome = (typeof OUTCOMES)[number];

const column = z.string().trim().min(1, "choose a column").max(200, "at most 200 characters");
/** A fixed UTC offset for timestamps written without one: "Z", "+01:00", "-05:30". */
export const utcOffsetSchema = z
  .string()
  .regex(/^(Z|[+-](0\d|1[0-4]):[0-5]\d)$/, 'must be "Z" or an offset like "+01:00"')
  .default("Z");

/** Minutes east of UTC of a schema-valid offset. */
export function parseUtcOffset(text: string): number {
  if (text === "Z") return 0;
  const sign = text[0] === "-" ? -1 : 1;
  return sign * (Number(text.slice(1, 3)) * 60 + Number(text.slice(4, 6)));
}

export const delimiterSchema = z.enum([",", ";", "\t", "|"]);

export const callRecordMappingSchema = z.strictObject({
  kind: z.literal("call-records"),
  start: column.describe("column with the call's start timestamp"),
  duration: column.describe("column with the holding time"),
  durationUnit: z.enum(["seconds", "minutes", "milliseconds"]).default("seconds"),
  outcome: column.optional().describe("column with answered / blocked / abandoned"),
  group: column.optional().describe("column with the route or group name"),
  timeZone: utcOffsetSchema.describe("UTC offset of timestamps written without one"),
  delimiter: delimiterSchema.optional(),
});

export const intervalCountMappingSchema = z.strictObject({
  kind: z.literal("interval-counts"),
  intervalStart: column.describe("column with the interval's start timestamp"),
  attempts: column.describe("column with the number of call attempts in the interval"),
  carried: column.optional().describe("column with the number of calls carried"),
  intervalMinutes: z.number().int("must be a whole number of minutes").refine((m) => [5, 10, 15, 20, 30, 60].includes(m), "must be 5, 10, 15, 20, 30 or 60"),
  meanHoldingSeconds: z.number().finite().gt(0, "must be > 0").max(86_400, "must be <= 86400").optional().describe("mean holding time, to turn attempts into offered traffic"),
  timeZone: utcOffsetSchema,
  delimiter: delimiterSchema.optional(),
});

export const columnMappingSchema = z
  .discriminatedUnion("kind", [callRecordMappingSchema, intervalCountMappingSchema])
  .superRefine((m, ctx) => {
    const used = new Map<string, string>();
    for (const [field, value] of Object.entries(m)) {
      if (["kind", "durationUnit", "timeZone", "delimiter", "intervalMinutes", "meanHoldingSeconds"].includes(field) || typeof value !== "string") continue;
      const key = value.trim().toLowerCase();
      const other = used.get(key);
      if (other) ctx.addIssue({ code: "custom", path: [field], message: `the column "${value}" is already mapped to ${other}` });
      else used.set(key, field);
    }
  });

export type ColumnMapping = z.infer<typeof columnMappingSchema>;
export type ColumnMappingInput = z.input<typeof columnMappingSchema>;
export type CallRecordMapping = z.infer<typeof callRecordMappingSchema>;
export type IntervalCountMapping = z.infer<typeof intervalCountMappingSchema>;

/** The mapped fields of a kind, in header-check order, with their labels for messages. */
export function mappedColumns(m: ColumnMapping): Array<{ field: string; column: string; required: boolean }> {
  const list =
    m.kind === "call-records"
      ? [
          { field: "start", column: m.start, required: true },
          { field: "duration", column: m.duration, required: true },
          { field: "outcome", column: m.outcome, required: false },
          { field: "group", column: m.group, required: false },
        ]
      : [
          { field: "intervalStart", column: m.intervalStart, required: true },
          { field: "attempts", column: m.attempts, required: true },
          { field: "carried", column: m.carried, required: false },
        ];
  return list.filter((c): c is { field: string; column: string; required: boolean } => c.column !== undefined);
}
