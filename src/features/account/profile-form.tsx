import { zodResolver } from "@hookform/resolvers/zod";
import { useState } from "react";
import { useForm } from "react-hook-form";
import { ProfileUpdateSchema, type User } from "../../../shared/schemas";
import { useUpdateProfile } from "../../api/account";
import { Alert } from "../../components/ui/alert";
import { Button } from "../../components/ui/button";
import { TextField } from "../../components/ui/field";
import { Section } from "../../components/ui/layout";
import { applyServerErrors } from "../../lib/form-errors";

export function ProfileForm({ user }: { user: User }) {
  const update = useUpdateProfile();
  const [formError, setFormError] = useState<string | null>(null);
  const { register, handleSubmit, setError, reset, formState } = useForm({
    resolver: zodResolver(ProfileUpdateSchema),
    defaultValues: { name: user.name },
  });

  const onSubmit = handleSubmit((values) => {
    setFormError(null);
    update.mutate(values, {
      onSuccess: ({ user: saved }) => reset({ name: saved.name }),
      onError: (error) => setFormError(applyServerErrors(error, setError, ["name"])),
    });
  });

  return (
    <Section title="Profile" description={`Signed in as ${user.email}. Your name is what other members see.`}>
      <form noValidate onSubmit={onSubmit} className="max-w-md space-y-4">
        {formError && <Alert tone="error">{formError}</Alert>}
        {update.isSuccess && !formState.isDirty && <Alert tone="success">Saved.</Alert>}
        <TextField label="Name" autoComplete="name" error={formState.errors.name?.message} {...register("name")} />
        <Button type="submit" pending={update.isPending}>
          Save
        </Button>
      </form>
    </Section>
  );
}
