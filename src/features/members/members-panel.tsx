import { createColumnHelper } from "@tanstack/react-table";
import { useMemo, useState } from "react";
import { useNavigate } from "react-router";
import type { Member, Role, Study } from "../../../shared/schemas";
import { useMembers, useRemoveMember, useUpdateMember } from "../../api/members";
import { useCurrentUser } from "../../api/session";
import { Alert } from "../../components/ui/alert";
import { Badge } from "../../components/ui/badge";
import { Button } from "../../components/ui/button";
import { DataTable } from "../../components/ui/data-table";
import { ConfirmDialog } from "../../components/ui/dialog";
import { SelectField } from "../../components/ui/field";
import { Section } from "../../components/ui/layout";
import { QueryError } from "../../components/ui/query-error";
import { Loading } from "../../components/ui/spinner";
import { RelativeTime } from "../../components/ui/time";
import { ROLE_LABELS, ROLES_BY_RIGHTS } from "../../lib/roles";
import { paths } from "../../routes/paths";

const column = createColumnHelper<Member>();

/**
 * Who is in the Study. Owners change roles and remove people; anyone can
 * leave. The server enforces all of it (and keeps at least one owner): this
 * panel only hides what the person's role cannot do and shows the server's
 * answer when it says no.
 */
export function MembersPanel({ study }: { study: Study }) {
  const me = useCurrentUser();
  const navigate = useNavigate();
  const members = useMembers(study.id);
  const updateMember = useUpdateMember(study.id);
  const removeMember = useRemoveMember(study.id);
  const [removing, setRemoving] = useState<Member | null>(null);
  // Giving up one's own owner role cannot be undone alone: ask first.
  const [stepDownTo, setStepDownTo] = useState<Role | null>(null);
  const isOwner = study.role === "owner";
  const { mutate: changeRole, reset: resetRoleChange } = updateMember;
  // While a change is saving, the picker shows the role asked for.
  const pendingChange = updateMember.isPending ? updateMember.variables : undefined;

  const columns = useMemo(
    () => [
      column.accessor("name", {
        header: "Name",
        cell: (info) => (
          <span className="font-bold">
            {info.getValue()}
            {info.row.original.userId === me?.id && <span className="font-normal text-ink/75"> (you)</span>}
          </span>
        ),
      }),
      column.accessor("email", { header: "E-mail", cell: (info) => <span className="break-all">{info.getValue()}</span> }),
      column.accessor("role", {
        header: "Role",
        sortingFn: (a, b) => ROLES_BY_RIGHTS.indexOf(a.original.role) - ROLES_BY_RIGHTS.indexOf(b.original.role),
        cell: (info) => {
          const member = info.row.original;
          if (!isOwner) return <Badge>{ROLE_LABELS[member.role]}</Badge>;
          const saving = pendingChange?.userId === member.userId;
          return (
            <SelectField
              label={`Access level for ${member.name}`}
              hideLabel
              value={saving ? pendingChange.role : member.role}
              disabled={saving}
              className="min-w-32 py-1"
              onChange={(event) => {
                const role = event.target.value as Role;
                resetRoleChange();
                if (member.userId === me?.id && role !== "owner") setStepDownTo(role);
                else changeRole({ userId: member.userId, role });
              }}
            >
              {ROLES_BY_RIGHTS.map((role) => (
                <option key={role} value={role}>
                  {ROLE_LABELS[role]}
                </option>
              ))}
            </SelectField>
          );
        },
      }),
      column.accessor("joinedAt", { header: "Joined", cell: (info) => <RelativeTime iso={info.getValue()} /> }),
      column.display({
        id: "actions",
        header: () => <span className="sr-only">Actions</span>,
        cell: (info) => {
          const member = info.row.original;
          const isMe = member.userId === me?.id;
          if (isMe)
            return (
              <Button variant="secondary" size="sm" onClick={() => setRemoving(member)}>
                Leave Study
              </Button>
            );
          if (!isOwner) return null;
          return (
            <Button variant="secondary" size="sm" onClick={() => setRemoving(member)}>
              Remove
            </Button>
          );
        },
      }),
    ],
    [isOwner, me?.id, pendingChange, changeRole, resetRoleChange],
  );

  const leaving = removing !== null && removing.userId === me?.id;

  function closeDialog() {
    setRemoving(null);
    removeMember.reset();
  }

  return (
    <Section
      title="Members"
      description={isOwner ? "Change a role with its picker; the change saves at once." : undefined}
    >
      {updateMember.isError && (
        <Alert tone="error" className="mb-3" title="The role did not change.">
          {updateMember.error.message}
        </Alert>
      )}
      {members.isPending ? (
        <Loading label="Loading members…" />
      ) : members.isError ? (
        <QueryError error={members.error} what="the members" onRetry={() => members.refetch()} />
      ) : (
        <DataTable
          data={members.data}
          columns={columns}
          caption="Members"
          getRowId={(member) => member.userId}
          initialSorting={[{ id: "role", desc: false }]}
        />
      )}

      <ConfirmDialog
        open={stepDownTo !== null}
        onClose={() => setStepDownTo(null)}
        title="Give up the owner role?"
        confirmLabel={`Become ${stepDownTo ? ROLE_LABELS[stepDownTo].toLowerCase() : ""}`}
        onConfirm={() => {
          if (me && stepDownTo) changeRole({ userId: me.id, role: stepDownTo });
          setStepDownTo(null);
        }}
      >
        <p>You will no longer manage members or the Study. Only another owner can make you an owner again.</p>
      </ConfirmDialog>

      <ConfirmDialog
        open={removing !== null}
        onClose={closeDialog}
        title={leaving ? "Leave this Study?" : `Remove ${removing?.name ?? ""}?`}
        confirmLabel={leaving ? "Leave Study" : "Remove"}
        pending={removeMember.isPending}
        error={removeMember.error?.message}
        onConfirm={() => {
          if (!removing) return;
          removeMember.mutate(removing.userId, {
            onSuccess: () => {
              closeDialog();
              if (leaving) void navigate(paths.studies(), { replace: true });
            },
          });
        }}
      >
        {leaving ? (
          <p>You will lose access to {study.name} until an owner invites you again.</p>
        ) : (
          <p>
            {removing?.name} ({removing?.email}) will lose access to {study.name}. What they did stays in the Study’s activity.
          </p>
        )}
      </ConfirmDialog>
    </Section>
  );
}
