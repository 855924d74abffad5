import { zodResolver } from "@hookform/resolvers/zod";
import { useState } from "react";
import { useForm } from "react-hook-form";
import { MAX_STUDY_DESCRIPTION_LENGTH, StudyCreateSchema } from "../../../shared/schemas";
import { useCreateStudy } from "../../api/studies";
import { Alert } from "../../components/ui/alert";
import { Button } from "../../components/ui/button";
import { Dialog } from "../../components/ui/dialog";
import { TextAreaField, TextField } from "../../components/ui/field";
import { applyServerErrors } from "../../lib/form-errors";

/** "Create Study" opens a dialog; the new Study then appears in the list (and is announced). */
export function CreateStudyDialog() {
  const [open, setOpen] = useState(false);
  const create = useCreateStudy();
  const [formError, setFormError] = useState<string | null>(null);
  const [createdName, setCreatedName] = useState<string | null>(null);
  const { register, handleSubmit, setError, reset, formState } = useForm({
    resolver: zodResolver(StudyCreateSchema),
    defaultValues: { name: "", description: "" },
  });

  function close() {
    setOpen(false);
    setFormError(null);
    reset();
    create.reset();
  }

  const onSubmit = handleSubmit((values) => {
    setFormError(null);
    create.mutate(values, {
      onSuccess: (study) => {
        close();
        setCreatedName(study.name);
      },
      onError: (error) => setFormError(applyServerErrors(error, setError, ["name", "description"])),
    });
  });

  return (
    <>
      <Button
        onClick={() => {
          setCreatedName(null);
          setOpen(true);
        }}
      >
        Create Study
      </Button>
      <span role="status" className="sr-only">
        {createdName ? "Study created. It is now in your list." : ""}
      </span>
      <Dialog
        open={open}
        onClose={close}
        title="Create a Study"
        description="A Study holds the life cycles, field data and reviews for one population. You become its owner."
      >
        <form noValidate onSubmit={onSubmit} className="space-y-4">
          {formError && <Alert tone="error">{formError}</Alert>}
          <TextField label="Study name" autoFocus error={formState.errors.name?.message} {...register("name")} />
          <TextAreaField
            label="Description"
            description="Optional: species, place, question."
            maxLength={MAX_STUDY_DESCRIPTION_LENGTH}
            error={formState.errors.description?.message}
            {...register("description")}
          />
          <div className="flex justify-end gap-2">
            <Button variant="secondary" onClick={close}>
              Cancel
            </Button>
            <Button type="submit" pending={create.isPending}>
              Create Study
            </Button>
          </div>
        </form>
      </Dialog>
    </>
  );
}
