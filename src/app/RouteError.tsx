import { isRouteErrorResponse, Link, useRouteError } from "react-router-dom";
import { ApiError } from "../lib/api.ts";

/** The error boundary of every route: a failed chunk load, a thrown render error or a 404 from a loader. */
export function RouteError() {
  const error = useRouteError();
  const chunk = error instanceof Error && /dynamically imported module|Importing a module script failed|Failed to fetch/i.test(error.message);
  const title = isRouteErrorResponse(error) && error.status === 404 ? "Page not found" : chunk ? "Barhound was updated" : "This screen failed";
  const detail = chunk
    ? "A newer version is on the server. Reload to continue."
    : error instanceof ApiError || error instanceof Error
      ? error.message
      : isRouteErrorResponse(error)
        ? `${error.status} ${error.statusText}`
        : "Unknown error.";
  return (
    <div role="alert" className="mx-auto max-w-xl px-6 py-12">
      <h1 className="text-title font-semibold">{title}</h1>
      <p className="mt-2 text-ink-muted">{detail}</p>
      <div className="mt-5 flex gap-3">
        <button type="button" className="rounded-md border border-brand bg-brand px-3.5 py-1.5 font-medium text-brand-ink" onClick={() => window.location.reload()}>
          Reload
        </button>
        <Link to="/" className="rounded-md border border-line-strong px-3.5 py-1.5 font-medium text-ink no-underline">
          Start page
        </Link>
      </div>
    </div>
  );
}
