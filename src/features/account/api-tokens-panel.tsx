import { zodResolver } from "@hookform/resolvers/zod";
import { createColumnHelper } from "@tanstack/react-table";
import { useMemo, useState } from "react";
import { useForm } from "react-hook-form";
import { z } from "zod";
import { type ApiToken, ApiTokenCreateSchema, type NewApiToken } from "../../../shared/schemas";
import { useApiTokens, useCreateApiToken, useRevokeApiToken } from "../../api/account";
import { Alert } from "../../components/ui/alert";
import { Button } from "../../components/ui/button";
import { CopyButton } from "../../components/ui/copy-button";
import { DataTable } from "../../components/ui/data-table";
import { ConfirmDialog } from "../../components/ui/dialog";
import { SelectField, TextField } from "../../components/ui/field";
import { Section } from "../../components/ui/layout";
import { QueryError } from "../../components/ui/query-error";
import { Loading } from "../../components/ui/spinner";
import { DateTime, RelativeTime } from "../../components/ui/time";
import { applyServerErrors } from "../../lib/form-errors";

const column = createColumnHelper<ApiToken>();

/** Personal API tokens for scripts: list, create (secret shown once), revoke. */
export function ApiTokensPanel() {
  const tokens = useApiTokens();
  const revoke = useRevokeApiToken();
  const [revoking, setRevoking] = useState<ApiToken | null>(null);
  const [created, setCreated] = useState<NewApiToken | null>(null);

  const columns = useMemo(
    () => [
      column.accessor("name", { header: "Name", cell: (info) => <span className="font-bold">{info.getValue()}</span> }),
      column.accessor("scope", { header: "May", cell: (info) => (info.getValue() === "read" ? "read only" : "read and write") }),
      column.accessor("createdAt", { header: "Created", cell: (info) => <RelativeTime iso={info.getValue()} /> }),
      column.accessor("expiresAt", { header: "Expires", cell: (info) => <Expiry iso={info.getValue()} /> }),
      column.accessor("lastUsedAt", { header: "Last used", cell: (info) => <RelativeTime iso={info.getValue()} /> }),
      column.display({
        id: "actions",
        header: () => <span className="sr-only">Actions</span>,
        cell: (info) => (
          <Button variant="secondary" size="sm" onClick={() => setRevoking(info.row.original)}>
            Revoke
          </Button>
        ),
      }),
    ],
    [],
  );

  function closeRevoke() {
    setRevoking(null);
    revoke.reset();
  }

  return (
    <Section
      title="API tokens"
      description="A token lets a script use the Stagewright API as you, with your rights in each Study. A read-only token can fetch and analyse but change nothing. Give each token the shortest life its script needs, and revoke it as soon as the script no longer needs it."
    >
      {created && <NewTokenNotice token={created} onDone={() => setCreated(null)} />}
      <CreateTokenForm onCreated={setCreated} />
      <div className="mt-6">
        {tokens.isPending ? (
          <Loading label="Loading tokens…" />
        ) : tokens.isError ? (
          <QueryError error={tokens.error} what="your tokens" onRetry={() => tokens.refetch()} />
        ) : (
          <DataTable
            data={tokens.data}
            columns={columns}
            caption="Your API tokens"
            getRowId={(token) => token.id}
            initialSorting={[{ id: "createdAt", desc: true }]}
            sortable={false}
            empty={<p>You have no API tokens.</p>}
          />
        )}
      </div>
      <ConfirmDialog
        open={revoking !== null}
        onClose={closeRevoke}
        title={`Revoke “${revoking?.name ?? ""}”?`}
        confirmLabel="Revoke"
        pending={revoke.isPending}
        error={revoke.error?.message}
        onConfirm={() =>
          revoking &&
          revoke.mutate(revoking.id, {
            onSuccess: () => {
              // A revoked secret is no use to copy any more.
              if (created?.id === revoking.id) setCreated(null);
              closeRevoke();
            },
          })
        }
      >
        <p>Scripts using this token stop working at once. This cannot be undone; you can create a new token.</p>
      </ConfirmDialog>
    </Section>
  );
}

function Expiry({ iso }: { iso: string | null }) {
  if (!iso) return <span>never</span>;
  if (new Date(iso).getTime() <= Date.now()) return <span className="font-bold text-brick">expired</span>;
  return <DateTime iso={iso} />;
}

const EXPIRY_CHOICES = [
  { value: "7", label: "in 7 days" },
  { value: "30", label: "in 30 days" },
  { value: "90", label: "in 90 days" },
  { value: "366", label: "in a year" },
  { value: "never", label: "never (revoke it by hand)" },
] as const;

/** The form's own values: the expiry as a choice, turned into `expiresInDays` on submit. */
const TokenFormSchema = ApiTokenCreateSchema.pick({ name: true }).extend({
  scope: z.enum(["read", "read-write"]),
  expiry: z.enum(["7", "30", "90", "366", "never"]),
});
type TokenForm = z.infer<typeof TokenFormSchema>;

function CreateTokenForm({ onCreated }: { onCreated: (token: NewApiToken) => void }) {
  const create = useCreateApiToken();
  const [formError, setFormError] = useState<string | null>(null);
  const { register, handleSubmit, setError, reset, formState } = useForm<TokenForm>({
    resolver: zodResolver(TokenFormSchema),
    defaultValues: { name: "", scope: "read", expiry: "90" },
  });

  const onSubmit = handleSubmit(({ name, scope, expiry }) => {
    setFormError(null);
    create.mutate({ name, scope, expiresInDays: expiry === "never" ? null : Number(expiry) }, {
      onSuccess: (token) => {
        reset();
        onCreated(token);
      },
      onError: (error) => setFormError(applyServerErrors(error, setError, ["name"])),
    });
  });

  return (
    <form noValidate onSubmit={onSubmit} className="space-y-3">
      {formError && <Alert tone="error">{formError}</Alert>}
      <div className="flex flex-wrap items-end gap-3">
        <TextField
          label="Token name"
          fieldClassName="min-w-64 flex-1"
          placeholder="e.g. nightly census import"
          autoComplete="off"
          error={formState.errors.name?.message}
          {...register("name")}
        />
        <SelectField label="It may" error={formState.errors.scope?.message} {...register("scope")}>
          <option value="read">read only</option>
          <option value="read-write">read and write</option>
        </SelectField>
        <SelectField label="Expires" error={formState.errors.expiry?.message} {...register("expiry")}>
          {EXPIRY_CHOICES.map((c) => (
            <option key={c.value} value={c.value}>
              {c.label}
            </option>
          ))}
        </SelectField>
        <Button type="submit" pending={create.isPending}>
          Create token
        </Button>
      </div>
    </form>
  );
}

function NewTokenNotice({ token, onDone }: { token: NewApiToken; onDone: () => void }) {
  return (
    <Alert tone="warning" className="mb-5" title={`Copy your new token “${token.name}” now.`}>
      <p>Stagewright shows this token only once. Store it somewhere safe, such as a password manager; if you lose it, revoke it and create another.</p>
      <div className="mt-3 flex flex-wrap items-center gap-3">
        <span className="font-bold">Your new token:</span>
        <code
          className="rounded border border-ink/30 bg-white px-2 py-1 font-mono text-sm break-all select-all"
        >
          {token.token}
        </code>
        <CopyButton value={token.token} label="Copy token" />
      </div>
      <p className="mt-2 text-sm">
        Send it in the header <code className="font-mono">Authorization: Bearer &lt;token&gt;</code>.
      </p>
      <Button variant="secondary" size="sm" className="mt-3" onClick={onDone}>
        I have stored it
      </Button>
    </Alert>
  );
}
