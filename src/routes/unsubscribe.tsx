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
    <NarrowCard title="Stop e-mails from Stagewright">
      <title>Stop e-mails · Stagewright</title>
      {!token ? (
        <Alert tone="error">This link has no token: it may be cut short. Copy the whole link from the e-mail, or change your e-mail settings in Settings.</Alert>
      ) : unsubscribe.isSuccess ? (
        <Alert tone="success" title="Done">
          Stagewright will not e-mail {unsubscribe.data.email} any more. You can turn e-mail back on in Settings.
        </Alert>
      ) : (
        <div className="space-y-4">
          <p>Stagewright will stop sending you e-mail: no review requests, decisions, mentions, replies, digests or invitations. You can turn it back on in Settings at any time.</p>
          {unsubscribe.isError && <Alert tone="error">{unsubscribe.error.message}</Alert>}
          <Button onClick={() => unsubscribe.mutate(token)} pending={unsubscribe.isPending}>
            Stop all e-mails
          </Button>
        </div>
      )}
      <p className="mt-4 text-sm">
        <TextLink to={user ? paths.settings() : paths.signIn({ next: paths.settings() })}>E-mail settings</TextLink>
      </p>
    </NarrowCard>
  );
}
