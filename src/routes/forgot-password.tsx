import { NarrowCard } from "../components/ui/layout";
import { TextLink } from "../components/ui/text-link";
import { ForgotPasswordForm } from "../features/auth/forgot-password-form";
import { paths } from "./paths";

export function ForgotPasswordPage() {
  return (
    <NarrowCard
      title="Reset your password"
      footer={
        <p>
          Remembered it? <TextLink to={paths.signIn()}>Back to sign in</TextLink>
        </p>
      }
    >
      <title>Reset your password · Stagewright</title>
      <ForgotPasswordForm />
    </NarrowCard>
  );
}
