import { useNavigate } from "react-router";
import { useConfirmSignUp } from "../../api/session";
import { Alert } from "../../components/ui/alert";
import { Button } from "../../components/ui/button";
import { TextLink } from "../../components/ui/text-link";
import { paths } from "../../routes/paths";

/**
 * The last step of sign-up, from the e-mailed link. A button rather than an
 * automatic request, so a mail scanner that opens links creates nothing.
 */
export function ConfirmSignUpForm({ token }: { token: string }) {
  const navigate = useNavigate();
  const confirm = useConfirmSignUp();
  if (confirm.isError) {
    return (
      <Alert tone="error">
        <p>{confirm.error.message}</p>
        <p className="mt-1">
          <TextLink to={paths.signUp()}>Sign up again</TextLink> or <TextLink to={paths.signIn()}>sign in</TextLink>.
        </p>
      </Alert>
    );
  }
  return (
    <div className="space-y-4">
      <p>Opening this link confirms your e-mail address. Create the account to start working.</p>
      <Button
        type="button"
        className="w-full"
        pending={confirm.isPending}
        onClick={() =>
          confirm.mutate(
            { token },
            { onSuccess: ({ joinedStudyId }) => navigate(joinedStudyId ? paths.study(joinedStudyId) : paths.studies(), { replace: true }) },
          )
        }
      >
        Create my account
      </Button>
    </div>
  );
}
