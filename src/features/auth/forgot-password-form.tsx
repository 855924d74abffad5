import { zodResolver } from "@hookform/resolvers/zod";
import { useState } from "react";
import { useForm } from "react-hook-form";
import { PasswordResetRequestSchema } from "../../../shared/schemas";
import { useRequestPasswordReset } from "../../api/session";
import { Alert } from "../../components/ui/alert";
import { Button } from "../../components/ui/button";
import { TextField } from "../../components/ui/field";
import { applyServerErrors } from "../../lib/form-errors";

export function ForgotPasswordForm() {
  const request = useRequestPasswordReset();
  const [formError, setFormError] = useState<string | null>(null);
  const { register, handleSubmit, setError, formState } = useForm({
    resolver: zodResolver(PasswordResetRequestSchema),
    defaultValues: { email: "" },
  });

  const onSubmit = handleSubmit((values) => {
    setFormError(null);
    request.mutate(values, {
      onError: (error) => setFormError(applyServerErrors(error, setError, ["email"])),
    });
  });

  return (
    <form noValidate onSubmit={onSubmit} className="space-y-4">
      <p className="text-ink/80">Enter the e-mail address of your account. We will send a link to set a new password.</p>
      {request.isSuccess && <Alert tone="success">{request.data.message}</Alert>}
      {formError && <Alert tone="error">{formError}</Alert>}
      <TextField
        label="E-mail"
        type="email"
        autoComplete="email"
        error={formState.errors.email?.message}
        {...register("email")}
      />
      <Button type="submit" className="w-full" pending={request.isPending}>
        Send reset link
      </Button>
    </form>
  );
}
