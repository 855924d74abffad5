import { zodResolver } from "@hookform/resolvers/zod";
import { useState } from "react";
import { useForm } from "react-hook-form";
import { MIN_PASSWORD_LENGTH, PasswordChangeSchema } from "../../../shared/schemas";
import { useChangePassword } from "../../api/account";
import { Alert } from "../../components/ui/alert";
import { Button } from "../../components/ui/button";
import { TextField } from "../../components/ui/field";
import { Section } from "../../components/ui/layout";
import { applyServerErrors } from "../../lib/form-errors";

export function PasswordForm() {
  const change = useChangePassword();
  const [formError, setFormError] = useState<string | null>(null);
  const { register, handleSubmit, setError, reset, formState } = useForm({
    resolver: zodResolver(PasswordChangeSchema),
    defaultValues: { currentPassword: "", newPassword: "" },
  });

  const onSubmit = handleSubmit((values) => {
    setFormError(null);
    change.mutate(values, {
      onSuccess: () => reset(),
      onError: (error) => setFormError(applyServerErrors(error, setError, ["currentPassword", "newPassword"])),
    });
  });

  return (
    <Section title="Password">
      <form noValidate onSubmit={onSubmit} className="max-w-md space-y-4">
        {formError && <Alert tone="error">{formError}</Alert>}
        {change.isSuccess && !formState.isDirty && <Alert tone="success">Your password is changed.</Alert>}
        <TextField
          label="Current password"
          type="password"
          autoComplete="current-password"
          error={formState.errors.currentPassword?.message}
          {...register("currentPassword")}
        />
        <TextField
          label="New password"
          type="password"
          autoComplete="new-password"
          description={`At least ${MIN_PASSWORD_LENGTH} characters.`}
          error={formState.errors.newPassword?.message}
          {...register("newPassword")}
        />
        <Button type="submit" pending={change.isPending}>
          Change password
        </Button>
      </form>
    </Section>
  );
}
