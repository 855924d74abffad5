import { useNotificationPreferences, useSetNotificationPreferences, type NotificationMode } from "../../api/notifications";
import { Alert } from "../../components/ui/alert";
import { Section } from "../../components/ui/layout";
import { QueryError } from "../../components/ui/query-error";
import { Loading } from "../../components/ui/spinner";

const CHOICES: { mode: NotificationMode; label: string; description: string }[] = [
  { mode: "immediate", label: "As it happens", description: "One e-mail for each review request, review decision, @mention, reply to your thread and invitation." },
  { mode: "digest", label: "Daily digest", description: "One e-mail a day (07:00 UTC) listing everything since the last one. Invitations still come at once." },
  {
    mode: "off",
    label: "Off",
    description:
      "No notifications: no review requests, decisions, mentions, replies or digests. You still see everything when you sign in. E-mails you need in order to act still come: invitations to join a Study and the password-reset links you ask for.",
  },
];

/** How Stagewright e-mails you: immediately, in a daily digest, or not at all. Saved on change. */
export function NotificationPreferencesForm() {
  const prefs = useNotificationPreferences();
  const save = useSetNotificationPreferences();
  return (
    <Section title="E-mail" description="Stagewright e-mails you when someone asks for your review, decides on a review you asked for, mentions you, or replies to your thread.">
      {prefs.isPending ? (
        <Loading label="Loading your e-mail settings…" />
      ) : prefs.isError ? (
        <QueryError error={prefs.error} what="your e-mail settings" onRetry={() => prefs.refetch()} />
      ) : (
        <fieldset className="max-w-xl space-y-3">
          <legend className="sr-only">How often to e-mail you</legend>
          {CHOICES.map((c) => (
            <label key={c.mode} className="flex gap-3">
              <input
                type="radio"
                name="notification-mode"
                className="mt-1"
                checked={(save.isPending ? save.variables.mode : prefs.data.mode) === c.mode}
                onChange={() => save.mutate({ mode: c.mode })}
              />
              <span>
                <span className="block font-bold">{c.label}</span>
                <span className="block text-sm text-ink/75">{c.description}</span>
              </span>
            </label>
          ))}
          {save.isError && <Alert tone="error">{save.error.message}</Alert>}
          {save.isSuccess && <Alert tone="success">Saved: {CHOICES.find((c) => c.mode === save.data.mode)?.label.toLowerCase()}.</Alert>}
        </fieldset>
      )}
    </Section>
  );
}
