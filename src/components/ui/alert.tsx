import type { ReactNode } from "react";

export type AlertTone = "error" | "warning" | "success" | "info";

// Colour is never the only signal: each tone also has its own mark and the words say what happened.
const tones: Record<AlertTone, { box: string; mark: string; label: string }> = {
  error: { box: "border-brick bg-brick/10", mark: "✕", label: "Error" },
  warning: { box: "border-ochre bg-ochre/10", mark: "!", label: "Warning" },
  success: { box: "border-spruce bg-spruce/10", mark: "✓", label: "Done" },
  info: { box: "border-indigo bg-indigo/10", mark: "i", label: "Note" },
};

type AlertProps = {
  tone?: AlertTone;
  title?: ReactNode;
  children?: ReactNode;
  /** Errors interrupt (role="alert"); everything else is announced politely. */
  live?: boolean;
  className?: string;
};

export function Alert({ tone = "info", title, children, live = true, className = "" }: AlertProps) {
  const style = tones[tone];
  const role = live ? (tone === "error" ? "alert" : "status") : undefined;
  return (
    <div role={role} className={`flex gap-3 rounded-md border-l-4 px-4 py-3 text-ink ${style.box} ${className}`.trim()}>
      <span aria-hidden="true" className="mt-0.5 inline-flex size-5 shrink-0 items-center justify-center rounded-full border border-current text-xs font-bold">
        {style.mark}
      </span>
      <div className="min-w-0 space-y-1">
        <span className="sr-only">{style.label}: </span>
        {title && <p className="font-bold">{title}</p>}
        {children && <div className="break-words">{children}</div>}
      </div>
    </div>
  );
}
