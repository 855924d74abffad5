import { zodResolver } from "@hookform/resolvers/zod";
import { useEffect, useState } from "react";
import { useForm } from "react-hook-form";
import { useNavigate } from "react-router";
import { MIN_PASSWORD_LENGTH, SignUpSchema } from "../../../shared/schemas";
import { useInvitationPreview } from "../../api/invitations";
import { useSignUp } from "../../api/session";
import { Alert } from "../../components/ui/alert";
import { Button } from "../../components/ui/button";
import { TextField } from "../../components/ui/field";
import { textLinkClasses } from "../../components/ui/text-link";
import { applyServerErrors } from "../../lib/form-errors";
import { ROLE_LABELS } from "../../lib/roles";
import { paths } from "../../routes/paths";

type SignUpFormProps = {
  /** From `?invitation=`: the new account joins that Study and lands on it. */
  invitationToken: string | null;
  next: string | null;
};

export function SignUpForm({ invitationToken, next }: SignUpFormProps) {
  const navigate = useNavigate();
  const signUp = useSignUp();
  const invitation = useInvitationPreview(invitationToken);
  const [formError, setFormError] = useState<string | null>(null);
  const [pending, setPending] = useState<string | null>(null);
  const { register, handleSubmit, setError, setValue, getValues, formState } = useForm({
    resolver: zodResolver(SignUpSchema),
    defaultValues: { name: "", email: "", password: "" },
  });
  const { errors } = formState;

  // Offer the address the invitation went to, unless the person already typed one.
  const invitedEmail = invitation.data?.email;
  useEffect(() => {
    if (invitedEmail && !getValues("email")) setValue("email", invitedEmail);
  }, [invitedEmail, getValues, setValue]);

  const onSubmit = handleSubmit((values) => {
    setFormError(null);
    signUp.mutate(
      { ...values, ...(invitationToken ? { invitationToken } : {}) },
      {
        onSuccess: (result) => {
          if ("user" in result) navigate(result.joinedStudyId ? paths.study(result.joinedStudyId) : (next ?? paths.studies()), { replace: true });
          else setPending(result.message);
        },
        onError: (error) => setFormError(applyServerErrors(error, setError, ["name", "email", "password"])),
      },
    );
  });

  if (pending) {
    return (
      <div className="space-y-4">
        <Alert tone="success" title="One more step">
          {pending}
        </Alert>
        <p className="text-sm">
          No message after a few minutes? Look in your spam folder, or{" "}
          <button type="button" className={textLinkClasses} onClick={() => setPending(null)}>
            check the address and send it again
          </button>
          .
        </p>
      </div>
    );
  }

  return (
    <form noValidate onSubmit={onSubmit} className="space-y-4">
      {invitation.data && (
        <Alert tone="info" live={false}>
          You are joining <strong>{invitation.data.studyName}</strong> as {ROLE_LABELS[invitation.data.role].toLowerCase()},
          invited by {invitation.data.invitedBy}.
        </Alert>
      )}
      {invitation.isError && (
        <Alert tone="warning">
          This invitation link could not be read: {invitation.error.message} You can still create an account.
        </Alert>
      )}
      {formError && <Alert tone="error">{formError}</Alert>}
      <TextField label="Name" autoComplete="name" error={errors.name?.message} {...register("name")} />
      <TextField label="E-mail" type="email" autoComplete="email" error={errors.email?.message} {...register("email")} />
      <TextField
        label="Password"
        type="password"
        autoComplete="new-password"
        description={`At least ${MIN_PASSWORD_LENGTH} characters. A short sentence is easy to remember and hard to guess.`}
        error={errors.password?.message}
        {...register("password")}
      />
      <Button type="submit" className="w-full" pending={signUp.isPending}>
        Create account
      </Button>
    </form>
  );
}
