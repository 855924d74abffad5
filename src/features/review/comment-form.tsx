import { type FormEvent, useState } from "react";
import { MAX_COMMENT_LENGTH } from "../../../shared/schemas/review";
import { isApiError } from "../../api/client";
import { Button } from "../../components/ui/button";
import { TextAreaField } from "../../components/ui/field";
import { findMentions } from "./anchors";

export interface MemberRef {
  userId: string;
  name: string;
}

interface CommentFormProps {
  label: string;
  submitLabel: string;
  members: readonly MemberRef[];
  /** The signed-in person (never mentioned to themselves). */
  selfId: string | null;
  initial?: string;
  onSubmit: (body: string, mentions: string[]) => Promise<unknown>;
  onCancel?: () => void;
  rows?: number;
  /** A shorter hint (replies). */
  compact?: boolean;
}

/** A comment box: the text, who an @mention will notify, and the server's answer next to the field. */
export function CommentForm({ label, submitLabel, members, selfId, initial = "", onSubmit, onCancel, rows = 3, compact = false }: CommentFormProps) {
  const [text, setText] = useState(initial);
  const [pending, setPending] = useState(false);
  const [error, setError] = useState<unknown>(null);
  const [tried, setTried] = useState(false);
  const mentions = findMentions(text, members).filter((id) => id !== selfId);
  const mentioned = members.filter((m) => mentions.includes(m.userId));
  const others = members.filter((m) => m.userId !== selfId);
  const trimmed = text.trim();
  const localError = !tried ? undefined : trimmed === "" ? "Write something: a comment cannot be empty." : trimmed.length > MAX_COMMENT_LENGTH ? `A comment has at most ${MAX_COMMENT_LENGTH} characters (this one has ${trimmed.length}).` : undefined;
  const serverError = error ? (isApiError(error) ? (error.fields?.[0]?.message ?? error.message) : (error as Error).message) : undefined;

  async function submit(event: FormEvent) {
    event.preventDefault();
    setTried(true);
    if (trimmed === "" || trimmed.length > MAX_COMMENT_LENGTH) return;
    setPending(true);
    setError(null);
    try {
      await onSubmit(trimmed, mentions);
      setText("");
      setTried(false);
    } catch (err) {
      // The server's answer shows under the field.
      setError(err);
    } finally {
      setPending(false);
    }
  }

  return (
    <form onSubmit={submit} className="space-y-2" noValidate>
      <TextAreaField
        label={label}
        rows={rows}
        value={text}
        onChange={(e) => {
          setText(e.target.value);
          setError(null);
        }}
        error={localError ?? serverError}
        description={
          <>
            {compact ? (
              "Markdown and @Full Name mentions work as in a new thread."
            ) : (
              <>
                **bold**, *italic*, `code`, &gt; quotes, lists and links work. Type @ and a member&apos;s full name to notify them
                {others.length > 0 && <> ({others.slice(0, 4).map((m) => `@${m.name}`).join(", ")}{others.length > 4 ? ", …" : ""})</>}.
              </>
            )}
            {mentioned.length > 0 && <strong className="block text-ink">Will notify: {mentioned.map((m) => m.name).join(", ")}</strong>}
          </>
        }
      />
      <div className="flex flex-wrap gap-2">
        <Button type="submit" size="sm" pending={pending}>
          {submitLabel}
        </Button>
        {onCancel && (
          <Button variant="secondary" size="sm" onClick={onCancel}>
            Cancel
          </Button>
        )}
      </div>
    </form>
  );
}
