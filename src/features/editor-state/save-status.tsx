import { Button } from "../../components/ui/button";
import { Spinner } from "../../components/ui/spinner";
import type { SaveState } from "./use-life-cycle-editor";

/** "Saved · version 7", "Saving…", "Unsaved changes", or why it is not saved; announced politely. */
export function SaveStatus({ save, version, onSaveNow }: { save: SaveState; version: number; onSaveNow: () => void }) {
  return (
    <div role="status" aria-live="polite" className="flex min-w-0 items-center gap-2 text-sm" data-save-status={save.status}>
      {save.status === "saved" && (
        <span>
          <span aria-hidden="true" className="text-spruce">
            ✓{" "}
          </span>
          Saved · version {version}
        </span>
      )}
      {save.status === "saving" && (
        <span className="inline-flex items-center gap-1.5">
          <Spinner className="size-3.5" />
          Saving…
        </span>
      )}
      {save.status === "unsaved" && (
        <span>
          <span aria-hidden="true" className="text-ochre">
            ●{" "}
          </span>
          Unsaved changes
        </span>
      )}
      {save.status === "invalid" && (
        <span className="min-w-0 text-brick">
          <span className="font-bold">Not saved:</span> {save.message}
        </span>
      )}
      {save.status === "failed" && (
        <span className="flex min-w-0 flex-wrap items-center gap-2 text-brick">
          <span>
            <span className="font-bold">Not saved:</span> {save.message} Trying again shortly.
          </span>
          <Button size="sm" variant="secondary" onClick={onSaveNow}>
            Save now
          </Button>
        </span>
      )}
      {save.status === "conflict" && <span className="font-bold text-brick">Not saved: someone else saved first</span>}
    </div>
  );
}
