import { z } from "zod";

/** Every error response of /api/v1 has this shape. */
export const ApiErrorSchema = z.object({
  error: z.object({
    /** Short machine-readable code: bad_request, unauthorized, forbidden, not_found, conflict, too_many_requests, internal. */
    code: z.string(),
    message: z.string(),
    /** Field problems, each with the dotted path of the field (e.g. "transitions.3.to"). */
    fields: z.array(z.object({ path: z.string(), message: z.string() })).optional(),
  }),
});
export type ApiError = z.infer<typeof ApiErrorSchema>;
