import { useSearchParams } from "react-router";
import { Alert } from "../components/ui/alert";
import { NarrowCard } from "../components/ui/layout";
import { TextLink } from "../components/ui/text-link";
import { SignInForm } from "../features/auth/sign-in-form";
import { paths, safeNext } from "./paths";

export function SignInPage() {
  const [search] = useSearchParams();
  const next = safeNext(search.get("next"));
  return (
    <NarrowCard
      title="Sign in"
      footer={
        <>
          <p>
            <TextLink to={paths.forgotPassword()}>Forgot your password?</TextLink>
          </p>
          <p>
            New to Stagewright? <TextLink to={paths.signUp({ next })}>Create an account</TextLink>
          </p>
        </>
      }
    >
      <title>Sign in · Stagewright</title>
      {next && (
        <Alert tone="info" className="mb-4">
          Sign in to continue. You will go back to the page you were on.
        </Alert>
      )}
      <SignInForm next={next} />
    </NarrowCard>
  );
}
