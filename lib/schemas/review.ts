import { z } from "zod";

export const reviewSubjectTypes = ["run", "sweep"] as const;
export const reviewDecisions = ["approved", "changes-requested"] as const;

/** A review comment on a run or sweep, optionally with a decision. A request for changes must say what to change. */
export const reviewInputSchema = z
  .strictObject({
    subjectType: z.enum(reviewSubjectTypes),
    subjectId: z.string().trim().min(1, "required").max(100, "is not an id"),
    body: z.string().trim().max(5_000, "must be at most 5000 characters"),
    decision: z.enum(reviewDecisions).optional(),
  })
  .superRefine((v, ctx) => {
    if (!v.decision && !v.body) ctx.addIssue({ code: "custom", path: ["body"], message: "write a comment, or approve or request changes" });
    if (v.decision === "changes-requested" && !v.body) ctx.addIssue({ code: "custom", path: ["body"], message: "say what should change" });
  });
export type ReviewInput = z.output<typeof reviewInputSchema>;
