/**
 * Labelled form controls. Every control has a visible <label>; a field error
 * sits right under its control, is tied to it with aria-describedby and marks
 * it aria-invalid, so it is read out when the control gets focus.
 * `ref` is a plain prop in React 19, so `{...register("name")}` spreads in directly.
 */
import { type InputHTMLAttributes, type ReactNode, type Ref, type SelectHTMLAttributes, type TextareaHTMLAttributes, useId } from "react";

const controlBase =
  "block w-full rounded-md border bg-white px-3 py-2 text-ink placeholder:text-ink/70 " +
  "disabled:cursor-not-allowed disabled:bg-ink/5";

function controlClasses(hasError: boolean, extra = "") {
  return `${controlBase} ${hasError ? "border-brick border-2" : "border-ink/40"} ${extra}`.trim();
}

type FieldFrameProps = {
  id: string;
  label: string;
  error?: string;
  description?: ReactNode;
  hideLabel?: boolean;
  children: ReactNode;
  className?: string;
};

function FieldFrame({ id, label, error, description, hideLabel, children, className = "" }: FieldFrameProps) {
  return (
    <div className={`space-y-1 ${className}`.trim()}>
      <label htmlFor={id} className={hideLabel ? "sr-only" : "block font-bold"}>
        {label}
      </label>
      {children}
      {description && (
        <p id={`${id}-description`} className="text-sm text-ink/75">
          {description}
        </p>
      )}
      {error && (
        <p id={`${id}-error`} className="text-sm font-bold text-brick">
          <span aria-hidden="true">✕ </span>
          {error}
        </p>
      )}
    </div>
  );
}

function describedBy(id: string, error?: string, description?: ReactNode) {
  const ids = [description ? `${id}-description` : null, error ? `${id}-error` : null].filter(Boolean);
  return ids.length ? ids.join(" ") : undefined;
}

type Common = { label: string; error?: string; description?: ReactNode; hideLabel?: boolean; fieldClassName?: string };

export type TextFieldProps = Common & InputHTMLAttributes<HTMLInputElement> & { ref?: Ref<HTMLInputElement> };

export function TextField({ label, error, description, hideLabel, fieldClassName, id, className, ref, ...input }: TextFieldProps) {
  const autoId = useId();
  const inputId = id ?? autoId;
  return (
    <FieldFrame id={inputId} label={label} error={error} description={description} hideLabel={hideLabel} className={fieldClassName}>
      <input
        ref={ref}
        id={inputId}
        aria-invalid={error ? true : undefined}
        aria-describedby={describedBy(inputId, error, description)}
        className={controlClasses(Boolean(error), className)}
        {...input}
      />
    </FieldFrame>
  );
}

export type TextAreaFieldProps = Common & TextareaHTMLAttributes<HTMLTextAreaElement> & { ref?: Ref<HTMLTextAreaElement> };

export function TextAreaField({ label, error, description, hideLabel, fieldClassName, id, className, ref, ...textarea }: TextAreaFieldProps) {
  const autoId = useId();
  const inputId = id ?? autoId;
  return (
    <FieldFrame id={inputId} label={label} error={error} description={description} hideLabel={hideLabel} className={fieldClassName}>
      <textarea
        ref={ref}
        id={inputId}
        rows={3}
        aria-invalid={error ? true : undefined}
        aria-describedby={describedBy(inputId, error, description)}
        className={controlClasses(Boolean(error), className)}
        {...textarea}
      />
    </FieldFrame>
  );
}

export type SelectFieldProps = Common & SelectHTMLAttributes<HTMLSelectElement> & { ref?: Ref<HTMLSelectElement> };

export function SelectField({ label, error, description, hideLabel, fieldClassName, id, className, ref, children, ...select }: SelectFieldProps) {
  const autoId = useId();
  const inputId = id ?? autoId;
  return (
    <FieldFrame id={inputId} label={label} error={error} description={description} hideLabel={hideLabel} className={fieldClassName}>
      <select
        ref={ref}
        id={inputId}
        aria-invalid={error ? true : undefined}
        aria-describedby={describedBy(inputId, error, description)}
        className={controlClasses(Boolean(error), className)}
        {...select}
      >
        {children}
      </select>
    </FieldFrame>
  );
}
