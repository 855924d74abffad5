import { z } from "zod";

export const PAPER_SIZES = ["a4", "letter"] as const;
export const PaperSchema = z.enum(PAPER_SIZES, { error: "The paper is “a4” or “letter”." });
export type Paper = z.infer<typeof PaperSchema>;

/** Query of the report routes: which snapshot (default: the saved state now) and, for the PDF, the paper size. */
export const ReportQuerySchema = z.object({
  snapshot: z.uuid({ error: "The snapshot is the id of one of this life cycle's snapshots." }).optional(),
  paper: PaperSchema.default("a4"),
});
export type ReportQuery = z.infer<typeof ReportQuerySchema>;
