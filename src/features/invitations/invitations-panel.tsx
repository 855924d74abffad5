import { zodResolver } from "@hookform/resolvers/zod";
import { createColumnHelper } from "@tanstack/react-table";
import { useMemo, useState } from "react";
import { useForm, useWatch } from "react-hook-form";
import { type Invitation, InvitationCreateSchema } from "../../../shared/schemas";
import { useCreateInvitation, useInvitations, useRevokeInvitation } from "../../api/invitations";
import { Alert } from "../../components/ui/alert";
import { Button } from "../../components/ui/button";
import { DataTable } from "../../components/ui/data-table";
import { SelectField, TextField } from "../../components/ui/field";
import { Section } from "../../components/ui/layout";
import { QueryError } from "../../components/ui/query-error";
import { Loading } from "../../components/ui/spinner";
import { RelativeTime } from "../../components/ui/time";
import { applyServerErrors } from "../../lib/form-errors";
import { ROLE_DESCRIPTIONS, ROLE_LABELS, ROLES_BY_RIGHTS } from "../../lib/roles";

const column = createColumnHelper<Invitation>();

/** Owner only: invite by e-mail, see who has not answered yet, revoke. */
export function InvitationsPanel({ studyId }: { studyId: string }) {
  const invitations = useInvitations(studyId);
  const revoke = useRevokeInvitation(studyId);
  const { mutate: revokeOne } = revoke;
  const revokingId = revoke.isPending ? revoke.variables : undefined;

  const columns = useMemo(
    () => [
      column.accessor("email", { header: "E-mail", cell: (info) => <span className="break-all">{info.getValue()}</span> }),
      column.accessor("role", { header: "Role", cell: (info) => ROLE_LABELS[info.getValue()] }),
      column.accessor("invitedBy", { header: "Sent by" }),
      column.accessor("expiresAt", { header: "Expires", cell: (info) => <RelativeTime iso={info.getValue()} /> }),
      column.display({
        id: "actions",
        header: () => <span className="sr-only">Actions</span>,
        cell: (info) => (
          <Button
            variant="secondary"
            size="sm"
            pending={revokingId === info.row.original.id}
            onClick={() => revokeOne(info.row.original.id)}
          >
            Revoke
          </Button>
        ),
      }),
    ],
    [revokingId, revokeOne],
  );

  return (
    <Section title="Invitations" description="People you invite get an e-mail with a link to join. Links expire after a while.">
      <InviteForm studyId={studyId} />
      <div className="mt-6">
        <h3 className="mb-2 font-bold">Waiting for an answer</h3>
        {revoke.isError && (
          <Alert tone="error" className="mb-3">
            {revoke.error.message}
          </Alert>
        )}
        {invitations.isPending ? (
          <Loading label="Loading invitations…" />
        ) : invitations.isError ? (
          <QueryError error={invitations.error} what="the invitations" onRetry={() => invitations.refetch()} />
        ) : (
          <DataTable
            data={invitations.data}
            columns={columns}
            caption="Pending invitations"
            getRowId={(invitation) => invitation.id}
            initialSorting={[{ id: "expiresAt", desc: false }]}
            sortable={false}
            empty={<p>No invitations are waiting.</p>}
          />
        )}
      </div>
    </Section>
  );
}

function InviteForm({ studyId }: { studyId: string }) {
  const create = useCreateInvitation(studyId);
  const [formError, setFormError] = useState<string | null>(null);
  const [sent, setSent] = useState(false);
  const { register, handleSubmit, setError, reset, control, formState } = useForm({
    resolver: zodResolver(InvitationCreateSchema),
    defaultValues: { email: "", role: "editor" as const },
  });
  const role = useWatch({ control, name: "role" });

  const onSubmit = handleSubmit((values) => {
    setFormError(null);
    setSent(false);
    create.mutate(values, {
      onSuccess: () => {
        setSent(true);
        reset({ email: "", role: values.role });
      },
      onError: (error) => setFormError(applyServerErrors(error, setError, ["email", "role"])),
    });
  });

  return (
    <form noValidate onSubmit={onSubmit} className="space-y-3">
      <h3 className="font-bold">Invite someone</h3>
      {formError && <Alert tone="error">{formError}</Alert>}
      {sent && <Alert tone="success">Invitation sent. It waits in the list below until it is answered.</Alert>}
      <div className="grid gap-3 sm:grid-cols-[2fr_1fr]">
        <TextField label="E-mail" type="email" autoComplete="off" error={formState.errors.email?.message} {...register("email")} />
        <SelectField
          label="Role"
          error={formState.errors.role?.message}
          description={role ? ROLE_DESCRIPTIONS[role] : undefined}
          {...register("role")}
        >
          {ROLES_BY_RIGHTS.map((option) => (
            <option key={option} value={option}>
              {ROLE_LABELS[option]}
            </option>
          ))}
        </SelectField>
      </div>
      <details className="text-sm">
        <summary className="cursor-pointer text-indigo underline underline-offset-2">What each role can do</summary>
        <dl className="mt-2 grid grid-cols-[auto_1fr] gap-x-4 gap-y-1">
          {ROLES_BY_RIGHTS.map((option) => (
            <div key={option} className="contents">
              <dt className="font-bold">{ROLE_LABELS[option]}</dt>
              <dd className="text-ink/80">{ROLE_DESCRIPTIONS[option]}</dd>
            </div>
          ))}
        </dl>
      </details>
      <Button type="submit" pending={create.isPending}>
        Invite
      </Button>
    </form>
  );
}
