import { useSearchParams } from "react-router";
import { NarrowCard } from "../components/ui/layout";
import { TextLink } from "../components/ui/text-link";
import { SignUpForm } from "../features/auth/sign-up-form";
import { paths, safeNext } from "./paths";

export function SignUpPage() {
  const [search] = useSearchParams();
  const invitationToken = search.get("invitation");
  const next = safeNext(search.get("next"));
  // Signing in instead should still end on the invitation, where "Join Study" waits.
  const signInNext = invitationToken ? paths.invitation(invitationToken) : next;
  return (
    <NarrowCard
      title="Create your account"
      footer={
        <p>
          Already have an account? <TextLink to={paths.signIn({ next: signInNext })}>Sign in</TextLink>
        </p>
      }
    >
      <title>Create your account · Stagewright</title>
      <SignUpForm invitationToken={invitationToken} next={next} />
    </NarrowCard>
  );
}
