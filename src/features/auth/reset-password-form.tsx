import { zodResolver } from "@hookform/resolvers/zod";
import { useState } from "react";
import { useForm } from "react-hook-form";
import { MIN_PASSWORD_LENGTH, PasswordResetConfirmSchema } from "../../../shared/schemas";
import { useConfirmPasswordReset } from "../../api/session";
import { Alert } from "../../components/ui/alert";
import { Button, ButtonLink } from "../../components/ui/button";
import { TextField } from "../../components/ui/field";
import { TextLink } from "../../components/ui/text-link";
import { applyServerErrors } from "../../lib/form-errors";
import { paths } from "../../routes/paths";

// The token travels in the link, not in a field the person fills in.
const NewPasswordSchema = PasswordResetConfirmSchema.pick({ password: true });

export function ResetPasswordForm({ token }: { token: string }) {
  const confirm = useConfirmPasswordReset();
  const [formError, setFormError] = useState<string | null>(null);
  const { register, handleSubmit, setError, formState } = useForm({
    resolver: zodResolver(NewPasswordSchema),
    defaultValues: { password: "" },
  });

  const onSubmit = handleSubmit(({ password }) => {
    setFormError(null);
    confirm.mutate(
      { token, password },
      { onError: (error) => setFormError(applyServerErrors(error, setError, ["password"])) },
    );
  });

  if (confirm.isSuccess) {
    return (
      <div className="space-y-4">
        <Alert tone="success">Your new password is set. Sign in with it now.</Alert>
        <ButtonLink to={paths.signIn()} className="w-full">
          Go to sign in
        </ButtonLink>
      </div>
    );
  }

  return (
    <form noValidate onSubmit={onSubmit} className="space-y-4">
      {formError && (
        <Alert tone="error">
          <p>{formError}</p>
          <p className="mt-1">
            <TextLink to={paths.forgotPassword()}>Ask for a new link</TextLink>
          </p>
        </Alert>
      )}
      <TextField
        label="New password"
        type="password"
        autoComplete="new-password"
        description={`At least ${MIN_PASSWORD_LENGTH} characters.`}
        error={formState.errors.password?.message}
        {...register("password")}
      />
      <Button type="submit" className="w-full" pending={confirm.isPending}>
        Set new password
      </Button>
    </form>
  );
}
