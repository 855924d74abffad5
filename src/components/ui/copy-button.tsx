import { useEffect, useState } from "react";
import { Button } from "./button";

/** Copies a value to the clipboard and says so (in words, announced politely). */
export function CopyButton({ value, label = "Copy" }: { value: string; label?: string }) {
  const [state, setState] = useState<"idle" | "copied" | "failed">("idle");

  useEffect(() => {
    if (state === "idle") return;
    const timer = window.setTimeout(() => setState("idle"), 4000);
    return () => window.clearTimeout(timer);
  }, [state]);

  async function copy() {
    try {
      await navigator.clipboard.writeText(value);
      setState("copied");
    } catch {
      setState("failed");
    }
  }

  return (
    <span className="inline-flex items-center gap-2">
      <Button variant="secondary" size="sm" onClick={copy}>
        {label}
      </Button>
      <span role="status" className="text-sm text-ink/80">
        {state === "copied" ? "Copied." : state === "failed" ? "Could not copy: select the text and copy it by hand." : ""}
      </span>
    </span>
  );
}
