import { zodResolver } from "@hookform/resolvers/zod";
import { useState } from "react";
import { useForm } from "react-hook-form";
import { useNavigate } from "react-router";
import { SignInSchema } from "../../../shared/schemas";
import { useSignIn } from "../../api/session";
import { Alert } from "../../components/ui/alert";
import { Button } from "../../components/ui/button";
import { TextField } from "../../components/ui/field";
import { applyServerErrors } from "../../lib/form-errors";
import { paths } from "../../routes/paths";

/** E-mail and password; on success goes to `next` (an in-app path) or the Studies list. */
export function SignInForm({ next }: { next: string | null }) {
  const navigate = useNavigate();
  const signIn = useSignIn();
  const [formError, setFormError] = useState<string | null>(null);
  const { register, handleSubmit, setError, formState } = useForm({
    resolver: zodResolver(SignInSchema),
    defaultValues: { email: "", password: "" },
  });
  const { errors } = formState;

  const onSubmit = handleSubmit((values) => {
    setFormError(null);
    signIn.mutate(values, {
      onSuccess: () => navigate(next ?? paths.studies(), { replace: true }),
      onError: (error) => setFormError(applyServerErrors(error, setError, ["email", "password"])),
    });
  });

  return (
    <form noValidate onSubmit={onSubmit} className="space-y-4">
      {formError && <Alert tone="error">{formError}</Alert>}
      <TextField label="E-mail" type="email" autoComplete="email" error={errors.email?.message} {...register("email")} />
      <TextField
        label="Password"
        type="password"
        autoComplete="current-password"
        error={errors.password?.message}
        {...register("password")}
      />
      <Button type="submit" className="w-full" pending={signIn.isPending}>
        Sign in
      </Button>
    </form>
  );
}
