import { useSearchParams } from "react-router";
import { Alert } from "../components/ui/alert";
import { NarrowCard } from "../components/ui/layout";
import { TextLink } from "../components/ui/text-link";
import { ConfirmSignUpForm } from "../features/auth/confirm-sign-up-form";
import { paths } from "./paths";

export function ConfirmSignUpPage() {
  const [search] = useSearchParams();
  const token = search.get("token");
  return (
    <NarrowCard title="Finish creating your account">
      <title>Finish creating your account · Stagewright</title>
      {token ? (
        <ConfirmSignUpForm token={token} />
      ) : (
        <Alert tone="error" title="This link is incomplete.">
          Open the link from the e-mail exactly as it was sent, or <TextLink to={paths.signUp()}>sign up again</TextLink>.
        </Alert>
      )}
    </NarrowCard>
  );
}
