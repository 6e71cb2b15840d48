import { Link, Navigate, useNavigate, useSearchParams } from "react-router-dom";
import { useQuery, useQueryClient } from "@tanstack/react-query";
import { AuthShell } from "./AuthShell.tsx";
import { signInSchema } from "./schemas.ts";
import { signIn } from "./api/auth.ts";
import { Field, FormError, TextInput, useZodForm } from "../../components/Form.tsx";
import { Button } from "../../components/Button.tsx";
import { landingPath, meQueryOptions, safeNext, sessionKeys } from "../../lib/session.ts";

export default function SignInPage() {
  const [sp] = useSearchParams();
  const navigate = useNavigate();
  const qc = useQueryClient();
  const me = useQuery(meQueryOptions());
  const form = useZodForm(signInSchema, { email: "", password: "" });
  const next = safeNext(sp.get("next"));

  if (me.data) return <Navigate to={next ?? landingPath(me.data)} replace />;

  const onSubmit = form.submit(async (data) => {
    const session = await signIn(data);
    qc.removeQueries({ predicate: (q) => q.queryKey[0] !== sessionKeys.all[0] });
    qc.setQueryData(sessionKeys.me(), session);
    navigate(next ?? landingPath(session), { replace: true });
  });

  return (
    <AuthShell title="Sign in" footer={<>Accounts are created by your Barhound administrator.</>}>
      <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4">
        <FormError message={form.formError} />
        <Field label="E-mail" error={form.errors.email}>
          {(p) => (
            <TextInput {...p} type="email" name="email" autoComplete="username" autoFocus value={form.values.email} onChange={(e) => form.set("email", e.target.value)} />
          )}
        </Field>
        <Field label="Password" error={form.errors.password}>
          {(p) => (
            <TextInput {...p} type="password" name="password" autoComplete="current-password" value={form.values.password} onChange={(e) => form.set("password", e.target.value)} />
          )}
        </Field>
        <Button type="submit" variant="primary" disabled={form.submitting}>
          {form.submitting ? "Signing in…" : "Sign in"}
        </Button>
        <Link to="/forgot-password" className="text-center text-caption">
          Forgot your password?
        </Link>
      </form>
    </AuthShell>
  );
}
