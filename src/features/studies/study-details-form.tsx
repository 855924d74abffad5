import { zodResolver } from "@hookform/resolvers/zod";
import { useState } from "react";
import { useForm } from "react-hook-form";
import { MAX_STUDY_DESCRIPTION_LENGTH, MAX_STUDY_NAME_LENGTH, type Study, StudyCreateSchema } from "../../../shared/schemas";
import { useUpdateStudy } from "../../api/studies";
import { Alert } from "../../components/ui/alert";
import { Button } from "../../components/ui/button";
import { TextAreaField, TextField } from "../../components/ui/field";
import { Section } from "../../components/ui/layout";
import { applyServerErrors } from "../../lib/form-errors";

// Renaming sends both fields, which is exactly the create payload's shape and rules.
const DetailsSchema = StudyCreateSchema;

/** Owners rename, describe, archive and restore the Study. */
export function StudyDetailsForm({ study }: { study: Study }) {
  const update = useUpdateStudy(study.id);
  const archive = useUpdateStudy(study.id);
  const [formError, setFormError] = useState<string | null>(null);
  const [saved, setSaved] = useState(false);
  const { register, handleSubmit, setError, formState, reset } = useForm({
    resolver: zodResolver(DetailsSchema),
    values: { name: study.name, description: study.description },
  });

  const onSubmit = handleSubmit((values) => {
    setFormError(null);
    setSaved(false);
    update.mutate(values, {
      onSuccess: (next) => {
        reset({ name: next.name, description: next.description });
        setSaved(true);
      },
      onError: (error) => setFormError(applyServerErrors(error, setError, ["name", "description"])),
    });
  });

  const archived = Boolean(study.archivedAt);

  return (
    <Section title="Study details" description="Only owners see this panel.">
      <form noValidate onSubmit={onSubmit} className="space-y-4">
        {formError && <Alert tone="error">{formError}</Alert>}
        {saved && !formState.isDirty && <Alert tone="success">Saved.</Alert>}
        <TextField label="Study name" maxLength={MAX_STUDY_NAME_LENGTH} error={formState.errors.name?.message} {...register("name")} />
        <TextAreaField
          label="Description"
          rows={4}
          maxLength={MAX_STUDY_DESCRIPTION_LENGTH}
          error={formState.errors.description?.message}
          {...register("description")}
        />
        <Button type="submit" pending={update.isPending}>
          Save
        </Button>
      </form>

      <div className="mt-6 space-y-2 border-t border-ink/10 pt-4">
        <h3 className="font-bold">{archived ? "Archived" : "Archive"}</h3>
        <p className="text-sm text-ink/75">
          {archived
            ? "Restoring brings the Study back to everyone's active list."
            : "Archiving moves the Study to everyone's archived group. Nothing is deleted and you can restore it."}
        </p>
        {archive.isError && <Alert tone="error">{archive.error.message}</Alert>}
        <Button
          variant="secondary"
          pending={archive.isPending}
          onClick={() => archive.mutate({ archived: !archived })}
        >
          {archived ? "Restore Study" : "Archive Study"}
        </Button>
      </div>
    </Section>
  );
}
