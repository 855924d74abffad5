import { Button } from "../../components/ui/button";

const isMac = typeof navigator !== "undefined" && /Mac|iPhone|iPad/.test(navigator.platform);
const mod = isMac ? "⌘" : "Ctrl+";

type UndoRedoProps = {
  canUndo: boolean;
  canRedo: boolean;
  undoLabel: string | null;
  redoLabel: string | null;
  onUndo: () => void;
  onRedo: () => void;
};

/** Undo and Redo, each naming the step it acts on and its shortcut. */
export function UndoRedoButtons({ canUndo, canRedo, undoLabel, redoLabel, onUndo, onRedo }: UndoRedoProps) {
  return (
    <div className="flex gap-1" role="group" aria-label="Undo history">
      <Button
        variant="secondary"
        size="sm"
        onClick={onUndo}
        disabled={!canUndo}
        title={canUndo ? `Undo “${undoLabel}” (${mod}Z)` : "Nothing to undo"}
        aria-keyshortcuts={isMac ? "Meta+Z" : "Control+Z"}
      >
        <span aria-hidden="true">↶</span> Undo
      </Button>
      <Button
        variant="secondary"
        size="sm"
        onClick={onRedo}
        disabled={!canRedo}
        title={canRedo ? `Redo “${redoLabel}” (${mod}Shift+Z)` : "Nothing to redo"}
        aria-keyshortcuts={isMac ? "Meta+Shift+Z" : "Control+Shift+Z"}
      >
        <span aria-hidden="true">↷</span> Redo
      </Button>
    </div>
  );
}
