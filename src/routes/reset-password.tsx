import { useSearchParams } from "react-router";
import { Alert } from "../components/ui/alert";
import { NarrowCard } from "../components/ui/layout";
import { TextLink } from "../components/ui/text-link";
import { ResetPasswordForm } from "../features/auth/reset-password-form";
import { paths } from "./paths";

export function ResetPasswordPage() {
  const [search] = useSearchParams();
  const token = search.get("token");
  return (
    <NarrowCard title="Set a new password">
      <title>Set a new password · Stagewright</title>
      {token ? (
        <ResetPasswordForm token={token} />
      ) : (
        <Alert tone="error" title="This link is incomplete.">
          Open the link from the e-mail exactly as it was sent, or{" "}
          <TextLink to={paths.forgotPassword()}>ask for a new link</TextLink>.
        </Alert>
      )}
    </NarrowCard>
  );
}
