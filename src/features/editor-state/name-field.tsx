import { useState } from "react";
import { MAX_NAME_LENGTH } from "../../../shared/lifecycle";
import { Button } from "../../components/ui/button";

function nameProblem(name: string): string | null {
  const trimmed = name.trim();
  if (trimmed.length === 0) return "Give the life cycle a name.";
  if (trimmed.length > MAX_NAME_LENGTH) return `A name has at most ${MAX_NAME_LENGTH} characters.`;
  return null;
}

/** The life cycle's name as the page heading; editors rename it in place (Enter saves, Escape cancels). */
export function NameField({ name, readOnly, onRename }: { name: string; readOnly: boolean; onRename: (name: string) => void }) {
  const [draft, setDraft] = useState<string | null>(null);
  const problem = draft === null ? null : nameProblem(draft);

  if (readOnly || draft === null) {
    return (
      <div className="flex min-w-0 items-center gap-2">
        <h1 className="min-w-0 truncate text-2xl font-bold" title={name}>
          {name}
        </h1>
        {!readOnly && (
          <Button variant="quiet" size="sm" onClick={() => setDraft(name)}>
            Rename
          </Button>
        )}
      </div>
    );
  }

  const commit = () => {
    if (problem !== null || draft === null) return;
    if (draft.trim() !== name) onRename(draft.trim());
    setDraft(null);
  };

  return (
    <form
      className="flex min-w-0 flex-wrap items-start gap-2"
      onSubmit={(event) => {
        event.preventDefault();
        commit();
      }}
    >
      <h1 className="sr-only">{name}</h1>
      <div className="min-w-0">
        <label htmlFor="life-cycle-name" className="sr-only">
          Life-cycle name
        </label>
        <input
          id="life-cycle-name"
          autoFocus
          value={draft}
          maxLength={MAX_NAME_LENGTH + 20}
          onChange={(event) => setDraft(event.target.value)}
          onKeyDown={(event) => {
            if (event.key === "Escape") setDraft(null);
          }}
          aria-invalid={problem ? true : undefined}
          aria-describedby={problem ? "life-cycle-name-error" : undefined}
          className={`w-80 max-w-full rounded-md border bg-white px-2 py-1 text-xl font-bold ${problem ? "border-2 border-brick" : "border-ink/40"}`}
        />
        {problem && (
          <p id="life-cycle-name-error" className="mt-1 text-sm font-bold text-brick">
            <span aria-hidden="true">✕ </span>
            {problem}
          </p>
        )}
      </div>
      <Button type="submit" size="sm" disabled={problem !== null}>
        Save name
      </Button>
      <Button variant="secondary" size="sm" onClick={() => setDraft(null)}>
        Cancel
      </Button>
    </form>
  );
}
