import { useState } from "react";
import { useQuery } from "@tanstack/react-query";
import { Section } from "../../components/Page.tsx";
import { DataTable, type Column } from "../../components/DataTable.tsx";
import { Field, FormError, Select, TextInput, useZodForm } from "../../components/Form.tsx";
import { Button } from "../../components/Button.tsx";
import { Alert, ErrorNote } from "../../components/Alert.tsx";
import { ROLES, type Role, type User } from "../../lib/contracts.ts";
import { formatDateTime } from "../../lib/format.ts";
import { useSession } from "../../lib/session.ts";
import { inviteSchema } from "./schemas.ts";
import { useInviteUser, usePatchUser, usersQueryOptions } from "./api/admin.ts";

const ROLE_LABEL: Record<Role, string> = { technician: "Technician", analyst: "Analyst", planner: "Planner", manager: "Manager", admin: "Admin" };

export function UsersPanel() {
  const users = useQuery(usersQueryOptions());
  const patch = usePatchUser();
  const { user: me } = useSession();
  const columns: Column<User>[] = [
    { id: "name", header: "Name", cell: (u) => <span className="font-medium">{u.name}</span> },
    { id: "email", header: "E-mail", cell: (u) => <span className="text-ink-muted">{u.email}</span> },
    {
      id: "role",
      header: "Role",
      cell: (u) => (
        <Select aria-label={`Role of ${u.name}`} className="w-36 py-1" value={u.role} disabled={u.id === me?.id || patch.isPending} onChange={(e) => patch.mutate({ id: u.id, role: e.target.value as Role })}>
          {ROLES.map((r) => (
            <option key={r} value={r}>{ROLE_LABEL[r]}</option>
          ))}
        </Select>
      ),
    },
    { id: "state", header: "State", cell: (u) => (!u.active ? <span className="text-ink-faint">Deactivated</span> : u.invited ? <span className="text-caution">Invited, not signed in</span> : <span>Active</span>) },
    { id: "last", header: "Last sign-in", cell: (u) => <span className="num whitespace-nowrap text-caption text-ink-muted">{formatDateTime(u.lastSignInAt)}</span>, hideBelow: "md" },
    {
      id: "act",
      header: <span className="sr-only">Actions</span>,
      cell: (u) =>
        u.id === me?.id ? (
          <span className="text-caption text-ink-faint">You</span>
        ) : (
          <Button size="sm" variant={u.active ? "danger" : "secondary"} disabled={patch.isPending} onClick={() => (u.active ? confirm(`Deactivate ${u.name}? They can no longer sign in.`) : true) && patch.mutate({ id: u.id, active: !u.active })}>
            {u.active ? "Deactivate" : "Reactivate"}
          </Button>
        ),
    },
  ];
  return (
    <div className="grid gap-5 xl:grid-cols-[minmax(0,1fr)_22rem]">
      <div className="flex flex-col gap-3">
        <ErrorNote error={patch.error} />
        <DataTable caption="Users" columns={columns} rows={users.data} rowKey={(u) => u.id} loading={users.isPending} error={users.error} />
      </div>
      <InviteForm />
    </div>
  );
}

function InviteForm() {
  const invite = useInviteUser();
  const form = useZodForm(inviteSchema, { email: "", name: "", role: "technician" });
  const [sent, setSent] = useState<string | null>(null);
  const onSubmit = form.submit(async (data) => {
    await invite.mutateAsync(data);
    setSent(data.email);
    form.reset();
  });
  return (
    <Section title="Invite someone" className="h-fit">
      <form onSubmit={onSubmit} noValidate className="flex flex-col gap-3" aria-label="Invite a user">
        {sent && <Alert tone="success">Invitation sent to {sent}. The link works for 72 hours.</Alert>}
        <Field label="Name" error={form.errors.name}>
          {(p) => <TextInput {...p} name="name" value={form.values.name} onChange={(e) => form.set("name", e.target.value)} />}
        </Field>
        <Field label="E-mail" error={form.errors.email}>
          {(p) => <TextInput {...p} name="email" type="email" value={form.values.email} onChange={(e) => form.set("email", e.target.value)} />}
        </Field>
        <Field label="Role" error={form.errors.role}>
          {(p) => (
            <Select {...p} name="role" value={form.values.role} onChange={(e) => form.set("role", e.target.value)}>
              {ROLES.map((r) => (
                <option key={r} value={r}>{ROLE_LABEL[r]}</option>
              ))}
            </Select>
          )}
        </Field>
        <FormError message={form.formError} />
        <Button type="submit" variant="primary" disabled={form.submitting}>{form.submitting ? "Sending…" : "Send invitation"}</Button>
      </form>
    </Section>
  );
}
