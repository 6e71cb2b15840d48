import { useState } from "react";
import { Link, useSearchParams } from "react-router-dom";
import { useQuery } from "@tanstack/react-query";
import { AuthShell } from "./AuthShell.tsx";
import { setPasswordSchema } from "./schemas.ts";
import { setPassword, tokenQueryOptions } from "./api/auth.ts";
import { Field, FormError, TextInput, useZodForm } from "../../components/Form.tsx";
import { Button, ButtonLink } from "../../components/Button.tsx";
import { Alert, ErrorNote } from "../../components/Alert.tsx";
import { Spinner } from "../../components/Spinner.tsx";

export default function SetPasswordPage() {
  const [sp] = useSearchParams();
  const token = sp.get("token") ?? "";
  const info = useQuery(tokenQueryOptions(token));
  const form = useZodForm(setPasswordSchema, { password: "", confirm: "" });
  const [done, setDone] = useState(false);
  const invite = info.data?.kind === "invite";

  const onSubmit = form.submit(async ({ password }) => {
    await setPassword(token, password);
    setDone(true);
  });

  return (
    <AuthShell title={invite ? "Welcome to Barhound" : "Choose a new password"} footer={<Link to="/sign-in">Back to sign in</Link>}>
      {!token ? (
        <Alert tone="error">This link is incomplete. Open the link from your e-mail again, or ask for a new one.</Alert>
      ) : info.isPending ? (
        <Spinner label="Checking the link…" />
      ) : info.isError ? (
        <div className="flex flex-col gap-3">
          <ErrorNote error={info.error} />
          <ButtonLink to="/forgot-password">Ask for a new link</ButtonLink>
        </div>
      ) : done ? (
        <div className="flex flex-col gap-3">
          <Alert tone="success" title="Password saved">You can now sign in as {info.data.email}.</Alert>
          <ButtonLink to="/sign-in" variant="primary">Sign in</ButtonLink>
        </div>
      ) : (
        <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4">
          <p className="text-ink-muted">
            {invite ? `Hello ${info.data.name}. Choose a password for ` : "Choose a new password for "}
            <strong className="text-ink">{info.data.email}</strong>.
          </p>
          <FormError message={form.formError ?? form.errors.token} />
          <Field label="New password" error={form.errors.password} hint="At least 10 characters.">
            {(p) => <TextInput {...p} type="password" autoComplete="new-password" autoFocus value={form.values.password} onChange={(e) => form.set("password", e.target.value)} />}
          </Field>
          <Field label="The same password again" error={form.errors.confirm}>
            {(p) => <TextInput {...p} type="password" autoComplete="new-password" value={form.values.confirm} onChange={(e) => form.set("confirm", e.target.value)} />}
          </Field>
          <Button type="submit" variant="primary" disabled={form.submitting}>
            {form.submitting ? "Saving…" : "Save password"}
          </Button>
        </form>
      )}
    </AuthShell>
  );
}
