/**
 * Puts a server answer back into a react-hook-form form: each field problem
 * goes under the field it names (the server uses the payload's field names,
 * which are also the form's), and whatever belongs to no visible field comes
 * back as the server's own message for the top of the form (it already
 * names the problem; the field's short message would only repeat it).
 */
import type { FieldValues, Path, UseFormSetError } from "react-hook-form";
import { isApiError } from "../api/client";

export function applyServerErrors<T extends FieldValues>(
  error: unknown,
  setError: UseFormSetError<T>,
  fieldNames: readonly Path<T>[],
): string | null {
  if (!isApiError(error)) return error instanceof Error ? error.message : "Something went wrong. Try again.";

  const known = new Set<string>(fieldNames);
  let placed = 0;
  for (const field of error.fields) {
    if (!known.has(field.path)) continue;
    setError(field.path as Path<T>, { type: "server", message: field.message }, { shouldFocus: placed === 0 });
    placed += 1;
  }
  return placed > 0 && placed === error.fields.length ? null : error.message;
}
