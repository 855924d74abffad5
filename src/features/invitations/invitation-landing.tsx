import { useNavigate } from "react-router";
import { isApiError } from "../../api/client";
import { useAcceptInvitation, useInvitationPreview } from "../../api/invitations";
import { useCurrentUser } from "../../api/session";
import { Alert } from "../../components/ui/alert";
import { Button, ButtonLink } from "../../components/ui/button";
import { QueryError } from "../../components/ui/query-error";
import { Loading } from "../../components/ui/spinner";
import { TextLink } from "../../components/ui/text-link";
import { ROLE_DESCRIPTIONS, ROLE_LABELS } from "../../lib/roles";
import { paths } from "../../routes/paths";

/**
 * What an invitation link opens: which Study, which role, who sent it. Signed
 * in, one button joins; signed out, sign-in and sign-up both come back here
 * (sign-up accepts the invitation by itself).
 */
export function InvitationLanding({ token }: { token: string }) {
  const navigate = useNavigate();
  const user = useCurrentUser();
  const preview = useInvitationPreview(token);
  const accept = useAcceptInvitation();
  const here = paths.invitation(token);

  if (preview.isPending) return <Loading label="Reading the invitation…" />;
  if (preview.isError) {
    if (isApiError(preview.error) && (preview.error.status === 404 || preview.error.status === 400 || preview.error.status === 410)) {
      return (
        <Alert tone="error" title="This invitation cannot be used.">
          <p>{preview.error.message}</p>
          <p className="mt-1">
            Invitations work once and expire. Ask the Study&rsquo;s owner to send a new one.
          </p>
        </Alert>
      );
    }
    return <QueryError error={preview.error} what="the invitation" onRetry={() => preview.refetch()} />;
  }

  const invitation = preview.data;
  const otherAddress = user && user.email.toLowerCase() !== invitation.email.toLowerCase();

  return (
    <div className="space-y-5">
      <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-2">
        <dt className="font-bold">Study</dt>
        <dd className="break-words">{invitation.studyName}</dd>
        <dt className="font-bold">Role</dt>
        <dd>
          {ROLE_LABELS[invitation.role]}
          <span className="block text-sm text-ink/75">{ROLE_DESCRIPTIONS[invitation.role]}</span>
        </dd>
        <dt className="font-bold">Invited by</dt>
        <dd>{invitation.invitedBy}</dd>
        <dt className="font-bold">Sent to</dt>
        <dd className="break-all">{invitation.email}</dd>
      </dl>

      {user ? (
        <div className="space-y-3">
          {otherAddress && (
            <Alert tone="warning" live={false}>
              The invitation went to {invitation.email}, and you are signed in as {user.email}. If you join, it is this account that
              joins.
            </Alert>
          )}
          {accept.isError && <Alert tone="error">{accept.error.message}</Alert>}
          <Button
            className="w-full"
            pending={accept.isPending}
            onClick={() =>
              accept.mutate(token, { onSuccess: ({ studyId }) => navigate(paths.study(studyId), { replace: true }) })
            }
          >
            Join Study
          </Button>
        </div>
      ) : invitation.accountExists ? (
        <div className="space-y-3">
          <p>Sign in to join. You will come back here.</p>
          <ButtonLink to={paths.signIn({ next: here })} className="w-full">
            Sign in to join
          </ButtonLink>
          <p className="text-center text-sm">
            Not your account? <TextLink to={paths.signUp({ invitation: token })}>Create an account instead</TextLink>
          </p>
        </div>
      ) : (
        <div className="space-y-3">
          <p>Create an account to join. It takes a minute.</p>
          <ButtonLink to={paths.signUp({ invitation: token })} className="w-full">
            Create an account to join
          </ButtonLink>
          <p className="text-center text-sm">
            Already have an account? <TextLink to={paths.signIn({ next: here })}>Sign in to join</TextLink>
          </p>
        </div>
      )}
    </div>
  );
}

