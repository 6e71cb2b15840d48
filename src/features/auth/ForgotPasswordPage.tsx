import { useState } from "react";
import { Link } from "react-router-dom";
import { AuthShell } from "./AuthShell.tsx";
import { forgotSchema } from "./schemas.ts";
import { requestReset } from "./api/auth.ts";
import { Field, FormError, TextInput, useZodForm } from "../../components/Form.tsx";
import { Button } from "../../components/Button.tsx";
import { Alert } from "../../components/Alert.tsx";

export default function ForgotPasswordPage() {
  const form = useZodForm(forgotSchema, { email: "" });
  const [sentTo, setSentTo] = useState<string | null>(null);
  const onSubmit = form.submit(async ({ email }) => {
    await requestReset(email);
    setSentTo(email);
  });
  return (
    <AuthShell title="Reset your password" footer={<Link to="/sign-in">Back to sign in</Link>}>
      {sentTo ? (
        <Alert tone="success" title="Check your e-mail">
          If <strong>{sentTo}</strong> has a Barhound account, a link to choose a new password is on its way. It works for one hour.
        </Alert>
      ) : (
        <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4">
          <p className="text-ink-muted">Enter the e-mail address you sign in with. We will send a link to choose a new password.</p>
          <FormError message={form.formError} />
          <Field label="E-mail" error={form.errors.email}>
            {(p) => <TextInput {...p} type="email" autoComplete="email" autoFocus value={form.values.email} onChange={(e) => form.set("email", e.target.value)} />}
          </Field>
          <Button type="submit" variant="primary" disabled={form.submitting}>
            {form.submitting ? "Sending…" : "Send the link"}
          </Button>
        </form>
      )}
    </AuthShell>
  );
}
