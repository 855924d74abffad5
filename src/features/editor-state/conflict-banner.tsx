import type { LifeCycle } from "../../../shared/lifecycle";
import { MAX_LIFE_CYCLE_NAME_LENGTH } from "../../../shared/schemas/life-cycles";
import { type LifeCycleRecord, useCreateLifeCycle } from "../../api/life-cycles";
import { Alert } from "../../components/ui/alert";
import { Button } from "../../components/ui/button";
import { RelativeTime } from "../../components/ui/time";

const COPY_SUFFIX = " (my copy)";

/** The name of the copy that keeps one's own edits: the life cycle's name and a suffix, within the length limit. */
export function copyName(name: string): string {
  return `${name.slice(0, MAX_LIFE_CYCLE_NAME_LENGTH - COPY_SUFFIX.length).trimEnd()}${COPY_SUFFIX}`;
}

type ConflictBannerProps = {
  studyId: string;
  /** What the server holds now (someone else's save). */
  current: LifeCycleRecord;
  /** The version this editor's edits started from. */
  myVersion: number;
  /** This editor's document, not saved. */
  mine: LifeCycle;
  onReload: () => void;
  onCopied: (copy: LifeCycleRecord) => void;
};

/**
 * Someone saved the life cycle after this editor loaded it. Nothing is
 * overwritten: take their version, or keep these edits as a new life cycle.
 */
export function ConflictBanner({ studyId, current, myVersion, mine, onReload, onCopied }: ConflictBannerProps) {
  const create = useCreateLifeCycle(studyId);
  const who = current.updatedBy ?? "Someone";

  return (
    <Alert tone="warning" title={`${who} saved version ${current.version} of this life cycle while you were editing.`}>
      <p>
        Their save (<RelativeTime iso={current.updatedAt} />) came after version {myVersion}, which your changes build on, so your
        changes are not saved. Nothing has been overwritten.
      </p>
      <div className="mt-3 flex flex-wrap gap-2">
        <Button variant="secondary" onClick={onReload} disabled={create.isPending}>
          Reload their version
        </Button>
        <Button
          pending={create.isPending}
          onClick={() => create.mutate({ document: { ...mine, name: copyName(mine.name) } }, { onSuccess: onCopied })}
        >
          Keep mine as a copy
        </Button>
      </div>
      <p className="mt-2 text-sm text-ink/80">
        “Reload their version” drops your unsaved changes. “Keep mine as a copy” saves them as a new life cycle named “{copyName(mine.name)}”
        and opens it; their version stays as it is.
      </p>
      {create.isError && (
        <p className="mt-2 text-sm font-bold text-brick" role="alert">
          The copy was not saved: {create.error.message}
        </p>
      )}
    </Alert>
  );
}
