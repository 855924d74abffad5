/**
 * A compact input for tables that edit a document: the person types freely,
 * the check runs on every keystroke and its message sits under the input,
 * and the value is committed on Enter or when focus leaves, only if it
 * passes. Escape puts back the committed value. While nobody is typing, the
 * input shows the committed value, so undo and other people's changes show.
 */
import { type InputHTMLAttributes, type KeyboardEvent, type Ref, useId, useState } from "react";

export interface CommitCheck {
  /** Blocks the commit; shown in brick with ✕. */
  error?: string | null | undefined;
  /** Does not block; shown in ochre-bordered text with "!". */
  warning?: string | null | undefined;
}

type CommitInputProps = Omit<InputHTMLAttributes<HTMLInputElement>, "value" | "onChange" | "defaultValue"> & {
  /** The committed value as text. */
  value: string;
  /** Accessible name (the table header says it visually). */
  label: string;
  /** Runs on every keystroke. */
  check?: (text: string) => CommitCheck;
  /** Called with text that passed the check and differs from `value`. */
  onCommit: (text: string) => void;
  /** A warning about the committed value (shown when not typing). */
  warning?: string | null | undefined;
  ref?: Ref<HTMLInputElement>;
  inputClassName?: string;
};

export function CommitInput({ value, label, check, onCommit, warning, className = "", inputClassName = "", ref, onBlur, onKeyDown, ...rest }: CommitInputProps) {
  const [draft, setDraft] = useState<string | null>(null);
  const id = useId();
  const text = draft ?? value;
  const result = draft === null ? {} : (check?.(draft) ?? {});
  const error = result.error ?? null;
  const shownWarning = error ? null : (result.warning ?? (draft === null ? warning : null) ?? null);

  function commit() {
    if (draft === null) return;
    if (error) return; // keep the draft and its message until it is fixed or abandoned
    if (draft !== value) onCommit(draft);
    setDraft(null);
  }

  function keyDown(event: KeyboardEvent<HTMLInputElement>) {
    if (event.key === "Enter") {
      event.preventDefault();
      commit();
    } else if (event.key === "Escape" && draft !== null) {
      event.preventDefault();
      setDraft(null);
    }
    onKeyDown?.(event);
  }

  const describedBy = error ? `${id}-error` : shownWarning ? `${id}-warning` : undefined;
  return (
    <div className={`min-w-0 ${className}`.trim()}>
      <input
        ref={ref}
        aria-label={label}
        aria-invalid={error ? true : undefined}
        aria-describedby={describedBy}
        value={text}
        onChange={(event) => setDraft(event.target.value)}
        onBlur={(event) => {
          commit();
          onBlur?.(event);
        }}
        onKeyDown={keyDown}
        className={`block w-full rounded border bg-white px-2 py-1 text-ink tabular-nums placeholder:text-ink/60 ${
          error ? "border-2 border-brick" : shownWarning ? "border-2 border-ochre" : "border-ink/35"
        } ${inputClassName}`.trim()}
        {...rest}
      />
      {error && (
        <p id={`${id}-error`} className="mt-1 text-xs font-bold text-brick">
          <span aria-hidden="true">✕ </span>
          {error}
        </p>
      )}
      {shownWarning && (
        <p id={`${id}-warning`} className="mt-1 text-xs text-ink">
          <span aria-hidden="true" className="font-bold text-ochre">! </span>
          <span className="sr-only">Warning: </span>
          {shownWarning}
        </p>
      )}
    </div>
  );
}
