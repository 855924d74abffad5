import { useSearchParams } from "react-router";
import { useUnsubscribe } from "../api/notifications";
import { useCurrentUser } from "../api/session";
import { Alert } from "../components/ui/alert";
import { Button } from "../components/ui/button";
import { NarrowCard } from "../components/ui/layout";
import { TextLink } from "../components/ui/text-link";
import { paths } from "./paths";

/**
 * The unsubscribe link of every notification e-mail. Works signed out: the
 * signed token is the credential. A button (not the page load) does it, so a
 * mail scanner that opens links does not unsubscribe anyone.
 */
export function UnsubscribePage() {
  const [search] = useSearchParams();
  const token = search.get("token") ?? "";
  const unsubscribe = useUnsubscribe();
  const user = useCurrentUser();
  return (
    <NarrowCard title="Stop notification e-mails from Stagewright">
      <title>Stop notification e-mails · Stagewright</title>
      {!token ? (
        <Alert tone="error">This link has no token: it may be cut short. Copy the whole link from the e-mail, or change your e-mail settings in Settings.</Alert>
      ) : unsubscribe.isSuccess ? (
        <Alert tone="success" title="Done">
          Stagewright will send {unsubscribe.data.email} no more notifications. You can turn them back on in Settings.
        </Alert>
      ) : (
        <div className="space-y-4">
          <p>
            Stagewright will stop sending you notifications: no review requests, decisions, mentions, replies or digests. You can turn them back on in Settings at any time.
            Invitations to join a Study and password-reset links you ask for still come, since they are not notifications.
          </p>
          {unsubscribe.isError && <Alert tone="error">{unsubscribe.error.message}</Alert>}
          <Button onClick={() => unsubscribe.mutate(token)} pending={unsubscribe.isPending}>
            Stop notification e-mails
          </Button>
        </div>
      )}
      <p className="mt-4 text-sm">
        <TextLink to={user ? paths.settings() : paths.signIn({ next: paths.settings() })}>E-mail settings</TextLink>
      </p>
    </NarrowCard>
  );
}
