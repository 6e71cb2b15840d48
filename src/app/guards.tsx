import { useQuery } from "@tanstack/react-query";
import { Navigate, Outlet, useLocation } from "react-router-dom";
import { meQueryOptions, hasPermission, landingPath } from "../lib/session.ts";
import type { Permission } from "../lib/contracts.ts";
import { PageLoading } from "../components/Spinner.tsx";
import { Page } from "../components/Page.tsx";
import { EmptyState } from "../components/EmptyState.tsx";
import { ButtonLink } from "../components/Button.tsx";
import { ErrorNote } from "../components/Alert.tsx";

/** Renders its routes for a signed-in user; otherwise goes to /sign-in and comes back afterwards. */
export function RequireSession() {
  const me = useQuery(meQueryOptions());
  const location = useLocation();
  if (me.isPending) return <PageLoading />;
  if (me.isError)
    return (
      <div className="mx-auto max-w-md p-8">
        <ErrorNote error={me.error} />
      </div>
    );
  if (!me.data) {
    const next = location.pathname + location.search;
    return <Navigate to={next && next !== "/" ? `/sign-in?next=${encodeURIComponent(next)}` : "/sign-in"} replace />;
  }
  return <Outlet />;
}

/** Renders its routes only for roles with the permission. */
export function RequirePermission({ permission }: { permission: Permission }) {
  const me = useQuery(meQueryOptions());
  if (!hasPermission(me.data, permission)) return <NotAllowed />;
  return <Outlet />;
}

export function LandingRedirect() {
  const me = useQuery(meQueryOptions());
  return <Navigate to={landingPath(me.data)} replace />;
}

export function NotAllowed() {
  const me = useQuery(meQueryOptions());
  return (
    <Page title="Not available to your role">
      <EmptyState title="Your role may not open this screen" action={<ButtonLink to={landingPath(me.data)}>Go to your start page</ButtonLink>}>
        Ask an administrator if you need it for your work.
      </EmptyState>
    </Page>
  );
}
