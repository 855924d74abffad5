/** drizzle-orm 0.45 wraps driver errors: the PostgreSQL code is on `cause.code`. */
export function pgErrorCode(err: unknown): string | undefined {
  const e = err as { code?: unknown; cause?: { code?: unknown } } | null;
  const code = e?.cause?.code ?? e?.code;
  return typeof code === "string" ? code : undefined;
}

export const isUniqueViolation = (err: unknown): boolean => pgErrorCode(err) === "23505";
