import type { ReactNode } from "react";

export function Badge({ children, tone = "neutral" }: { children: ReactNode; tone?: "neutral" | "accent" | "warning" }) {
  const style = {
    neutral: "border-ink/25 bg-ink/5",
    accent: "border-indigo/40 bg-indigo/10",
    warning: "border-ochre bg-ochre/15",
  }[tone];
  return <span className={`inline-flex items-center rounded-full border px-2 py-0.5 text-xs font-bold text-ink ${style}`}>{children}</span>;
}
